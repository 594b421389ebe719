package dev.lawful.algebra;

/**
 * Prints expressions as law-language text that parses back to an equal expression, with the fewest parentheses
 * the grammar needs: {@code + - * /} are left-associative, {@code ^} is right-associative and binds tighter than
 * unary minus ({@code -x^2} is {@code -(x^2)}).
 */
public final class ExprPrinter {
    private static final int UNARY = 3;

    private ExprPrinter() {
    }

    /** @return the text of {@code e} */
    public static String print(Expr e) {
        StringBuilder sb = new StringBuilder();
        print(e, sb);
        return sb.toString();
    }

    /**
     * Formats a double so it parses back to the same value: integers below 1e15 without a fraction, everything
     * else in Java's round-trip form.
     */
    public static String number(double v) {
        if (v == Math.rint(v) && Math.abs(v) < 1e15 && !(v == 0 && 1 / v < 0)) {
            return Long.toString((long) v);
        }
        return Double.toString(v);
    }

    private static void print(Expr e, StringBuilder sb) {
        if (e instanceof Expr.Num n) {
            sb.append(number(n.value()));
        } else if (e instanceof Expr.Name n) {
            sb.append(n.name());
        } else if (e instanceof Expr.Index i) {
            sb.append(i.name()).append('[').append(i.index()).append(']');
        } else if (e instanceof Expr.Slice s) {
            sb.append(s.name()).append('[').append(s.from()).append(':').append(s.to()).append(']');
        } else if (e instanceof Expr.Neg n) {
            sb.append('-');
            wrap(n.operand(), precedence(n.operand()) < UNARY || n.operand() instanceof Expr.Neg, sb);
        } else if (e instanceof Expr.Binary b) {
            int p = b.op().precedence();
            boolean rightAssoc = b.op() == Expr.Op.POW;
            int lp = precedence(b.left());
            // a negation on the left of ^ keeps its parentheses: -x^2 means -(x^2)
            wrap(b.left(), rightAssoc ? lp <= p : lp < p, sb);
            sb.append(rightAssoc ? "^" : " " + b.op().symbol() + " ");
            int rp = precedence(b.right());
            wrap(b.right(), rightAssoc ? rp < UNARY : rp <= p, sb);
        } else if (e instanceof Expr.Call c) {
            sb.append(c.function());
            list(c.args(), '(', ')', sb);
        } else if (e instanceof Expr.Vector v) {
            list(v.elements(), '[', ']', sb);
        } else {
            throw new IllegalStateException("unknown expression " + e);
        }
    }

    private static void list(java.util.List<Expr> items, char open, char close, StringBuilder sb) {
        sb.append(open);
        for (int i = 0; i < items.size(); i++) {
            if (i > 0) {
                sb.append(", ");
            }
            print(items.get(i), sb);
        }
        sb.append(close);
    }

    private static void wrap(Expr e, boolean parens, StringBuilder sb) {
        if (parens) {
            sb.append('(');
        }
        print(e, sb);
        if (parens) {
            sb.append(')');
        }
    }

    private static int precedence(Expr e) {
        if (e instanceof Expr.Binary b) {
            return b.op().precedence();
        }
        return e instanceof Expr.Neg ? UNARY : 10;
    }
}
