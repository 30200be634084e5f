using System.Buffers.Binary;
using System.Globalization;
using System.Numerics;
using System.Security.Cryptography;
using System.Text;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Screening;

/// <summary>
/// A candidate's identity for seeding its trials: a hash of its canonical text — both sides printed from the parse tree
/// (so spacing and redundant parentheses do not matter), its field and its parameter values — never a database id. The
/// same identity therefore gets the same trials for the same <see cref="RunSeed"/> in a SQLite store, a PostgreSQL store
/// and <c>idq check --seed</c>. Stateless; thread-safe.
/// </summary>
public static class CandidateKey
{
    /// <summary>The text the key is a hash of: <c>LHS = RHS over FIELD | n=3, k=1</c> (parameters in ordinal order).</summary>
    public static string Canonical(IdentityEntry entry, IReadOnlyDictionary<string, BigInteger> parameters)
    {
        var text = new StringBuilder(ExprPrinter.Print(entry.Left)).Append(" = ").Append(ExprPrinter.Print(entry.Right))
            .Append(" over ").Append(entry.Field.ToString()).Append(" |");
        var first = true;
        foreach (var (name, value) in parameters.OrderBy(p => p.Key, StringComparer.Ordinal))
        {
            text.Append(first ? " " : ", ").Append(name).Append('=').Append(value.ToString(CultureInfo.InvariantCulture));
            first = false;
        }
        return text.ToString();
    }

    /// <summary>The key: the first 8 bytes (little-endian) of the SHA-256 of the UTF-8 canonical text.</summary>
    public static ulong Of(IdentityEntry entry, IReadOnlyDictionary<string, BigInteger> parameters) =>
        BinaryPrimitives.ReadUInt64LittleEndian(SHA256.HashData(Encoding.UTF8.GetBytes(Canonical(entry, parameters))));
}
