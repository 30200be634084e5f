namespace IdentityQueue.Algebra.Fields;

/// <summary>How a field stores its elements, as far as code that runs on raw representatives needs to know.</summary>
public enum ElementLayout
{
    /// <summary>Only through the field's own operations.</summary>
    Generic,
    /// <summary>A Montgomery representative in [0, p) as one <see cref="uint"/> (R = 2^32, p &lt; 2^31): <see cref="PrimeField31"/>.</summary>
    Montgomery31,
    /// <summary>A Montgomery representative in [0, p) as one <see cref="ulong"/> (R = 2^64, p &lt; 2^62): <see cref="PrimeField62"/>.</summary>
    Montgomery62,
}

/// <summary>
/// Names a field type's <see cref="ElementLayout"/> as a static member, so that generic code picks a kernel for raw
/// representatives once, from the type parameter, without testing types. <see cref="ElementLayout.Generic"/> unless a field says otherwise.
/// </summary>
public interface IElementLayout
{
    /// <summary>The layout of this field type's elements.</summary>
    static virtual ElementLayout Layout => ElementLayout.Generic;
}
