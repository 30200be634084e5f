using System.Globalization;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra.Tests.Syntax;

/// <summary>
/// A fully parenthesised prefix form of a tree, e.g. <c>(neg (^ x 2))</c>, written independently of
/// <see cref="ExprPrinter"/> so that tests can state a tree's shape exactly.
/// </summary>
internal sealed class TreeText : IExprVisitor<string>
{
    private static readonly TreeText Instance = new();

    public static string Of(Expr expr) => expr.Accept(Instance);

    public string VisitInteger(IntegerLiteral node) => node.Value.ToString(CultureInfo.InvariantCulture);

    public string VisitName(NameRef node) => node.Name;

    public string VisitIndexed(IndexedName node) => $"(index {node.Name} {Join(node.Indices)})";

    public string VisitUnary(UnaryExpr node) => $"(neg {node.Operand.Accept(this)})";

    /// <summary><c>(+ a b c)</c>, <c>(- a b c)</c> for a−b−c, and for mixed signs the operators in order: a−b+c is <c>(-+ a b c)</c>.</summary>
    public string VisitSum(SumExpr node) =>
        Chain(node.Terms.Skip(1).Select(t => t.Subtract ? '-' : '+'), node.Terms.Select(t => t.Value));

    /// <summary><c>(* a b)</c>, <c>(/ a b c)</c> for a/b/c, <c>(/* a b c)</c> for a/b*c.</summary>
    public string VisitProduct(ProductExpr node) =>
        Chain(node.Factors.Skip(1).Select(f => f.Divide ? '/' : '*'), node.Factors.Select(f => f.Value));

    private string Chain(IEnumerable<char> operators, IEnumerable<Expr> operands)
    {
        var ops = string.Concat(operators);
        var head = ops.Distinct().Count() == 1 ? ops[..1] : ops;
        return $"({head} {Join(operands)})";
    }

    public string VisitBinary(BinaryExpr node) =>
        $"({(node.Operator == BinaryOperator.Power ? "^" : Builtins.Symbol(node.Operator))} {node.Left.Accept(this)} {node.Right.Accept(this)})";

    public string VisitCall(CallExpr node) => $"({node.Function} {Join(node.Arguments)})";

    public string VisitBound(BoundExpr node) =>
        $"({(node.Kind == BoundKind.Sum ? "sum" : "prod")} {node.Variable} {node.From.Accept(this)} {node.To.Accept(this)} {node.Body.Accept(this)})";

    public string VisitMatrixComprehension(MatrixComprehension node) =>
        $"(matrix {node.RowVariable} {node.RowFrom.Accept(this)} {node.RowTo.Accept(this)} " +
        $"{node.ColumnVariable} {node.ColumnFrom.Accept(this)} {node.ColumnTo.Accept(this)} {node.Body.Accept(this)})";

    public string VisitMatrixLiteral(MatrixLiteral node) =>
        "(rows " + string.Join(" ", node.Rows.Select(row => "(" + Join(row) + ")")) + ")";

    private string Join(IEnumerable<Expr> items) => string.Join(" ", items.Select(item => item.Accept(this)));
}
