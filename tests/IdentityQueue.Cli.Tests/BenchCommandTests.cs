using System.Text.Json;

namespace IdentityQueue.Cli.Tests;

/// <summary><c>idq bench</c> run in-process with the hidden <c>--quick</c> option (few repetitions): keys, types, exit code.</summary>
public class BenchCommandTests
{
    private static (int Code, string Out, string Err) Run(params string[] args)
    {
        var output = new StringWriter();
        var error = new StringWriter();
        var code = CliApp.Run(args, output, error);
        return (code, output.ToString(), error.ToString());
    }

    [Fact]
    public void Json_HasTheReferenceKeysAndTheExtras()
    {
        var (code, output, error) = Run("bench", "--json", "--quick");
        Assert.True(code == 0, error);
        var j = JsonDocument.Parse(output).RootElement;
        // the keys of the C reference kernels, under the same names
        foreach (var key in new[] { "slp62_ops_per_s", "slp31_ops_per_s", "det100_ms" })
            Assert.True(j.GetProperty(key).GetDouble() > 0, key);
        foreach (var key in new[] { "det20_ms", "det200_ms", "perm20_ms", "candidates_per_s" })
            Assert.True(j.GetProperty(key).GetDouble() > 0, key);
        Assert.Equal(64, j.GetProperty("block_size").GetInt32());
        Assert.Contains("62-bit", j.GetProperty("kernel62").GetString());
        Assert.Contains("31-bit", j.GetProperty("kernel31").GetString());
        var cpu = j.GetProperty("cpu");
        Assert.Equal(JsonValueKind.String, cpu.GetProperty("architecture").ValueKind);
        foreach (var flag in new[] { "avx2", "avx512f", "bmi2" })
            Assert.True(cpu.GetProperty(flag).ValueKind is JsonValueKind.True or JsonValueKind.False, flag);
        Assert.Contains(".NET", j.GetProperty("dotnet").GetString());
        Assert.True(j.GetProperty("quick").GetBoolean());
    }

    [Fact]
    public void Text_IsATableWithAnEstimate()
    {
        var (code, output, _) = Run("bench", "--quick");
        Assert.Equal(0, code);
        Assert.Contains("multiply-adds/s", output);
        Assert.Contains("determinant 100×100", output);
        Assert.Contains("candidates per second", output);
    }
}
