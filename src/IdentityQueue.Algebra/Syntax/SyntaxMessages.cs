using System.Globalization;
using System.Numerics;

namespace IdentityQueue.Algebra.Syntax;

/// <summary>
/// Every message the catalogue parser gives, in one place. Each names the problem and, where there is one, what was
/// found instead (<c>found</c> arguments are already quoted, or "end of line"). Positions are carried by the
/// <see cref="Diagnostic"/>, not by the text, except where a message refers to a second place (an opening bracket).
/// </summary>
public static class SyntaxMessages
{
    public const string EndOfLine = "end of line";

    private const string FieldForms = "Q, GF(p) or GF(p^k)";
    private const string FunctionList = "binom, fact, qint, qfact, qbinom, det, pf, perm, tr, transpose, id, zero, diag, inv, adj, submatrix, minor, entry, " +
        "min, max, floor, ceil, mod, gcd, abs, delta, iverson, when, fib, lucas, stirling1, stirling2, harmonic, bernoulli, catalan, multinomial, " +
        "the forms sum, prod, matrix, and the names defined by let lines above";

    // ---- limits ----

    public static string LineTooLong(int length, int limit) =>
        $"line is {length} characters long; the limit MaxLineLength is {limit}";

    public static string NestingTooDeep(int limit) =>
        $"expression nested deeper than MaxNestingDepth ({limit})";

    public static string StackExhausted(int limit) =>
        $"expression nested too deeply for the parser's stack (MaxNestingDepth is {limit})";

    public static string MatrixTooLarge(string what, int limit) =>
        $"matrix literal has more than MaxMatrixOrder ({limit}) {what}";

    public static string FieldTooLarge(string field, int limit) =>
        $"{field}: the field has more than MaxFieldBits ({limit}) bits";

    // ---- characters and tokens ----

    public static string UnexpectedCharacter(string character)
    {
        var c = character[0];
        var codePoint = character.Length == 2 ? char.ConvertToUtf32(character[0], character[1]) : c;
        var invisible = character.Length == 1 && (char.IsControl(c) || CharIsInvisible(c));
        var shown = invisible ? $"U+{codePoint:X4}"
            : codePoint > 0x7F ? $"'{character}' (U+{codePoint:X4})"
            : $"'{character}'";
        var hint = c switch
        {
            '\u2212' or '\u2013' or '\u2014' => "; write '-'",
            '\u00D7' or '\u00B7' or '\u22C5' or '\u2217' => "; write '*'",
            '\u00F7' => "; write '/'",
            '{' or '}' => "; group with '(' and ')'",
            ';' => "; write one identity per line",
            _ => "",
        };
        return $"unexpected character {shown}{hint}";
    }

    public static string DecimalNotSupported(string? fraction) =>
        fraction is null
            ? "decimal numbers are not supported; write the value as a fraction p/q"
            : $"decimal numbers are not supported; write {fraction}";

    public static string ScientificNotation(string mantissa, string exponent) =>
        $"scientific notation is not supported; write {mantissa}*10^{exponent}";

    public const string Factorial = "'!' is not an operator: write fact(n) for n!, and != (in a condition) for 'not equal'";

    public const string DoubleEquals = "'==' is not an operator; write a single '=' between the two sides of the identity";

    public const string DoubleStar = "'**' is not an operator; write '^' for a power";

    public const string TripleDot = "'...' is not a range; write A..B";

    public const string LoneDot = "unexpected '.'; a range is written A..B and decimal numbers are not supported";

    // ---- expressions ----

    public static string ExpectedExpression(string? after, string found) =>
        after is null ? $"expected an expression, found {found}" : $"expected an expression after {after}, found {found}";

    public static string EmptyExponent(string found) =>
        $"empty exponent: expected an expression after '^', found {found}";

    public static string MissingOperator(string left, string right) =>
        $"expected an operator between {left} and {right}; implicit multiplication is not supported, write '*'";

    public static string UnclosedParenthesis(int openColumn, string found) =>
        $"expected ')' to close '(' at column {openColumn}, found {found}";

    public static string UnclosedBracket(int openColumn, string found) =>
        $"expected ']' to close '[' at column {openColumn}, found {found}";

    public static string ExpectedCommaOrClose(char close, int openColumn, string what, string found) =>
        $"expected ',' or '{close}' to close {what} opened at column {openColumn}, found {found}";

    public const string UnmatchedParenthesis = "unexpected ')' with no matching '('";

    public const string UnmatchedBracket = "unexpected ']' with no matching '['";

    public const string EmptyParentheses = "empty parentheses: expected an expression between '(' and ')'";

    public static string FunctionAsVariable(string name) =>
        $"'{name}' is a reserved word (a built-in function) and cannot be used as a variable; call it as {name}(...)";

    public static string BoundFormAsVariable(string name) =>
        name == Builtins.Matrix
            ? $"'{name}' is a reserved word and cannot be used as a variable; write matrix(i in A..B, j in C..D: EXPR)"
            : $"'{name}' is a reserved word and cannot be used as a variable; write {name}(k in A..B: EXPR)";

    public static string UnknownFunction(string name) =>
        $"unknown function '{name}'; the functions are {FunctionList}";

    public static string WrongArity(string name, int min, int max, int got) =>
        min == max ? $"{name} takes {min} argument{(min == 1 ? "" : "s")}, got {got}"
        : max == int.MaxValue ? $"{name} takes {min} or more arguments, got {got}"
        : $"{name} takes {min} to {max} arguments, got {got}";

    // ---- conditions ----

    public static string ExpectedComparison(string found) =>
        $"expected a comparison (<, <=, >, >=, = or !=) in the condition, found {found}";

    public static string ComparisonOutsideCondition(string found) =>
        $"the comparison {found} can only be the condition of iverson(A < B) or when(A < B, THEN, ELSE)";

    // ---- definitions ----

    public static string ExpectedDefinitionName(string found) =>
        $"expected the name to define after 'let', found {found}; write let NAME(P1, P2) = EXPR or let NAME = EXPR";

    public static string ReservedAsDefinition(string name) =>
        $"'{name}' is a reserved word (a built-in function or keyword) and cannot be defined";

    public static string DefinedTwice(string name, int line) =>
        $"'{name}' is already defined on line {line}; a name is defined once per file";

    public static string ExpectedDefinitionParameter(string name, string found) =>
        $"expected a parameter name in the definition of '{name}', found {found}";

    public static string ExpectedDefinitionEquals(string name, string found) =>
        $"expected '=' and the body of '{name}', found {found}";

    public static string DefinitionAsBinder(string name, string role) =>
        $"'{name}' is defined by a let line and cannot be {role}";

    public static string RecursiveDefinition(string name) =>
        $"'{name}' is used in its own definition; definitions cannot be recursive (write the sequence with sum, prod or a built-in number function)";

    public static string DefinitionArity(string name, int parameters, int line, int got) =>
        parameters == 0
            ? $"'{name}' (defined on line {line}) has no parameters; write it as {name}, without parentheses"
            : got < 0
                ? $"'{name}' (defined on line {line}) takes {parameters} argument{(parameters == 1 ? "" : "s")}; call it as {name}(...)"
                : $"'{name}' (defined on line {line}) takes {parameters} argument{(parameters == 1 ? "" : "s")}, got {got}";

    public static string DefinitionIndexed(string name, int line) =>
        $"'{name}' is defined on line {line} and cannot be indexed";

    public static string DefinitionNameCaptured(string definition, string name, string binder) =>
        $"the definition of '{definition}' uses the variable '{name}', which here would be {binder}; rename one, or pass it as a parameter";

    public static string ExpansionTooLarge(int limit) =>
        $"written out with its definitions, this has more than {limit} expression nodes (the limit MaxExpandedNodes)";

    public const string DefinitionOutsideFile =
        "a definition (let NAME = EXPR) can only stand on its own line of an .idq catalogue file (or in idq check --definitions FILE)";

    public const string SeriesAfterFor = "'up to q^N' goes before 'for': LHS = RHS [over FIELD] [up to q^N] [for ...]";

    public const string SecondSeries = "a second 'up to'; an entry has at most one series clause";

    public static string ExpectedSeriesClause(string found) =>
        $"expected a series clause 'up to q^N' (a variable, '^' and a non-negative integer), found {found}";

    public static string SeriesTooLong(System.Numerics.BigInteger order, int limit) =>
        $"up to q^{order} is beyond the limit MaxSeriesOrder ({limit})";

    public static string FieldParameterNotInFamily(string name) =>
        $"GF({name}): '{name}' must be a parameter of this family line, e.g. 'for {name} prime in 2..50'";

    public static string WrongArityRange(string name, int min, int max, int got) =>
        max == int.MaxValue ? $"{name} takes at least {min} argument{(min == 1 ? "" : "s")}, got {got}"
            : $"{name} takes {min} to {max} arguments, got {got}";

    public static string ExpectedIndexList(string name, int argument, string found) =>
        $"argument {argument} of {name} is a list of row or column indices such as [1, 3..n], but found {found}";

    public static string ExpectedIndexListItem(string after, string found) =>
        $"expected an index or a range A..B after {after}, found {found}";

    public static string WrongArity(string name, int expected, int got) =>
        $"{name} takes {expected} argument{(expected == 1 ? "" : "s")}, got {got}";

    public static string ExpectedArgument(string after, string found) =>
        $"expected an argument after {after}, found {found}";

    public static string ExpectedIndex(string after, string found) =>
        $"expected an index after {after}, found {found}";

    // ---- bound forms ----

    public static string ExpectedBoundVariable(string form, string found) =>
        $"expected the name of the bound variable after '{form}(', found {found}";

    public static string ReservedAsBoundVariable(string name) =>
        $"'{name}' is a reserved word and cannot name a bound variable";

    public static string ExpectedIn(string name, string found) =>
        $"expected 'in' after '{name}', found {found}";

    public static string ExpectedRangeDots(string found) =>
        $"expected '..' between the two ends of the range, found {found}";

    public static string ExpectedBodyColon(string form, string found) =>
        $"expected ':' before the body of {form}(...), found {found}";

    public static string ExpectedColumnRange(string found) =>
        $"expected ',' and the column range after the row range of matrix(...), found {found}";

    public static string ExpectedBody(string form, string found) =>
        $"expected the body of {form}(...) after ':', found {found}";

    public static string SameMatrixVariables(string name) =>
        $"the row and column variables of matrix(...) are both '{name}'";

    // ---- matrix literals ----

    public const string EmptyMatrix = "empty matrix literal; write rows of entries, e.g. [[a, b], [c, d]]";

    public static string ExpectedRow(int row, string found) =>
        $"expected '[' to start row {row} of the matrix literal, found {found}";

    public static string ExpectedEntry(string after, string found) =>
        $"expected a matrix entry after {after}, found {found}";

    public static string MissingRowComma(int row, string found) =>
        $"expected ',' between rows {row} and {row + 1} of the matrix literal, found {found}";

    public static string RaggedRow(int row, int length, int firstLength) =>
        $"matrix rows must have equal length: row {row} has {Entries(length)}, row 1 has {firstLength}";

    // ---- the identity line ----

    public static string MissingEquals(string found) =>
        $"expected '=' between the two sides of the identity, found {found}";

    public const string EmptyLeftSide = "the left side of the identity is empty: expected an expression before '='";

    public const string SecondEquals = "a second '=': a line states one identity LHS = RHS";

    public const string ExpectedIdentity = "expected an identity LHS = RHS, found an empty line";

    public const string EmptyLabel = "empty label before ':'";

    public static string NothingAfterLabel(string label) =>
        $"expected an identity after the label '{label}:', found end of line";

    public static string AfterRightSide(string found) =>
        $"unexpected {found} after the right side; expected an operator, 'over FIELD', 'for NAME in A..B' or end of line";

    public static string AfterField(string found, bool inIdentity = true) =>
        inIdentity
            ? $"unexpected {found} after the field; expected 'for NAME in A..B' or end of line"
            : $"unexpected {found} after the field";

    public static string AfterRange(string name, string found) =>
        $"unexpected {found} after the range of '{name}'; separate ranges with ','";

    public static string AfterExpression(string found) =>
        $"unexpected {found} after the end of the expression";

    public const string OverAfterFor = "the 'over FIELD' clause must come before the 'for' clause";

    public const string SecondOver = "a second 'over' clause: a line is stated over one field";

    public const string SecondFor = "a second 'for' clause; list all ranges after one 'for', separated by ','";

    public static string ExpectedParameter(string after, string found) =>
        $"expected a parameter name after {after}, found {found}";

    public static string ReservedAsParameter(string name) =>
        $"'{name}' is a reserved word and cannot name a parameter";

    public static string OpenParameterNotAlone(string name) =>
        $"the open-ended parameter '{name} >= …' must be the only parameter of its line; give the others ranges in a line of their own, or give '{name}' a range 'in A..B'";

    public static string OpenParameterPrime(string name) =>
        $"an open-ended parameter cannot take only primes ('{name} prime >= …'); write '{name} prime in A..B'";

    public static string OpenParameterIsField(string name) =>
        $"the field GF({name}) cannot use the open-ended parameter '{name}'; write 'for {name} prime in A..B'";

    public static string DuplicateParameter(string name) =>
        $"parameter '{name}' is given twice";

    // ---- fields ----

    public static string ExpectedField(string? after, string found) =>
        after is null
            ? $"expected a field ({FieldForms}), found {found}"
            : $"expected a field ({FieldForms}) after {after}, found {found}";

    public static string UnknownField(string name) =>
        $"unknown field '{name}'; write {FieldForms}";

    public static string ExpectedFieldParenthesis(string found) =>
        $"expected '(' after 'GF', found {found}";

    public static string ExpectedCharacteristic(string found) =>
        $"expected a prime p after 'GF(', found {found}";

    public static string ExpectedFieldExponent(string found) =>
        $"expected the exponent k, a positive integer, after '^', found {found}";

    public static string NotPrime(string field, BigInteger p, BigInteger? primePowerBase = null, int primePowerExponent = 0) =>
        primePowerBase is { } q
            ? $"{field}: {Number(p)} is not a prime; for the field with {Number(p)} elements write GF({Number(q)}^{primePowerExponent})"
            : $"{field}: {Number(p)} is not a prime";

    public static string ZeroFieldExponent(string field) =>
        $"{field}: the exponent k must be at least 1";

    // ---- helpers ----

    /// <summary>Quotes source text for a message, shortening long text (a 1000-digit number) to its first chars.</summary>
    public static string Quote(ReadOnlySpan<char> text) =>
        text.Length <= 24 ? $"'{text}'" : $"'{text[..20]}…' ({text.Length} characters)";

    private static string Entries(int n) => n == 1 ? "1 entry" : $"{n} entries";

    private static string Number(BigInteger n)
    {
        var digits = n.GetBitLength() > 200 ? null : n.ToString(CultureInfo.InvariantCulture);
        return digits ?? $"a {n.GetBitLength()}-bit number";
    }

    private static bool CharIsInvisible(char c) =>
        char.GetUnicodeCategory(c) is UnicodeCategory.Format or UnicodeCategory.Surrogate or UnicodeCategory.PrivateUse
            or UnicodeCategory.OtherNotAssigned or UnicodeCategory.SpaceSeparator;
}
