using System.Globalization;
using System.Numerics;
using System.Runtime.CompilerServices;
using System.Text;

namespace IdentityQueue.Algebra.Syntax;

/// <summary>
/// Writes an <see cref="Expr"/> back in catalogue syntax with the fewest parentheses that keep its tree: parsing the
/// printed text gives a tree that prints the same. Style: spaces around '+', '-', '=' and after commas; none around
/// '*', '/', '^'; indices as <c>a[i,j]</c>.
/// Parentheses are written where a child binds looser than its place needs: the left operand of a left-associative
/// operator may have the same precedence, the right one must bind tighter (<c>a - (b - c)</c>, <c>a/(b*c)</c>);
/// the base of '^' must be an atom (<c>(-x)^2</c>, <c>(2^3)^2</c>) and its exponent may be a power or a negation
/// (<c>2^3^2</c>, <c>2^-1</c>); the operand of unary minus may be a power (<c>-x^2</c>).
/// </summary>
public sealed class ExprPrinter : IExprVisitor<StringBuilder>
{
    private readonly StringBuilder _output;

    public ExprPrinter(StringBuilder output) => _output = output;

    /// <summary>The catalogue text of an expression.</summary>
    public static string Print(Expr expr)
    {
        var output = new StringBuilder();
        expr.Accept(new ExprPrinter(output));
        return output.ToString();
    }

    /// <summary>The one-line identity of stored sides: <c>LHS = RHS</c>, then <c>over FIELD</c> unless the field is Q.</summary>
    public static string Line(string lhs, string rhs, string field) => field == "Q" ? $"{lhs} = {rhs}" : $"{lhs} = {rhs} over {field}";

    /// <summary>A stored side in the printer's spelling (<c>(x+1)^2</c> → <c>(x + 1)^2</c>); the text itself when it does not parse.</summary>
    public static string Canonical(string side)
    {
        var parsed = CatalogueParser.ParseExpression(side);
        return parsed.Success ? Print(parsed.Value) : side;
    }

    /// <summary>The catalogue line of an entry: <c>label: LHS = RHS over FIELD for n in A..B, …</c> (or <c>for n &gt;= A</c>; no <c>over</c> for Q).</summary>
    public static string Print(IdentityEntry entry)
    {
        var output = new StringBuilder();
        var printer = new ExprPrinter(output);
        if (entry.Label is not null) output.Append(entry.Label).Append(": ");
        entry.Left.Accept(printer);
        output.Append(" = ");
        entry.Right.Accept(printer);
        if (!entry.Field.IsRationals) output.Append(" over ").Append(entry.Field.ToString());
        for (var i = 0; i < entry.Parameters.Count; i++)
        {
            output.Append(i == 0 ? " for " : ", ");
            var range = entry.Parameters[i];
            if (range.OpenEnded)
            {
                output.Append(range.Name).Append(" >= ");
                range.From.Accept(printer);
            }
            else printer.WriteRange(range.PrimesOnly ? $"{range.Name} prime" : range.Name, range.From, range.To);
        }
        return output.ToString();
    }

    public StringBuilder VisitInteger(IntegerLiteral node)
    {
        DecimalText.Append(_output, node.Value);
        return _output;
    }

    public StringBuilder VisitName(NameRef node) => _output.Append(node.Name);

    public StringBuilder VisitIndexed(IndexedName node)
    {
        _output.Append(node.Name).Append('[');
        WriteList(node.Indices, ",");
        return _output.Append(']');
    }

    public StringBuilder VisitUnary(UnaryExpr node)
    {
        _output.Append('-');
        WriteOperand(node.Operand, Precedence.Unary);
        return _output;
    }

    public StringBuilder VisitSum(SumExpr node)
    {
        var terms = node.Terms;
        WriteOperand(terms[0].Value, PrecedenceTable.TermOperand(first: true));
        for (var i = 1; i < terms.Count; i++)
        {
            _output.Append(terms[i].Subtract ? " - " : " + ");
            WriteOperand(terms[i].Value, PrecedenceTable.TermOperand(first: false));
        }
        return _output;
    }

    public StringBuilder VisitProduct(ProductExpr node)
    {
        var factors = node.Factors;
        WriteOperand(factors[0].Value, PrecedenceTable.FactorOperand(first: true));
        for (var i = 1; i < factors.Count; i++)
        {
            _output.Append(factors[i].Divide ? '/' : '*');
            WriteOperand(factors[i].Value, PrecedenceTable.FactorOperand(first: false));
        }
        return _output;
    }

    public StringBuilder VisitBinary(BinaryExpr node)
    {
        if (Builtins.IsComparison(node.Operator))
        {
            // A condition of iverson/when: a comparison of two expressions, or comparisons joined by 'and' (binding tighter) and
            // 'or', left to right. The parser makes no other shape; a hand-built one gets parentheses.
            var (left, right) = PrecedenceTable.Operands(node.Operator);
            WriteOperand(node.Left, left);
            _output.Append(' ').Append(Builtins.Symbol(node.Operator)).Append(' ');
            WriteOperand(node.Right, right);
            return _output;
        }
        var (baseLevel, exponentLevel) = PrecedenceTable.Operands(BinaryOperator.Power);
        WriteOperand(node.Left, baseLevel);
        _output.Append('^');
        WriteOperand(node.Right, exponentLevel);
        return _output;
    }

    public StringBuilder VisitCall(CallExpr node)
    {
        switch (node.Function)
        {
            case Builtins.IndexList:
                _output.Append('[');
                WriteList(node.Arguments, ", ");
                return _output.Append(']');
            case Builtins.Range:
                Write(node.Arguments[0]);
                _output.Append("..");
                Write(node.Arguments[1]);
                return _output;
        }
        _output.Append(node.Function).Append('(');
        WriteList(node.Arguments, ", ");
        return _output.Append(')');
    }

    public StringBuilder VisitBound(BoundExpr node)
    {
        _output.Append(node.Kind == BoundKind.Sum ? Builtins.Sum : Builtins.Prod).Append('(');
        WriteRange(node.Variable, node.From, node.To);
        _output.Append(": ");
        Write(node.Body);
        return _output.Append(')');
    }

    public StringBuilder VisitMatrixComprehension(MatrixComprehension node)
    {
        _output.Append(Builtins.Matrix).Append('(');
        WriteRange(node.RowVariable, node.RowFrom, node.RowTo);
        _output.Append(", ");
        WriteRange(node.ColumnVariable, node.ColumnFrom, node.ColumnTo);
        _output.Append(": ");
        Write(node.Body);
        return _output.Append(')');
    }

    public StringBuilder VisitMatrixLiteral(MatrixLiteral node)
    {
        _output.Append('[');
        for (var i = 0; i < node.Rows.Count; i++)
        {
            if (i > 0) _output.Append(", ");
            _output.Append('[');
            WriteList(node.Rows[i], ", ");
            _output.Append(']');
        }
        return _output.Append(']');
    }

    private void WriteRange(string name, Expr from, Expr to)
    {
        _output.Append(name).Append(" in ");
        Write(from);
        _output.Append("..");
        Write(to);
    }

    private void WriteList(IReadOnlyList<Expr> items, string separator)
    {
        for (var i = 0; i < items.Count; i++)
        {
            if (i > 0) _output.Append(separator);
            Write(items[i]);
        }
    }

    private void WriteOperand(Expr operand, Precedence neededLevel)
    {
        if (PrecedenceTable.Of(operand) >= neededLevel)
        {
            Write(operand);
            return;
        }
        _output.Append('(');
        Write(operand);
        _output.Append(')');
    }

    private void Write(Expr expr)
    {
        // Parsed trees are at most MaxNestingDepth high; a deeper hand-built tree gets an exception, not a crash.
        RuntimeHelpers.EnsureSufficientExecutionStack();
        expr.Accept(this);
    }
}

/// <summary>Decimal text of integers of any size, in time well below the quadratic cost of <see cref="BigInteger.ToString()"/> for huge values.</summary>
internal static class DecimalText
{
    // Below this many digits the library conversion is used directly.
    private const int LeafDigits = 2_000;

    public static void Append(StringBuilder output, BigInteger value)
    {
        if (value.Sign < 0)
        {
            output.Append('-');
            value = BigInteger.Negate(value);
        }
        // An upper bound on the digit count: bits·log10(2) + 1.
        var digits = (long)(value.GetBitLength() * 0.30103) + 1;
        if (digits <= LeafDigits)
        {
            output.Append(value.ToString(CultureInfo.InvariantCulture));
            return;
        }

        // Split by 10^(LeafDigits·2^k) for k = top..0: halves are written recursively, the lower ones zero-padded.
        var powers = new List<BigInteger>();
        var power = BigInteger.Pow(10, LeafDigits);
        long exponent = LeafDigits;
        while (exponent * 2 < digits + LeafDigits)
        {
            powers.Add(power);
            power *= power;
            exponent *= 2;
        }
        powers.Add(power);
        Write(output, value, powers.Count - 1, powers, pad: false);
    }

    private static void Write(StringBuilder output, BigInteger value, int level, List<BigInteger> powers, bool pad)
    {
        if (level < 0)
        {
            var text = value.ToString(CultureInfo.InvariantCulture);
            if (pad) output.Append('0', LeafDigits - text.Length);
            output.Append(text);
            return;
        }
        var high = BigInteger.DivRem(value, powers[level], out var low);
        if (!pad && high.IsZero)
        {
            Write(output, low, level - 1, powers, pad: false);
            return;
        }
        Write(output, high, level - 1, powers, pad);
        Write(output, low, level - 1, powers, pad: true);
    }
}
