using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Algebra.Tests.Fields;

/// <summary>
/// The Schwartz–Zippel bound checked exhaustively over small prime fields: a nonzero polynomial of total degree d in
/// n variables over GF(p) has at most d·p^(n−1) zeros in GF(p)^n (J. T. Schwartz, J. ACM 27 (1980) 701–717;
/// R. Zippel, EUROSAM 1979, LNCS 72, 216–226; R. A. DeMillo and R. J. Lipton, Inf. Process. Lett. 7 (1978) 193–195).
/// </summary>
public class SchwartzZippelTests
{
    private const int MaxDegree = 4;

    /// <summary>A dense polynomial in n variables of total degree ≤ 4: coefficient of x^e at index Σ e_i·5^i.</summary>
    private sealed class Dense
    {
        public readonly int Variables;
        public readonly SmallResidue[] Coefficients;

        public Dense(int variables)
        {
            Variables = variables;
            Coefficients = new SmallResidue[Pow(MaxDegree + 1, variables)];
        }

        public static int Pow(int b, int e) => e == 0 ? 1 : b * Pow(b, e - 1);

        public static int Exponent(int index, int variable) => index / Pow(MaxDegree + 1, variable) % (MaxDegree + 1);

        public int TotalDegreeOfMonomial(int index)
        {
            var total = 0;
            for (var v = 0; v < Variables; v++) total += Exponent(index, v);
            return total;
        }

        public int TotalDegree(SmallPrimeField f)
        {
            var degree = -1;
            for (var i = 0; i < Coefficients.Length; i++)
                if (!f.IsZero(Coefficients[i])) degree = Math.Max(degree, TotalDegreeOfMonomial(i));
            return degree;
        }

        public static Dense Constant(SmallPrimeField f, int variables, long c)
        {
            var result = new Dense(variables);
            result.Coefficients[0] = f.FromInteger(c);
            return result;
        }

        /// <summary>x_v − c.</summary>
        public static Dense VariableMinus(SmallPrimeField f, int variables, int v, long c)
        {
            var result = Constant(f, variables, -c);
            result.Coefficients[Pow(MaxDegree + 1, v)] = f.One;
            return result;
        }

        public static Dense Variable(SmallPrimeField f, int variables, int v) => VariableMinus(f, variables, v, 0);

        public Dense Times(SmallPrimeField f, Dense other)
        {
            var result = new Dense(Variables);
            for (var i = 0; i < Coefficients.Length; i++)
            {
                if (f.IsZero(Coefficients[i])) continue;
                for (var j = 0; j < other.Coefficients.Length; j++)
                {
                    if (f.IsZero(other.Coefficients[j])) continue;
                    var index = 0;
                    for (var v = 0; v < Variables; v++)
                    {
                        var e = Exponent(i, v) + Exponent(j, v);
                        Assert.True(e <= MaxDegree);
                        index += e * Pow(MaxDegree + 1, v);
                    }
                    Assert.True(TotalDegreeOfMonomial(index) <= MaxDegree);
                    result.Coefficients[index] = f.MultiplyAdd(Coefficients[i], other.Coefficients[j], result.Coefficients[index]);
                }
            }
            return result;
        }

        public Dense Minus(SmallPrimeField f, Dense other)
        {
            var result = new Dense(Variables);
            for (var i = 0; i < Coefficients.Length; i++) result.Coefficients[i] = f.Subtract(Coefficients[i], other.Coefficients[i]);
            return result;
        }

        /// <summary>Zeros in GF(p)^n, by evaluating at every point.</summary>
        public long CountZeros(SmallPrimeField f)
        {
            var p = (int)f.Modulus;
            var points = Pow(p, Variables);
            var terms = Enumerable.Range(0, Coefficients.Length).Where(i => !f.IsZero(Coefficients[i])).ToArray();
            var powers = new SmallResidue[Variables, MaxDegree + 1];
            long zeros = 0;
            for (var point = 0; point < points; point++)
            {
                for (var v = 0; v < Variables; v++)
                {
                    var x = f.FromInteger(point / Pow(p, v) % p);
                    powers[v, 0] = f.One;
                    for (var e = 1; e <= MaxDegree; e++) powers[v, e] = f.Multiply(powers[v, e - 1], x);
                }
                var value = f.Zero;
                foreach (var t in terms)
                {
                    var monomial = Coefficients[t];
                    for (var v = 0; v < Variables; v++) monomial = f.Multiply(monomial, powers[v, Exponent(t, v)]);
                    value = f.Add(value, monomial);
                }
                if (f.IsZero(value)) zeros++;
            }
            return zeros;
        }
    }

    /// <summary>Dense random: every monomial of total degree ≤ d gets a uniform coefficient, each kept with probability density.</summary>
    private static Dense RandomDense(SmallPrimeField f, int variables, int degree, double density, ref Xoshiro256 random)
    {
        var result = new Dense(variables);
        for (var i = 0; i < result.Coefficients.Length; i++)
            if (result.TotalDegreeOfMonomial(i) <= degree && random.NextUInt64() < density * ulong.MaxValue)
                result.Coefficients[i] = f.Sample(ref random);
        return result;
    }

    /// <summary>A product of d random affine forms: such polynomials have many zeros, close to the bound.</summary>
    private static Dense RandomProductOfLinearForms(SmallPrimeField f, int variables, int degree, ref Xoshiro256 random)
    {
        var result = Dense.Constant(f, variables, 1);
        for (var k = 0; k < degree; k++)
        {
            var form = new Dense(variables);
            form.Coefficients[0] = f.Sample(ref random);
            // only the first variable, or all of them: the first kind attains d·p^(n−1) when the roots are distinct
            var all = random.NextBelow(2UL) == 0;
            for (var v = 0; v < (all ? variables : 1); v++) form.Coefficients[Dense.Pow(MaxDegree + 1, v)] = f.Sample(ref random);
            result = result.Times(f, form);
        }
        return result;
    }

    public static TheoryData<ulong, int> Cases()
    {
        var data = new TheoryData<ulong, int>();
        foreach (var p in new ulong[] { 2, 3, 5, 7, 11, 13 })
            foreach (var n in new[] { 2, 3 })
                data.Add(p, n);
        return data;
    }

    [Theory]
    [MemberData(nameof(Cases))]
    public void NonzeroPolynomialsNeverHaveMoreZerosThanTheBound(ulong p, int n)
    {
        var f = SmallPrimeField.Create(p);
        var random = new Xoshiro256(p * 10 + (ulong)n);
        var checkedPolynomials = 0;
        var attained = false;
        for (var trial = 0; checkedPolynomials < 60; trial++)
        {
            Assert.True(trial < 1000, "too many zero polynomials drawn");
            var requested = trial % (MaxDegree + 1);
            var polynomial = ((trial / (MaxDegree + 1)) % 3) switch
            {
                0 => RandomDense(f, n, requested, 1.0, ref random),
                1 => RandomDense(f, n, requested, 0.3, ref random),
                _ => RandomProductOfLinearForms(f, n, requested, ref random),
            };
            var d = polynomial.TotalDegree(f);
            if (d < 0) continue; // the zero polynomial: the bound does not apply
            var zeros = polynomial.CountZeros(f);
            var bound = d * (long)Math.Pow(p, n - 1);
            Assert.True(zeros <= bound, $"degree {d} polynomial has {zeros} zeros over GF({p})^{n}, bound {bound}");
            if (d > 0 && zeros == bound) attained = true;
            checkedPolynomials++;
        }
        // every nonconstant affine polynomial has exactly p^(n−1) zeros (common practice), so degree 1 attains the bound
        Assert.True(attained, "no polynomial attained the bound");
    }

    [Theory]
    [InlineData(5UL)]
    [InlineData(7UL)]
    [InlineData(11UL)]
    [InlineData(13UL)]
    public void ProductOfThreeDistinctLinearFactorsAttainsTheBound(ulong p)
    {
        // (x1 − 1)(x1 − 2)(x1 − 3) vanishes exactly where x1 ∈ {1, 2, 3}: 3p points of GF(p)^2 = d·p^(n−1).
        var f = SmallPrimeField.Create(p);
        var polynomial = Dense.VariableMinus(f, 2, 0, 1).Times(f, Dense.VariableMinus(f, 2, 0, 2)).Times(f, Dense.VariableMinus(f, 2, 0, 3));
        Assert.Equal(3, polynomial.TotalDegree(f));
        Assert.Equal(3 * (long)p, polynomial.CountZeros(f));
    }

    [Fact]
    public void DeterminantOfATwoByTwoMatrixHasTheCountOfSingularMatricesAsZeros()
    {
        // a·d − b·c over GF(5)^4: the singular 2×2 matrices, q^4 − |GL_2(F_q)| = q^4 − (q^2 − 1)(q^2 − q) = q^3 + q^2 − q
        // (the order of GL_n(F_q); common practice), so 145 for q = 5, within the bound 2·5^3 = 250.
        var f = SmallPrimeField.Create(5);
        var det = Dense.Variable(f, 4, 0).Times(f, Dense.Variable(f, 4, 3)).Minus(f, Dense.Variable(f, 4, 1).Times(f, Dense.Variable(f, 4, 2)));
        Assert.Equal(2, det.TotalDegree(f));
        Assert.Equal(145, det.CountZeros(f));
        Assert.Equal(125 + 25 - 5, 145);
    }
}
