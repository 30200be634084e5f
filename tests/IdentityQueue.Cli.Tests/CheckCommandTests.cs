using System.Text.Json;

namespace IdentityQueue.Cli.Tests;

/// <summary><c>idq check</c> run in-process: the JSON keys and exit codes of the product contract (SPEC §2).</summary>
public class CheckCommandTests
{
    private static (int Code, string Out, string Err) Run(params string[] args)
    {
        var output = new StringWriter();
        var error = new StringWriter();
        var code = CliApp.Run(args, output, error);
        return (code, output.ToString(), error.ToString());
    }

    private static JsonElement Json(string text) => JsonDocument.Parse(text).RootElement;

    [Fact]
    public void TrueIdentity_ExitsZeroWithTheContractKeys()
    {
        var (code, output, _) = Run("check", "(a^2+b^2)*(c^2+d^2) = (a*c-b*d)^2 + (a*d+b*c)^2", "--json", "--seed", "1");
        Assert.Equal(0, code);
        var j = Json(output);
        Assert.Equal("survived", j.GetProperty("verdict").GetString());
        Assert.Equal(4, j.GetProperty("degreeBound").GetInt32());
        Assert.True(j.GetProperty("errorBoundLog2").GetDouble() <= -64);
        Assert.True(j.GetProperty("trials").GetInt32() >= 2);
        Assert.Equal(JsonValueKind.Null, j.GetProperty("witness").ValueKind);
        Assert.Equal(JsonValueKind.Null, j.GetProperty("message").ValueKind);
    }

    [Fact]
    public void FalseIdentity_ExitsOneWithAWitness()
    {
        var (code, output, _) = Run("check", "(x+y)^2 = x^2 + y^2", "--json", "--seed", "1");
        Assert.Equal(1, code);
        var j = Json(output);
        Assert.Equal("refuted", j.GetProperty("verdict").GetString());
        Assert.Equal(JsonValueKind.Null, j.GetProperty("errorBoundLog2").ValueKind);
        var w = j.GetProperty("witness");
        var p = System.Numerics.BigInteger.Parse(w.GetProperty("modulus").GetString()!);
        var x = System.Numerics.BigInteger.Parse(w.GetProperty("point").GetProperty("x").GetString()!);
        var y = System.Numerics.BigInteger.Parse(w.GetProperty("point").GetProperty("y").GetString()!);
        var difference = System.Numerics.BigInteger.Parse(w.GetProperty("difference").GetString()!);
        // re-check by hand: (x+y)^2 − x^2 − y^2 = 2xy mod p
        Assert.Equal(2 * x * y % p, difference);
        Assert.True(w.GetProperty("certified").GetBoolean());
    }

    [Fact]
    public void IndexedNames_AreWrittenWithEvaluatedIndices()
    {
        var (_, output, _) = Run("check", "sum(i in 1..2: x[i])^2 = sum(i in 1..2: x[i]^2)", "--json", "--seed", "2");
        var point = Json(output).GetProperty("witness").GetProperty("point");
        Assert.True(point.TryGetProperty("x[1]", out _));
        Assert.True(point.TryGetProperty("x[2]", out _));
    }

    // Every invalid message goes to standard error with the side and the values; standard output only says "invalid".
    [Fact]
    public void InvalidInstances_ArePrintedOnStandardError()
    {
        var (code, output, error) = Run("check", "x = x + sum(j in 0..n: x^j/(j-1)) for n in 2..3", "--seed", "1");
        Assert.Equal(2, code);
        Assert.Contains("idq check: invalid: line 1, column 27, rhs, at n=2, j=1: division by zero", error);
        Assert.Contains("idq check: invalid: line 1, column 27, rhs, at n=3, j=1: division by zero", error);
        Assert.DoesNotContain("division by zero", output);
        // a screening-time invalid (a Pfaffian's argument that is not skew-symmetric) goes there too
        var pf = Run("check", "pf([[0, a], [b, 0]]) = a", "--seed", "1");
        Assert.Equal(2, pf.Code);
        Assert.Contains("idq check: invalid: pf's argument at line 1, column 4: entry [1,2] + entry [2,1] must be 0", pf.Err);
    }

    [Fact]
    public void MalformedInput_ExitsTwoWithThePosition()
    {
        var (code, output, _) = Run("check", "x + = y", "--json");
        Assert.Equal(2, code);
        var j = Json(output);
        Assert.Equal("invalid", j.GetProperty("verdict").GetString());
        Assert.Contains("column 5", j.GetProperty("message").GetString());
        var (textCode, _, err) = Run("check", "x + = y");
        Assert.Equal(2, textCode);
        Assert.Contains("column 5", err);
    }

    [Fact]
    public void Undecided_ExitsFour()
    {
        var (code, output, _) = Run("check", "1/(x-x) = 1", "--json", "--seed", "3");
        Assert.Equal(4, code);
        Assert.Equal("undecided", Json(output).GetProperty("verdict").GetString());
        Assert.Contains("denominator", Json(output).GetProperty("message").GetString());
    }

    [Fact]
    public void ExtensionFieldWitness_GivesTheDefiningPolynomialAndCoefficientLists()
    {
        var (code, output, _) = Run("check", "x^7 = x over GF(7)", "--json", "--seed", "4");
        Assert.Equal(1, code);
        var w = Json(output).GetProperty("witness");
        Assert.Equal("7", w.GetProperty("modulus").GetString());
        var m = w.GetProperty("extensionDegree").GetInt32();
        Assert.Equal(m + 1, w.GetProperty("definingPolynomial").GetArrayLength());
        Assert.Equal(m, w.GetProperty("point").GetProperty("x").GetArrayLength());
        Assert.Equal(m, w.GetProperty("difference").GetArrayLength());
    }

    [Fact]
    public void OverOption_OverridesTheField()
    {
        Assert.Equal(1, Run("check", "(x+y)^3 = x^3 + y^3", "--seed", "5").Code);
        Assert.Equal(0, Run("check", "(x+y)^3 = x^3 + y^3", "--over", "GF(3)", "--seed", "5").Code);
        Assert.Equal(2, Run("check", "(x+y)^3 = x^3 + y^3", "--over", "GF(4)").Code);
    }

    [Fact]
    public void Family_ReportsEveryInstance()
    {
        var (code, output, _) = Run("check", "sum(k in 0..n: binom(n,k)) = 2^n for n in 0..5", "--json", "--seed", "6");
        Assert.Equal(0, code);
        Assert.Equal(6, Json(output).GetProperty("instances").GetArrayLength());
        var (falseCode, falseOutput, _) = Run("check", "sum(k in 0..n: k) = n^2 for n in 0..4", "--json", "--seed", "6");
        Assert.Equal(1, falseCode);
        Assert.Equal("refuted", Json(falseOutput).GetProperty("verdict").GetString());
    }

    [Fact]
    public void SameSeed_GivesTheSameOutput()
    {
        var a = Run("check", "(x+y)^2 = x^2 + y^2", "--json", "--seed", "99").Out;
        var b = Run("check", "(x+y)^2 = x^2 + y^2", "--json", "--seed", "99").Out;
        Assert.Equal(Json(a).GetProperty("witness").GetProperty("modulus").GetString(), Json(b).GetProperty("witness").GetProperty("modulus").GetString());
    }

    [Fact]
    public void HumanOutput_SaysEvidenceNotProof()
    {
        var (code, output, _) = Run("check", "(x+1)^2 = x^2 + 2*x + 1", "--seed", "1");
        Assert.Equal(0, code);
        Assert.Contains("very likely true", output);
        Assert.Contains("evidence, not proof", output);
        Assert.Contains("degree bound   2", output);
    }

    [Fact]
    public void BadUsage_ExitsTwo()
    {
        Assert.Equal(2, Run("check").Code);
        Assert.Equal(2, Run("check", "x = x", "--target-bits", "0").Code);
        Assert.Equal(2, Run("nonsense-command").Code);
        Assert.Equal(0, Run("--help").Code);
        Assert.Equal(0, Run("check", "--help").Code);
    }
}
