package dev.lawful.algebra;

import java.util.ArrayList;
import java.util.IdentityHashMap;
import java.util.List;
import java.util.Map;

/**
 * Recursive-descent parser of the law language, one method per rule of this grammar ({@code NL} is a line end,
 * see {@link Scanner} for when line ends are ignored and for {@code #} comments, which never reach the parser):
 *
 * <pre>
 * file        = [ statement ] { NL [ statement ] } EOF
 * statement   = variable | constant | definition | law | limit | completion | guess
 * variable    = ( "input" | "output" ) NAME [ "[" INT "]" ] [ unit ]
 * constant    = "const" NAME "=" ( signed | "[" signed { "," signed } "]" ) [ unit ]
 * definition  = "let" NAME "=" expr
 * law         = "law" NAME ":" expr "=" expr
 * limit       = "limit" NAME ":" expr relation expr [ relation expr ]   -- a chain repeats its relation
 * relation    = "<=" | ">="
 * completion  = "complete" target { "," target }
 * guess       = "guess" target "=" expr                 -- Newton's starting value for the target's elements
 * target      = NAME [ "[" INT [ ":" INT ] "]" ]
 * expr        = term { ( "+" | "-" ) term }
 * term        = unary { ( "*" | "/" ) unary }
 * unary       = "-" unary | power
 * power       = primary [ "^" unary ]                  -- right-associative; -x^2 is -(x^2)
 * primary     = NUMBER | NAME [ "[" INT [ ":" INT ] "]" ] | NAME "(" [ expr { "," expr } ] ")"
 *             | "(" expr ")" | "[" expr { "," expr } "]"
 * signed      = [ "-" ] NUMBER
 * unit        = the rest of the line, see {@link UnitParser}
 * </pre>
 *
 * <p>A limit's relations bind more loosely than any operator, so {@code q + dqdt * dt >= 0} compares the whole sum.
 * A NAME is never a statement keyword ({@link #KEYWORDS}): one inside an expression is an error here, and
 * declaring one is an error of the checker. Lengths and indices are whole-number literals (INT), indices from 0;
 * a slice {@code v[a:b]} holds elements a to b-1. A syntax error is reported and the parser skips
 * to the next line, so one pass finds the errors of every statement. Expressions deeper than
 * {@link Limits#MAX_NESTING_DEPTH} are rejected before any recursion can exhaust the stack.
 */
final class Parser {
    /** The parsed statements, and where each piece was written. */
    record Result(List<Declaration> declarations, Places places) {
    }

    /** Source positions of parsed values, keyed by identity (equal values written twice have two places). */
    static final class Places {
        final Map<Object, Span> spans = new IdentityHashMap<>();
        final Map<Declaration, Span> names = new IdentityHashMap<>();
        final Map<Declaration, Span> units = new IdentityHashMap<>();
        final java.util.Set<Declaration> badUnits = java.util.Collections.newSetFromMap(new IdentityHashMap<>());

        Span of(Object node) {
            return spans.get(node);
        }
    }

    static final List<String> KEYWORDS = List.of("input", "output", "const", "let", "law", "limit", "complete",
            "guess");

    private final Diagnostics diagnostics;
    private final Literals literals;
    private final List<Token> tokens;
    private final Places places = new Places();
    private final Map<Expr, Integer> depths = new IdentityHashMap<>();
    private int pos;
    private int recursion;

    /** Thrown to abandon the current statement after its error was reported. */
    static final class Abandon extends RuntimeException {
        private static final long serialVersionUID = 1L;

        Abandon() {
            super(null, null, false, false);
        }
    }

    Parser(Diagnostics diagnostics) {
        this.diagnostics = diagnostics;
        this.literals = new Literals(diagnostics);
        this.tokens = new Scanner(diagnostics).scan();
    }

    Result parseFile() {
        List<Declaration> out = new ArrayList<>();
        while (peek().kind() != TokenKind.EOF) {
            if (peek().kind() == TokenKind.NEWLINE) {
                pos++;
                continue;
            }
            int start = pos;
            recursion = 0;
            try {
                Declaration d = statement();
                if (peek().kind() != TokenKind.NEWLINE && peek().kind() != TokenKind.EOF) {
                    throw unexpected(peek(), "an operator or the end of the statement");
                }
                places.spans.put(d, span(start));
                out.add(d);
            } catch (Abandon a) {
                while (peek().kind() != TokenKind.NEWLINE && peek().kind() != TokenKind.EOF) {
                    pos++;
                }
            }
        }
        return new Result(out, places);
    }

    private Declaration statement() {
        Token t = peek();
        if (t.kind() == TokenKind.IDENT) {
            switch (t.text()) {
                case "input":
                    return variable(Declaration.Role.INPUT);
                case "output":
                    return variable(Declaration.Role.OUTPUT);
                case "const":
                    return constant();
                case "let":
                    return definition();
                case "law":
                    return law();
                case "limit":
                    return limit();
                case "complete":
                    return completion();
                case "guess":
                    return guess();
                default:
                    String near = Names.nearest(t.text(), KEYWORDS);
                    diagnostics.error(t.span(), "expected a statement (" + String.join(", ", KEYWORDS) + "), found "
                            + t.describe() + (near == null ? "" : "; did you mean '" + near + "'?"));
                    throw new Abandon();
            }
        }
        throw unexpected(t, "a statement (" + String.join(", ", KEYWORDS) + ")");
    }

    private Declaration variable(Declaration.Role role) {
        pos++;
        Token name = name("a name after '" + role.keyword() + "'");
        boolean vector = false;
        int size = 1;
        if (peek().kind() == TokenKind.LBRACKET) {
            pos++;
            size = length();
            vector = true;
            expect(TokenKind.RBRACKET, "']' after the length");
        }
        Span unitSpan = unitSpan();
        UnitParser units = unitSpan == null ? null : new UnitParser(diagnostics, unitSpan.offset(), unitSpan.end());
        Unit unit = units == null ? Unit.NONE : units.parse();
        Declaration d = new Declaration.Variable(role, name.text(), vector, size, unit);
        if (units != null && units.failed()) {
            places.badUnits.add(d);
        }
        places.names.put(d, name.span());
        if (unitSpan != null) {
            places.units.put(d, unitSpan);
        }
        return d;
    }

    private int length() {
        Token t = peek();
        if (t.kind() != TokenKind.NUMBER) {
            throw unexpected(t, "a vector length (a whole number)");
        }
        pos++;
        int n = literals.integer(t);
        if (n < 1 || n > Limits.MAX_VECTOR_LENGTH) {
            diagnostics.error(t.span(), "vector length must be between 1 and " + Limits.MAX_VECTOR_LENGTH + ", found "
                    + t.text());
            throw new Abandon();
        }
        return n;
    }

    private Declaration constant() {
        pos++;
        Token name = name("a name after 'const'");
        expect(TokenKind.EQUALS, "'=' after the constant's name");
        List<Double> values = new ArrayList<>();
        boolean vector = false;
        if (peek().kind() == TokenKind.LBRACKET) {
            pos++;
            vector = true;
            values.add(signed());
            while (peek().kind() == TokenKind.COMMA) {
                pos++;
                if (values.size() >= Limits.MAX_VECTOR_LENGTH) {
                    diagnostics.error(peek().span(), "vector literal longer than the limit of "
                            + Limits.MAX_VECTOR_LENGTH + " elements");
                    throw new Abandon();
                }
                values.add(signed());
            }
            expect(TokenKind.RBRACKET, "',' or ']' in the constant's values");
        } else {
            values.add(signed());
        }
        Span unitSpan = unitSpan();
        UnitParser units = unitSpan == null ? null : new UnitParser(diagnostics, unitSpan.offset(), unitSpan.end());
        Unit unit = units == null ? Unit.NONE : units.parse();
        Declaration d = new Declaration.Constant(name.text(), vector, values, unit);
        if (units != null && units.failed()) {
            places.badUnits.add(d);
        }
        places.names.put(d, name.span());
        if (unitSpan != null) {
            places.units.put(d, unitSpan);
        }
        return d;
    }

    private double signed() {
        boolean negative = false;
        if (peek().kind() == TokenKind.MINUS) {
            negative = true;
            pos++;
        }
        Token t = peek();
        if (t.kind() != TokenKind.NUMBER) {
            throw unexpected(t, "a number");
        }
        pos++;
        double v = literals.number(t);
        return negative ? -v : v;
    }

    private Declaration definition() {
        pos++;
        Token name = name("a name after 'let'");
        expect(TokenKind.EQUALS, "'=' after the definition's name");
        Expr e = expr();
        Declaration d = new Declaration.Definition(name.text(), e);
        places.names.put(d, name.span());
        return d;
    }

    private Declaration law() {
        pos++;
        Token name = name("the law's name after 'law'");
        expect(TokenKind.COLON, "':' after the law's name");
        Expr lhs = expr();
        if (relation(peek()) != null) {
            diagnostics.error(peek().span(), "expected '=' between the two sides of the law, found '" + peek().text()
                    + "'; an inequality is a 'limit' statement");
            throw new Abandon();
        }
        expect(TokenKind.EQUALS, "'=' between the two sides of the law");
        Expr rhs = expr();
        Declaration d = new Declaration.Law(name.text(), lhs, rhs);
        places.names.put(d, name.span());
        return d;
    }

    /** {@code lo <= e <= hi} is one chain; a third relation or a mixed pair bounds nothing useful, so both are errors. */
    private Declaration limit() {
        pos++;
        Token name = name("the limit's name after 'limit'");
        expect(TokenKind.COLON, "':' after the limit's name");
        List<Expr> parts = new ArrayList<>();
        List<Declaration.Relation> relations = new ArrayList<>();
        parts.add(expr());
        if (relation(peek()) == null) {
            throw unexpected(peek(), "'<=' or '>=' between the parts of the limit");
        }
        while (relation(peek()) != null) {
            Token op = next();
            if (relations.size() == 2 || (!relations.isEmpty() && relations.get(0) != relation(op))) {
                diagnostics.error(op.span(), "a limit is 'a <= b', 'a >= b' or a two-sided 'lo <= e <= hi' (or"
                        + " 'hi >= e >= lo'), found another '" + op.text() + "'; write one limit per bound");
                throw new Abandon();
            }
            relations.add(relation(op));
            parts.add(expr());
        }
        Declaration d = new Declaration.Limit(name.text(), parts, relations);
        places.names.put(d, name.span());
        return d;
    }

    private static Declaration.Relation relation(Token t) {
        return t.kind() == TokenKind.LESS_EQUAL ? Declaration.Relation.AT_MOST
                : t.kind() == TokenKind.GREATER_EQUAL ? Declaration.Relation.AT_LEAST : null;
    }

    private Declaration completion() {
        pos++;
        List<Expr> targets = new ArrayList<>();
        targets.add(target());
        while (peek().kind() == TokenKind.COMMA) {
            pos++;
            targets.add(target());
        }
        return new Declaration.Completion(targets);
    }

    private Declaration guess() {
        pos++;
        Expr target = target();
        expect(TokenKind.EQUALS, "'=' after the output the guess is for");
        Expr value = expr();
        return new Declaration.Guess(target, value);
    }

    private Expr target() {
        int start = pos;
        Token name = name("an output to complete");
        if (peek().kind() == TokenKind.LBRACKET) {
            return element(name, start);
        }
        return place(new Expr.Name(name.text()), start, 1);
    }

    // ---- expressions -----------------------------------------------------------------------------------------

    private Expr expr() {
        enter();
        int start = pos;
        Expr left = term();
        while (peek().kind() == TokenKind.PLUS || peek().kind() == TokenKind.MINUS) {
            Expr.Op op = next().kind() == TokenKind.PLUS ? Expr.Op.ADD : Expr.Op.SUB;
            Expr right = term();
            left = place(new Expr.Binary(op, left, right), start, 1 + Math.max(depth(left), depth(right)));
        }
        recursion--;
        return left;
    }

    private Expr term() {
        int start = pos;
        Expr left = unary();
        while (peek().kind() == TokenKind.STAR || peek().kind() == TokenKind.SLASH) {
            Expr.Op op = next().kind() == TokenKind.STAR ? Expr.Op.MUL : Expr.Op.DIV;
            Expr right = unary();
            left = place(new Expr.Binary(op, left, right), start, 1 + Math.max(depth(left), depth(right)));
        }
        return left;
    }

    private Expr unary() {
        if (peek().kind() == TokenKind.MINUS) {
            enter();
            int start = pos;
            pos++;
            Expr operand = unary();
            recursion--;
            return place(new Expr.Neg(operand), start, 1 + depth(operand));
        }
        return power();
    }

    private Expr power() {
        int start = pos;
        Expr base = primary();
        if (peek().kind() == TokenKind.CARET) {
            pos++;
            enter();
            Expr exponent = unary();
            recursion--;
            return place(new Expr.Binary(Expr.Op.POW, base, exponent), start, 1 + Math.max(depth(base), depth(exponent)));
        }
        return base;
    }

    private Expr primary() {
        int start = pos;
        Token t = peek();
        switch (t.kind()) {
            case NUMBER:
                pos++;
                return place(new Expr.Num(literals.number(t)), start, 1);
            case IDENT:
                pos++;
                return named(t, start);
            case LPAREN:
                pos++;
                return parenthesized(t, start);
            case LBRACKET:
                pos++;
                return vector(start);
            default:
                throw unexpected(t, "an expression");
        }
    }

    /** A name already consumed: a variable, constant or definition, one of its elements, or a function call. */
    private Expr named(Token t, int start) {
        if (KEYWORDS.contains(t.text())) {
            diagnostics.error(t.span(), "expected an expression, found the keyword '" + t.text()
                    + "'; a statement starts on a new line");
            throw new Abandon();
        }
        if (peek().kind() == TokenKind.LPAREN) {
            return call(t, start);
        }
        if (peek().kind() == TokenKind.LBRACKET) {
            return element(t, start);
        }
        return place(new Expr.Name(t.text()), start, 1);
    }

    /** The expression after an opening parenthesis already consumed; the parenthesis counts one level of depth. */
    private Expr parenthesized(Token open, int start) {
        Expr inner = expr();
        if (peek().kind() == TokenKind.EOF || peek().kind() == TokenKind.NEWLINE) {
            diagnostics.error(open.span(), "unclosed '(': expected ')' before the end of the "
                    + (peek().kind() == TokenKind.EOF ? "file" : "line"));
            throw new Abandon();
        }
        expect(TokenKind.RPAREN, "')' to close the '(' at column " + diagnostics.source().column(open.offset()));
        depths.put(inner, depth(inner) + 1);
        checkDepth(inner, start);
        return inner;
    }

    /** A vector literal after its opening bracket, already consumed. */
    private Expr vector(int start) {
        List<Expr> elements = new ArrayList<>();
        int deepest = 0;
        enter();
        do {
            if (!elements.isEmpty()) {
                pos++;
            }
            if (elements.size() >= Limits.MAX_VECTOR_LENGTH) {
                diagnostics.error(peek().span(), "vector literal longer than the limit of "
                        + Limits.MAX_VECTOR_LENGTH + " elements");
                throw new Abandon();
            }
            Expr e = expr();
            deepest = Math.max(deepest, depth(e));
            elements.add(e);
        } while (peek().kind() == TokenKind.COMMA);
        recursion--;
        expect(TokenKind.RBRACKET, "',' or ']' in the vector");
        return place(new Expr.Vector(elements), start, 1 + deepest);
    }

    private Expr call(Token name, int start) {
        pos++;
        List<Expr> args = new ArrayList<>();
        int deepest = 0;
        enter();
        if (peek().kind() != TokenKind.RPAREN) {
            do {
                if (!args.isEmpty()) {
                    pos++;
                }
                Expr e = expr();
                deepest = Math.max(deepest, depth(e));
                args.add(e);
            } while (peek().kind() == TokenKind.COMMA);
        }
        recursion--;
        expect(TokenKind.RPAREN, "',' or ')' in the arguments of '" + name.text() + "'");
        return place(new Expr.Call(name.text(), args), start, 1 + deepest);
    }

    private Expr element(Token name, int start) {
        pos++;
        Token first = peek();
        if (first.kind() != TokenKind.NUMBER) {
            throw unexpected(first, "an index (a whole number) after '['");
        }
        pos++;
        int from = literals.index(first);
        if (peek().kind() == TokenKind.COLON) {
            pos++;
            Token second = peek();
            if (second.kind() != TokenKind.NUMBER) {
                throw unexpected(second, "the end of the slice (a whole number) after ':'");
            }
            pos++;
            int to = literals.index(second);
            expect(TokenKind.RBRACKET, "']' to close the slice");
            if (to <= from) {
                diagnostics.error(span(start), "empty slice " + name.text() + "[" + from + ":" + to
                        + "]: the end must be greater than the start (slices are half-open)");
                throw new Abandon();
            }
            return place(new Expr.Slice(name.text(), from, to), start, 1);
        }
        expect(TokenKind.RBRACKET, "']' or ':' after the index");
        return place(new Expr.Index(name.text(), from), start, 1);
    }

    // ---- helpers ---------------------------------------------------------------------------------------------

    private void enter() {
        if (++recursion > Limits.MAX_NESTING_DEPTH) {
            diagnostics.error(peek().span(), "expression nested deeper than the limit of " + Limits.MAX_NESTING_DEPTH
                    + " levels; split it with 'let' definitions");
            recursion = 0;
            throw new Abandon();
        }
    }

    private int depth(Expr e) {
        Integer d = depths.get(e);
        return d == null ? 1 : d;
    }

    private Expr place(Expr e, int startToken, int depth) {
        places.spans.put(e, span(startToken));
        depths.put(e, depth);
        checkDepth(e, startToken);
        return e;
    }

    private void checkDepth(Expr e, int startToken) {
        if (depth(e) > Limits.MAX_NESTING_DEPTH) {
            diagnostics.error(span(startToken), "expression nested deeper than the limit of "
                    + Limits.MAX_NESTING_DEPTH + " levels (each operator counts one); split it with 'let' definitions"
                    + " or use sum() for long sums");
            throw new Abandon();
        }
    }

    /** @return the span from token {@code startToken} to the last consumed token */
    private Span span(int startToken) {
        Token first = tokens.get(Math.min(startToken, tokens.size() - 1));
        Token last = tokens.get(Math.max(startToken, pos - 1));
        return new Span(first.offset(), Math.max(0, last.offset() + last.length() - first.offset()));
    }

    private Span unitSpan() {
        Token t = peek();
        if (t.kind() == TokenKind.NEWLINE || t.kind() == TokenKind.EOF) {
            return null;
        }
        int start = t.offset();
        Token last = t;
        while (peek().kind() != TokenKind.NEWLINE && peek().kind() != TokenKind.EOF) {
            last = next();
        }
        return new Span(start, last.offset() + last.length() - start);
    }

    private Token name(String expected) {
        Token t = peek();
        if (t.kind() != TokenKind.IDENT) {
            throw unexpected(t, expected);
        }
        pos++;
        return t;
    }

    private void expect(TokenKind kind, String expected) {
        if (peek().kind() != kind) {
            throw unexpected(peek(), expected);
        }
        pos++;
    }

    private Abandon unexpected(Token t, String expected) {
        if (t.kind() == TokenKind.BAD) {
            // the scanner has reported this token already
            return new Abandon();
        }
        if (t.kind() == TokenKind.EOF && pos > 0) {
            // point just after the last token rather than at an empty last line
            Token last = tokens.get(pos - 1);
            if (last.kind() != TokenKind.NEWLINE) {
                diagnostics.error(new Span(last.offset() + last.length(), 0), "expected " + expected + ", found "
                        + t.describe());
                return new Abandon();
            }
        }
        diagnostics.error(t.span(), "expected " + expected + ", found " + t.describe() + Token.hint(t));
        return new Abandon();
    }

    private Token peek() {
        return tokens.get(pos);
    }

    private Token next() {
        return tokens.get(pos++);
    }
}
