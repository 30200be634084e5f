using System.Text;
using IdentityQueue.Algebra;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Syntax;
using IdentityQueue.Screening.Catalogues;
using IdentityQueue.Store.Import;

namespace IdentityQueue.Store.Tests.Import;

public sealed class ImportFuzzTests
{
    private static readonly Limits FuzzLimits = Limits.Default with { MaxLineLength = 20_000 };

    private enum Kind { Good, Bad, Either, Skip }

    [Theory]
    [InlineData(1)]
    [InlineData(2)]
    [InlineData(3)]
    public void FuzzedCatalogue_ImportsWithoutAnException_AndAccountsForEveryLine(int seed)
    {
        var random = new Random(seed);
        var lines = new List<(byte[] Bytes, Kind Kind)> { ("first: x = x"u8.ToArray(), Kind.Good) };
        for (var i = 0; i < 400; i++) lines.Add(Line(random, i));

        using var store = TempStore.Create();
        var file = store.File("fuzz.idq", lines.SelectMany((l, i) => i == 0 ? l.Bytes : [(byte)'\n', .. l.Bytes]).ToArray());
        var summary = store.Import(file, new ImportOptions { Limits = FuzzLimits, BatchSize = 37 });

        var candidatesByLine = store.Rows("SELECT position, COUNT(*) FROM candidate GROUP BY position").ToDictionary(r => (int)(long)r[0]!, r => (int)(long)r[1]!);
        var rejected = store.Rows("SELECT line FROM rejection").Select(r => (int)(long)r[0]!).ToList();
        Assert.Equal(rejected.Count, rejected.Distinct().Count());
        Assert.Equal(lines.Count, summary.Lines);

        int good = 0, bad = 0, instances = 0;
        for (var i = 0; i < lines.Count; i++)
        {
            var number = i + 1;
            var expected = Oracle(lines[i].Bytes);
            var kind = lines[i].Kind;
            if (kind != Kind.Either) Assert.True(kind == (expected is null ? Kind.Bad : expected == 0 ? Kind.Skip : Kind.Good), $"line {number}: the generator meant {kind}");
            if (expected is null)
            {
                bad++;
                Assert.Contains(number, rejected);
                Assert.False(candidatesByLine.ContainsKey(number), $"line {number} is bad but has candidates");
            }
            else if (expected > 0)
            {
                good++;
                instances += expected.Value;
                Assert.DoesNotContain(number, rejected);
                Assert.Equal(expected.Value, candidatesByLine.GetValueOrDefault(number));
            }
            else
            {
                Assert.DoesNotContain(number, rejected);
                Assert.False(candidatesByLine.ContainsKey(number));
            }
        }
        Assert.Equal(bad, summary.Rejections);
        Assert.Equal(good, summary.Entries);
        Assert.Equal(instances, summary.Instances);
        Assert.True(good > 100 && bad > 100, $"good {good}, bad {bad}");
        Assert.All(store.Rows("SELECT raw FROM rejection"), r => Assert.True(((string)r[0]!).Length <= SourceLines.RawLimit + 80));
    }

    /// <summary>What a line should give, decided by the parser and the expander directly: null bad, 0 nothing, else the instance count.</summary>
    private static int? Oracle(byte[] bytes)
    {
        if (bytes.Length > 0 && bytes[^1] == '\r') bytes = bytes[..^1];
        string text;
        try
        {
            text = new UTF8Encoding(false, throwOnInvalidBytes: true).GetString(bytes);
        }
        catch (DecoderFallbackException)
        {
            return null;
        }
        var parsed = CatalogueParser.ParseLine(text, 1, FuzzLimits);
        if (!parsed.Success) return null;
        if (parsed.Value is not { } entry) return 0;
        var expansion = FamilyExpander.Expand(entry, FuzzLimits);
        return expansion.Success ? expansion.Instances.Count : null;
    }

    private static (byte[], Kind) Line(Random random, int i)
    {
        byte[] Text(string s) => Encoding.UTF8.GetBytes(s);
        var a = random.Next(1, 1000);
        var b = random.Next(1, 1000);
        var good = $"g{i}: (x + {a})*(y - {b}) = x*y - {b}*x + {a}*y - {(long)a * b}";
        return random.Next(12) switch
        {
            0 => (Text(good), Kind.Good),
            1 => (Text($"f{i}: x^n*x = x^(n+1) for n in 0..{random.Next(5)}"), Kind.Good),
            2 => (Text($"h{i}: x + {Digits(random, 3000)} = {Digits(random, 2000)} + x"), Kind.Good),
            3 => (Text($"d{i}: {new string('(', 50)}x{new string(')', 50)} = x"), Kind.Good),
            4 => (Text($"deep{i}: {new string('(', 700)}x{new string(')', 700)} = x"), Kind.Bad),
            5 => (InvalidUtf8(random, Text(good)), Kind.Bad),
            6 => (RandomBytes(random), Kind.Either),
            7 => (Text(good[..random.Next(good.Length)]), Kind.Either),
            8 => (Text($"long{i}: x = " + string.Join(" + ", Enumerable.Repeat("x", random.Next(2) == 0 ? 10_000 : 40_000))), Kind.Bad),
            9 => (Text(random.Next(2) == 0 ? "   " : $"# comment {i}"), Kind.Skip),
            10 => (Text($"wide{i}: x^n = x^n for n in 0..10^{random.Next(5, 40)}"), Kind.Bad),
            _ => (Text($"broken{i}: " + good[(good.IndexOf(':') + 1)..].Replace("=", random.Next(2) == 0 ? "==" : "")), Kind.Bad),
        };
    }

    private static string Digits(Random random, int count) =>
        string.Concat(Enumerable.Range(0, count).Select(k => (char)('0' + (k == 0 ? random.Next(1, 10) : random.Next(10)))));

    private static byte[] InvalidUtf8(Random random, byte[] text)
    {
        byte[][] invalid = [[0xFF], [0xC3, 0x28], [0xC0, 0xAF], [0xED, 0xA0, 0x80], [0xF8, 0x88, 0x80, 0x80, 0x80], [0xE2, 0x82]];
        var at = random.Next(text.Length + 1);
        return [.. text[..at], .. invalid[random.Next(invalid.Length)], .. text[at..]];
    }

    private static byte[] RandomBytes(Random random)
    {
        var bytes = new byte[random.Next(1, 200)];
        random.NextBytes(bytes);
        for (var k = 0; k < bytes.Length; k++) if (bytes[k] == '\n') bytes[k] = (byte)'?';
        return bytes;
    }
}
