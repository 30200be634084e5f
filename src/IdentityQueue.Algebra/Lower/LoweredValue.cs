namespace IdentityQueue.Algebra.Lower;

/// <summary>What a lowered subexpression is: a scalar register, or a matrix of registers in row-major order.</summary>
internal readonly struct LoweredValue
{
    private LoweredValue(int scalar, int rows, int columns, int[]? entries)
    {
        Scalar = scalar;
        Rows = rows;
        Columns = columns;
        Entries = entries;
    }

    public int Scalar { get; }
    public int Rows { get; }
    public int Columns { get; }
    public int[]? Entries { get; }
    public bool IsMatrix => Entries is not null;

    public static LoweredValue Of(int register) => new(register, 0, 0, null);
    public static LoweredValue Matrix(int rows, int columns, int[] entries) => new(-1, rows, columns, entries);

    public int this[int i, int j] => Entries![i * Columns + j];

    public string Describe() => IsMatrix ? $"a {Rows}×{Columns} matrix" : "a scalar";
}
