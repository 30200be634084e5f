using IdentityQueue.Screening.Catalogues;
using IdentityQueue.Store.Import;

namespace IdentityQueue.Store.Tests.Import;

public sealed class CatalogueImporterTests
{
    // The catalogue of the project's contract check (shared/contract/check-contract.sh), in each format.
    private const string Idq = """
        # identities to screen
        two-squares: (a^2+b^2)*(c^2+d^2) = (a*c-b*d)^2 + (a*d+b*c)^2
        wrong: (x+y)^2 = x^2 + y^2
        binomial: sum(k in 0..n: binom(n,k)) = 2^n for n in 0..5
        broken: (x+1 = x
        """;

    private const string Jsonl = """
        {"label": "two-squares", "lhs": "(a^2+b^2)*(c^2+d^2)", "rhs": "(a*c-b*d)^2 + (a*d+b*c)^2"}
        {"label": "wrong", "identity": "(x+y)^2 = x^2 + y^2", "over": "Q"}
        {"label": "binomial", "lhs": "sum(k in 0..n: binom(n,k))", "rhs": "2^n", "for": {"n": [0, 5]}}
        {"label": "broken", "lhs": "(x+1", "rhs": "x"}
        """;

    private const string Csv = """
        label,lhs,rhs,over,for
        two-squares,(a^2+b^2)*(c^2+d^2),(a*c-b*d)^2 + (a*d+b*c)^2,,
        wrong,(x+y)^2,x^2 + y^2,Q,
        binomial,"sum(k in 0..n: binom(n,k))",2^n,,n in 0..5
        broken,(x+1,x,,
        """;

    public static TheoryData<string, string, int> Formats => new()
    {
        { "c.idq", Idq, 5 },
        { "c.jsonl", Jsonl, 4 },
        { "c.csv", Csv, 5 },
    };

    // over GF(p) for p prime in A..B: each instance stores its own field; a p that is not prime rejects the line.
    [Theory]
    [InlineData("c.idq", "wilson: fact(p-1) = -1 over GF(p) for p prime in 2..12\nbad: x = x over GF(p) for p in 2..4\n")]
    [InlineData("c.csv", "label,lhs,rhs,over,for\nwilson,fact(p-1),-1,GF(p),p prime in 2..12\nbad,x,x,GF(p),p in 2..4\n")]
    public void PrimeFamily_StoresEachInstancesOwnField(string name, string text)
    {
        using var store = TempStore.Create();
        var summary = store.Import(store.File(name, text));
        Assert.Equal(5, summary.Instances);
        Assert.Equal(1, summary.Rejections);
        var fields = store.Rows("SELECT label, field FROM candidate ORDER BY id").Select(r => ((string)r[0]!, (string)r[1]!));
        Assert.Equal([("wilson[p=2]", "GF(2)"), ("wilson[p=3]", "GF(3)"), ("wilson[p=5]", "GF(5)"), ("wilson[p=7]", "GF(7)"), ("wilson[p=11]", "GF(11)")], fields);
        var reason = (string)store.Rows("SELECT reason FROM rejection").Single()[0]!;
        Assert.Contains("GF(p) needs a prime p, but p = 4", reason);
    }

    [Theory]
    [MemberData(nameof(Formats))]
    public void Import_StoresLabelledEntries_FamilyInstances_AndTheRejection(string name, string text, int brokenLine)
    {
        using var store = TempStore.Create();
        var summary = store.Import(store.File(name, text));

        Assert.Equal(3, summary.Entries);
        Assert.Equal(8, summary.Instances);
        Assert.Equal(1, summary.Rejections);
        Assert.Equal("c", summary.Catalogue);

        var plain = store.Rows("SELECT label, family, params, lhs, rhs, field FROM candidate WHERE family IS NULL ORDER BY id");
        // Each side is stored as written (the column where it starts in an .idq line is stored beside it).
        Assert.Equal(["two-squares", null, null, "(a^2+b^2)*(c^2+d^2)", "(a*c-b*d)^2 + (a*d+b*c)^2", "Q"], plain[0]);
        Assert.Equal(["wrong", null, null, "(x+y)^2", "x^2 + y^2", "Q"], plain[1]);

        var family = store.Rows("SELECT label, params, lhs, rhs FROM candidate WHERE family = 'binomial' ORDER BY id");
        Assert.Equal(6, family.Count);
        Assert.Equal(Enumerable.Range(0, 6).Select(n => $"binomial[n={n}]"), family.Select(r => (string)r[0]!));
        Assert.Equal(Enumerable.Range(0, 6).Select(n => $"{{\"n\":{n}}}"), family.Select(r => (string)r[1]!));
        Assert.All(family, r => Assert.Equal("sum(k in 0..n: binom(n,k))", r[2]));

        var rejection = Assert.Single(store.Rows("SELECT source, line, raw, reason FROM rejection"));
        Assert.Equal(Path.Combine(store.Folder, name), rejection[0]);
        Assert.Equal((long)brokenLine, rejection[1]);
        Assert.Contains("(x+1", (string)rejection[2]!);
        // The reason names the line and a column, and what is wrong.
        Assert.Matches($@"^line {brokenLine}, column \d+( of ""\w+"")?: expected '\)'", (string)rejection[3]!);

        Assert.Equal(8, store.Count("SELECT COUNT(*) FROM result WHERE state = 'pending'"));
        Assert.Equal([3L, 8L, 1L], store.Rows("SELECT entries, instances, rejections FROM catalogue")[0]);
    }

    [Fact]
    public void Idq_Definitions_AreWrittenOutPerFile_AndOtherFormatsRefuseThem()
    {
        using var store = TempStore.Create();
        var summary = store.Import(store.File("d.idq", """
            let sq(t) = t^2
            let s(m) = sum(i in 1..m: sq(x[i]))
            norm: s(n) = sum(i in 1..n: x[i]*x[i]) for n in 1..2
            bad: sq(1, 2) = 1
            """));
        Assert.Equal(1, summary.Entries);
        Assert.Equal(2, summary.Instances);
        Assert.Equal("line 4, column 6: 'sq' (defined on line 1) takes 1 argument, got 2", store.Scalar("SELECT reason FROM rejection"));
        // The stored side is the written-out expression: the worker parses it without the definitions.
        Assert.Equal("sum(i in 1..n: x[i]^2)", store.Scalar("SELECT DISTINCT lhs FROM candidate"));

        // Another file of the same import run does not see d.idq's definitions; a .jsonl field cannot define.
        var other = store.Import(store.File("e.idq", "uses: sq(y) = y*y\n"));
        Assert.Equal(1, other.Rejections);
        var jsonl = store.Import(store.File("f.jsonl", """{"label": "def", "lhs": "let f(t) = t", "rhs": "0"}""" + "\n"));
        Assert.Equal(1, jsonl.Rejections);
    }

    [Fact]
    public void Idq_RejectionReason_IsTheParsersDiagnostic()
    {
        using var store = TempStore.Create();
        store.Import(store.File("c.idq", Idq));
        Assert.Equal("line 5, column 14: expected ')' to close '(' at column 9, found '='", store.Scalar("SELECT reason FROM rejection"));
    }

    [Fact]
    public void Jsonl_RejectionReason_NamesTheFieldAndTheColumnInIt()
    {
        using var store = TempStore.Create();
        store.Import(store.File("c.jsonl", Jsonl));
        Assert.Equal("line 4, column 5 of \"lhs\": expected ')' to close '(' at column 1, found end of line",
            store.Scalar("SELECT reason FROM rejection"));
    }

    [Fact]
    public void UnlabelledLines_AreLabelledByFileAndLine()
    {
        using var store = TempStore.Create();
        store.Import(store.File("misc.idq", "x + y = y + x\n\nx^n = x^n for n in 1..2\n"));
        var rows = store.Rows("SELECT label, family, position FROM candidate ORDER BY id");
        Assert.Equal(["misc.idq:1", null, 1L], rows[0]);
        Assert.Equal(["misc.idq:3[n=1]", "misc.idq:3", 3L], rows[1]);
        Assert.Equal(["misc.idq:3[n=2]", "misc.idq:3", 3L], rows[2]);
    }

    [Fact]
    public void FamilyWithTwoParameters_KeepsTheLineOrderInLabelAndParams()
    {
        using var store = TempStore.Create();
        store.Import(store.File("c.idq", "pascal: binom(n,k) = binom(n-1,k-1) + binom(n-1,k) for n in 1..3, k in 0..n\n"));
        var rows = store.Rows("SELECT label, params FROM candidate ORDER BY id");
        Assert.Equal(9, rows.Count);
        Assert.Equal(["pascal[n=1,k=0]", "{\"n\":1,\"k\":0}"], rows[0]);
        Assert.Equal(["pascal[n=3,k=3]", "{\"n\":3,\"k\":3}"], rows[^1]);
    }

    [Fact]
    public void Fields_AreStoredInCanonicalText()
    {
        using var store = TempStore.Create();
        store.Import(store.File("c.idq", "a: (x+y)^7 = x^7 + y^7 over GF(7)\nb: x*y = y*x over GF( 2 ^ 8 )\nc: x = x over Q\n"));
        Assert.Equal(["GF(7)", "GF(2^8)", "Q"], store.Rows("SELECT field FROM candidate ORDER BY id").Select(r => (string)r[0]!));
    }

    [Fact]
    public void ExpansionErrors_AreRejections()
    {
        using var store = TempStore.Create();
        var summary = store.Import(store.File("c.idq", "empty: x^n = x for n in 3..1\nhuge: x^n = x for n in 0..10^30\nok: x = x\n"));
        Assert.Equal(1, summary.Instances);
        var reasons = store.Rows("SELECT line, reason FROM rejection ORDER BY line");
        Assert.Equal(1L, reasons[0][0]);
        Assert.Contains("no instances", (string)reasons[0][1]!);
        Assert.Equal(2L, reasons[1][0]);
        Assert.Contains("MaxFamilySize", (string)reasons[1][1]!);
    }

    [Fact]
    public void ImportingANameTwice_IsRefused_AndStoresNothing()
    {
        using var store = TempStore.Create();
        var path = store.File("c.idq", Idq);
        store.Import(path);
        var again = new CatalogueImporter(store.Connection).Import(path);
        Assert.False(again.Success);
        Assert.Contains("already has a catalogue named 'c'", again.Error?.Message);
        Assert.Contains("--catalogue", again.Error?.Message);
        Assert.Equal(1, store.Count("SELECT COUNT(*) FROM catalogue"));
        Assert.Equal(8, store.Count("SELECT COUNT(*) FROM candidate"));
    }

    [Fact]
    public void ImportingUnderAnotherName_IsAllowed()
    {
        using var store = TempStore.Create();
        var path = store.File("c.idq", Idq);
        store.Import(path);
        var second = store.Import(path, new ImportOptions { CatalogueName = "c-again" });
        Assert.Equal("c-again", second.Catalogue);
        Assert.Equal(16, store.Count("SELECT COUNT(*) FROM candidate"));
    }

    [Fact]
    public void Seed_IsStored_GivenOrRandom()
    {
        using var store = TempStore.Create();
        var given = store.Import(store.File("a.idq", "x = x\n"), new ImportOptions { Seed = 42 });
        Assert.Equal(42, given.Seed);
        var random = store.Import(store.File("b.idq", "x = x\n"));
        Assert.InRange(random.Seed, 0, long.MaxValue);
        Assert.Equal([42L, random.Seed], store.Rows("SELECT seed FROM catalogue ORDER BY id").Select(r => (long)r[0]!));
    }

    [Theory]
    [InlineData("missing.idq", "no such file")]
    [InlineData("c.txt", "unknown catalogue format")]
    public void Import_RefusesAMissingFileOrAnUnknownFormat(string name, string message)
    {
        using var store = TempStore.Create();
        if (name.EndsWith(".txt", StringComparison.Ordinal)) store.File(name, "x = x\n");
        var result = new CatalogueImporter(store.Connection).Import(Path.Combine(store.Folder, name));
        Assert.False(result.Success);
        Assert.Contains(message, result.Error?.Message);
        Assert.Equal(0, store.Count("SELECT COUNT(*) FROM catalogue"));
    }

    [Fact]
    public void Summary_ListsTheFirstRejectionsOnly_ButStoresAll()
    {
        using var store = TempStore.Create();
        var summary = store.Import(store.File("c.idq", string.Concat(Enumerable.Range(0, 12).Select(i => $"bad{i}: x +\n"))));
        Assert.Equal(12, summary.Rejections);
        Assert.Equal(5, summary.FirstRejections.Count);
        Assert.StartsWith(Path.Combine(store.Folder, "c.idq") + ":1: line 1, column", summary.FirstRejections[0].ToString());
        Assert.Equal(12, store.Count("SELECT COUNT(*) FROM rejection"));
    }

    [Fact]
    public void ByteOrderMark_AndCrLf_AreAccepted()
    {
        using var store = TempStore.Create();
        var summary = store.Import(store.File("c.idq", [0xEF, 0xBB, 0xBF, .. "a: x = x\r\nb: y = y\r\n"u8]));
        Assert.Equal(2, summary.Instances);
        Assert.Equal(["a", "b"], store.Rows("SELECT label FROM candidate ORDER BY id").Select(r => (string)r[0]!));
    }

    [Fact]
    public void InvalidUtf8_RejectsThatLineOnly()
    {
        using var store = TempStore.Create();
        var summary = store.Import(store.File("c.idq", [.. "a: x = x\n"u8, .. "b: x = \xFF\n"u8.ToArray().Take(7), 0xFF, (byte)'\n', .. "c: y = y\n"u8]));
        Assert.Equal(2, summary.Instances);
        var rejection = Assert.Single(store.Rows("SELECT line, reason, raw FROM rejection"));
        Assert.Equal(2L, rejection[0]);
        Assert.Equal("line 2: the line is not valid UTF-8 (byte 8 of the line)", rejection[1]);
        Assert.Equal("b: x = \uFFFD", rejection[2]);
    }

    [Fact]
    public void OverlongLine_IsRejected_WithItsRawTextTruncated()
    {
        using var store = TempStore.Create();
        var limits = Algebra.Limits.Default with { MaxLineLength = 5_000 };
        var longLine = "long: x = " + string.Join(" + ", Enumerable.Repeat("x", 20_000));
        var summary = store.Import(store.File("c.idq", $"a: x = x\n{longLine}\nb: y = y\n"), new ImportOptions { Limits = limits });
        Assert.Equal(2, summary.Instances);
        var rejection = Assert.Single(store.Rows("SELECT line, reason, raw FROM rejection"));
        Assert.Equal(2L, rejection[0]);
        Assert.Contains("MaxLineLength", (string)rejection[1]!);
        var raw = (string)rejection[2]!;
        Assert.StartsWith("long: x = x + x", raw);
        Assert.Contains("[truncated; the line has", raw);
        Assert.True(raw.Length < SourceLines.RawLimit + 100);
    }

    [Theory]
    [InlineData("{\"label\": \"a\", \"lhs\": \"x\"}", "\"rhs\" is missing")]
    [InlineData("{\"label\": \"a\", \"lhs\": \"x\", \"rsh\": \"x\"}", "unknown key \"rsh\"")]
    [InlineData("{\"label\": \"a\", \"lhs\": \"x\", \"rhs\": \"x\", \"lhs\": \"y\"}", "given twice")]
    [InlineData("{\"label\": \"a\", \"lhs\": 1, \"rhs\": \"x\"}", "\"lhs\" must be a string")]
    [InlineData("{\"label\": \"a b\", \"lhs\": \"x\", \"rhs\": \"x\"}", "the label \"a b\"")]
    [InlineData("{\"lhs\": \"x\", \"rhs\": \"x # y\"}", "'#' is not allowed")]
    [InlineData("{\"lhs\": \"x\", \"rhs\": \"x over GF(7)\"}", "goes in \"over\"")]
    [InlineData("{\"lhs\": \"x^n\", \"rhs\": \"x^n\", \"for\": {\"n\": [1, \"2, k in 0..1\"]}}", "must be one expression")]
    [InlineData("{\"lhs\": \"x\", \"rhs\": \"x\", \"identity\": \"x = x\"}", "not both")]
    [InlineData("[1, 2]", "expected a JSON object")]
    [InlineData("{\"label\": \"a\", ", "not valid JSON")]
    [InlineData("{\"lhs\": \"x^n\", \"rhs\": \"x\", \"for\": {\"n\": [1]}}", "must be a range [FROM, TO]")]
    public void Jsonl_BadObjects_AreRejectedWithAReason(string line, string reason)
    {
        using var store = TempStore.Create();
        var summary = store.Import(store.File("c.jsonl", $"{{\"label\": \"ok\", \"lhs\": \"x\", \"rhs\": \"x\"}}\n{line}\n"));
        Assert.Equal(1, summary.Instances);
        var rejection = Assert.Single(store.Rows("SELECT line, reason FROM rejection"));
        Assert.Equal(2L, rejection[0]);
        Assert.Contains(reason, (string)rejection[1]!);
        Assert.StartsWith("line 2", (string)rejection[1]!);
    }

    [Fact]
    public void Jsonl_RangeEnds_MayBeExpressions_AndForMayBeText()
    {
        using var store = TempStore.Create();
        var summary = store.Import(store.File("c.jsonl", """
            {"label": "p", "lhs": "binom(n,k)", "rhs": "binom(n,n-k)", "for": {"n": [1, 3], "k": [0, "n"]}}
            {"label": "q", "lhs": "x^n", "rhs": "x^n", "for": "n in 1..4"}
            """));
        Assert.Equal(9 + 4, summary.Instances);
    }

    [Theory]
    [InlineData("a,\"x,x\n", "unterminated quoted field")]
    [InlineData("a,x,x,Q,,extra\n", "6 fields")]
    [InlineData("a,x,x,GF(4),\n", "column")]
    public void Csv_BadRows_AreRejectedWithAReason(string line, string reason)
    {
        using var store = TempStore.Create();
        var summary = store.Import(store.File("c.csv", "label,lhs,rhs,over,for\nok,x,x,,\n" + line));
        Assert.Equal(1, summary.Instances);
        var rejection = Assert.Single(store.Rows("SELECT line, reason FROM rejection"));
        Assert.Equal(3L, rejection[0]);
        Assert.Contains(reason, (string)rejection[1]!);
    }

    [Fact]
    public void Csv_HeaderMayReorderAndOmitColumns_AndUseIdentity()
    {
        using var store = TempStore.Create();
        var summary = store.Import(store.File("c.csv", "identity,label\n\"x + y = y + x\",comm\n"));
        Assert.Equal(1, summary.Instances);
        Assert.Equal("comm", store.Scalar("SELECT label FROM candidate"));
    }

    [Fact]
    public void Csv_WithABadHeader_RejectsEveryRowAndSaysWhy()
    {
        using var store = TempStore.Create();
        var summary = store.Import(store.File("c.csv", "name,left,right\na,x,x\nb,y,y\n"));
        Assert.Equal(0, summary.Instances);
        Assert.Equal(3, summary.Rejections);
        var reasons = store.Rows("SELECT reason FROM rejection ORDER BY line").Select(r => (string)r[0]!).ToList();
        Assert.Contains("the header must name the columns lhs and rhs", reasons[0]);
        Assert.All(reasons.Skip(1), r => Assert.Contains("header on line 1 is not valid", r));
    }

    [Fact]
    public void AnImportThatFailsInTheDatabase_LeavesNoCatalogueBehind()
    {
        using var store = TempStore.Create();
        store.Execute("CREATE TRIGGER refuse BEFORE INSERT ON candidate WHEN NEW.label = 'boom' BEGIN SELECT RAISE(ABORT, 'boom'); END");
        var path = store.File("c.idq", string.Concat(Enumerable.Range(0, 50).Select(i => $"a{i}: x = x\n")) + "boom: x = x\n");
        Assert.ThrowsAny<System.Data.Common.DbException>(() => new CatalogueImporter(store.Connection).Import(path, new ImportOptions { BatchSize = 10 }));
        Assert.Equal(0, store.Count("SELECT COUNT(*) FROM catalogue"));
        Assert.Equal(0, store.Count("SELECT COUNT(*) FROM candidate"));
        store.Execute("DROP TRIGGER refuse");
        Assert.Equal(51, store.Import(path).Instances);
    }
}
