using System.Text;
using IdentityQueue.Store.Import;

namespace IdentityQueue.Store.Tests.Import;

/// <summary>Issue #13, point 10: duplicate labels, extra CSV columns, and files that are not catalogues at all.</summary>
public sealed class CatalogueHygieneTests
{
    [Fact]
    public void DuplicateLabel_IsARejectionNamingBothLines_AndTheFirstEntryStays()
    {
        using var store = TempStore.Create();
        var summary = store.Import(store.File("c.idq", "sq: (x+1)^2 = x^2 + 2*x + 1\nother: x = x\n\nsq: (x-1)^2 = x^2 - 2*x + 1\nfam: x^n = x^n for n in 1..2\nfam: y = y\n"));
        Assert.Equal(3, summary.Entries);
        Assert.Equal(2, summary.Rejections);
        var rejections = store.Rows("SELECT line, reason FROM rejection ORDER BY line");
        Assert.Equal([4L, "line 4: the label 'sq' is already used on line 1; labels must be unique in a catalogue"], rejections[0]);
        Assert.Equal([6L, "line 6: the label 'fam' is already used on line 5; labels must be unique in a catalogue"], rejections[1]);
        Assert.Equal("(x+1)^2", store.Scalar("SELECT lhs FROM candidate WHERE label = 'sq'"));
    }

    [Fact]
    public void SameLabel_InTwoCatalogues_IsFine()
    {
        using var store = TempStore.Create();
        store.Import(store.File("a.idq", "sq: x = x\n"));
        Assert.Equal(0, store.Import(store.File("b.idq", "sq: y = y\n")).Rejections);
    }

    [Fact]
    public void UnknownCsvColumn_IsIgnoredWithOneWarning_AndEveryRowImports()
    {
        using var store = TempStore.Create();
        var summary = store.Import(store.File("c.csv", "label,source,lhs,rhs,note\na,Knuth 1.2.6,(x+1)^2,x^2 + 2*x + 1,binomial\nb,,x,x,\n"));
        Assert.Equal(2, summary.Instances);
        Assert.Equal(0, summary.Rejections);
        var warning = Assert.Single(summary.Warnings);
        Assert.Equal("line 1: the header's columns \"source\", \"note\" are not one of label, lhs, rhs, identity, over, for and are ignored in every row", warning);
        Assert.Equal("x^2 + 2*x + 1", store.Scalar("SELECT rhs FROM candidate WHERE label = 'a'"));
    }

    [Theory]
    [InlineData("empty.idq", new byte[0], "the file is empty; nothing was imported")]
    [InlineData("binary.idq", new byte[] { 0x7F, 0x45, 0x4C, 0x46, 0x02, 0x01, 0x00, 0x00 }, "the file is not text (byte 7 is NUL); a catalogue is UTF-8 text, one entry per line; nothing was imported")]
    [InlineData("wide.csv", new byte[] { 0xFF, 0xFE, (byte)'x', 0, (byte)' ', 0, (byte)'=', 0 }, "the file is UTF-16 text; a catalogue is UTF-8 text (convert it, e.g. iconv -f UTF-16 -t UTF-8); nothing was imported")]
    public void EmptyOrNonTextFile_CreatesNoCatalogue_AndSaysWhy(string name, byte[] bytes, string reason)
    {
        using var store = TempStore.Create();
        var path = store.File(name, bytes);
        var result = new CatalogueImporter(store.Connection).Import(path);
        Assert.False(result.Success);
        Assert.Equal($"{path}: {reason}", result.Error?.Message);
        Assert.Equal(0, store.Count("SELECT COUNT(*) FROM catalogue"));
    }

    [Theory]
    [InlineData("blank.idq", "\n  \n# only a comment\n")]
    [InlineData("header.csv", "label,lhs,rhs\n")]
    [InlineData("blank.jsonl", "\n\n")]
    public void FileWithNoEntries_CreatesNoCatalogue_AndSaysWhy(string name, string text)
    {
        using var store = TempStore.Create();
        var path = store.File(name, Encoding.UTF8.GetBytes(text));
        var result = new CatalogueImporter(store.Connection).Import(path);
        Assert.False(result.Success);
        Assert.StartsWith($"{path}: the file has no entries (", result.Error?.Message);
        Assert.EndsWith("all blank, comments or a header); nothing was imported", result.Error?.Message);
        Assert.Equal(0, store.Count("SELECT COUNT(*) FROM catalogue"));
    }
}
