using System.Text;
using IdentityQueue.Screening.Catalogues;
using IdentityQueue.Store.Import;

namespace IdentityQueue.Store.Tests.Import;

/// <summary>
/// Issue #18: lines (and JSONL/CSV fields) of many megabytes — an expanded polynomial of 10^5 terms is about 4 MB — are
/// read holding only the line's bytes and its string; a line over the limit costs no memory and its rejection names the
/// limit, the line and its size.
/// </summary>
public sealed class LongLineTests
{
    private static string Sum(int terms, Func<int, string> term) => string.Join(" + ", Enumerable.Range(1, terms).Select(term));

    private static List<SourceLine> ReadAll(byte[] bytes, int limit, out long allocated)
    {
        using var stream = new MemoryStream(bytes, writable: false);
        var before = GC.GetAllocatedBytesForCurrentThread();
        var lines = SourceLines.Read(stream, limit).ToList();
        allocated = GC.GetAllocatedBytesForCurrentThread() - before;
        return lines;
    }

    [Fact]
    public void TwentyFourMebibyteLine_IsReadWithItsBytesAndItsStringOnly()
    {
        var line = "x = " + new string('y', 24 << 20);
        var bytes = Encoding.UTF8.GetBytes(line + "\r\nnext = 1\n");
        var lines = ReadAll(bytes, Algebra.Limits.Default.MaxLineLength, out var allocated);

        Assert.Equal(2, lines.Count);
        Assert.Equal(line, lines[0].Text);
        Assert.Equal("next = 1", lines[1].Text);
        // The bytes once (in 64 KiB chunks, never copied as the line grows) and the string (2 bytes per char): 3 times the line.
        Assert.True(allocated < 3.3 * line.Length, $"allocated {allocated} bytes for a line of {line.Length} bytes");
    }

    [Fact]
    public void OverlongLine_CostsNoMemory_AndItsRejectionNamesTheLimitTheLineAndItsSize()
    {
        const int limit = 1 << 20;
        var longLine = "x = " + new string('y', 30 << 20);
        var bytes = Encoding.UTF8.GetBytes($"a = a\n{longLine}\nb = b\n");
        var lines = ReadAll(bytes, limit, out var allocated);

        Assert.Equal(["a = a", null, "b = b"], lines.Select(l => l.Text));
        Assert.Equal($"the line is {longLine.Length} characters long ({longLine.Length} bytes); the limit MaxLineLength is 1048576 " +
            "characters (1 MiB): split the entry, or raise the limit", lines[1].Problem);
        Assert.Equal(2, lines[1].Number);
        Assert.True(allocated < 8 * limit, $"allocated {allocated} bytes");
    }

    [Fact]
    public void MultibyteText_IsCountedInCharsExactly_AtTheLimit()
    {
        // 'é' is 2 bytes and 1 char, '𝔽' 4 bytes and 2 chars (a surrogate pair): the limit counts chars, as the parser does.
        var text = "é𝔽" + new string('a', 7); // 10 chars, 13 bytes
        var fits = ReadAll(Encoding.UTF8.GetBytes(text + "\n"), 10, out _);
        Assert.Equal(text, fits[0].Text);
        var over = ReadAll(Encoding.UTF8.GetBytes(text + "a\n"), 10, out _);
        Assert.StartsWith("the line is 11 characters long (14 bytes)", over[0].Problem);
    }

    [Fact]
    public void InvalidByteDeepInALongLine_IsFoundAtItsPosition()
    {
        var bytes = Encoding.UTF8.GetBytes("x = " + new string('y', 200_000) + "\n").ToList();
        bytes[150_000] = 0xFF;
        var lines = ReadAll([.. bytes], 1 << 20, out _);
        Assert.Equal("the line is not valid UTF-8 (byte 150001 of the line)", lines[0].Problem);
    }

    [Fact]
    public void CatalogueOfMultiMegabyteLines_Imports_InEveryFormat()
    {
        // Sums of 200,000 terms (about 2 MB a side, beyond the old 1 MiB limit), compared with the same terms reversed.
        using var store = TempStore.Create();
        var lhs = Sum(200_000, i => $"x{i}");
        var rhs = string.Join(" + ", Enumerable.Range(1, 200_000).Reverse().Select(i => $"x{i}"));
        Assert.True(lhs.Length > 1 << 20);
        var idq = store.File("big.idq", $"big: {lhs} = {rhs}\nsmall: x = x\n");
        var jsonl = store.File("big-jsonl.jsonl", $"{{\"label\": \"big\", \"lhs\": \"{lhs}\", \"rhs\": \"{rhs}\"}}\n");
        var csv = store.File("big-csv.csv", $"label,lhs,rhs\nbig,{lhs},{rhs}\n");
        Assert.Equal(2, store.Import(idq).Instances);
        Assert.Equal(1, store.Import(jsonl).Instances);
        Assert.Equal(1, store.Import(csv).Instances);
        Assert.Equal(0, store.Count("SELECT COUNT(*) FROM rejection"));
        Assert.Equal(3, store.Count($"SELECT COUNT(*) FROM candidate WHERE label = 'big' AND lhs = '{lhs}' AND rhs = '{rhs}'"));
    }
}
