package dev.lawful.algebra;

import java.util.Locale;

/**
 * The element-wise elementary functions of the law language. Values come from {@link StrictMath}, so results are
 * the same on every JVM (training and deployment agree to the bit).
 *
 * <p>To add a function: add a constant here with its value, its {@link Kind} (which fixes the unit rule) and its
 * derivative in {@link TermPool#derivativeOf}; the parser, checker, printer and evaluator pick it up by name.
 */
public enum Function {
    EXP(Kind.DIMENSIONLESS), LOG(Kind.DIMENSIONLESS), LOG10(Kind.DIMENSIONLESS), SQRT(Kind.ROOT),
    SIN(Kind.DIMENSIONLESS), COS(Kind.DIMENSIONLESS), TAN(Kind.DIMENSIONLESS),
    ASIN(Kind.DIMENSIONLESS), ACOS(Kind.DIMENSIONLESS), ATAN(Kind.DIMENSIONLESS),
    SINH(Kind.DIMENSIONLESS), COSH(Kind.DIMENSIONLESS), TANH(Kind.DIMENSIONLESS),
    ABS(Kind.SAME), SIGN(Kind.SIGN);

    /** How a function treats units. */
    public enum Kind {
        /** argument and result are pure numbers */
        DIMENSIONLESS,
        /** the result has half the argument's dimension, which must have even exponents */
        ROOT,
        /** the result has the argument's dimension */
        SAME,
        /** any argument, pure-number result */
        SIGN
    }

    private final Kind kind;
    private final String spelling;

    Function(Kind kind) {
        this.kind = kind;
        this.spelling = name().toLowerCase(Locale.ROOT);
    }

    /** @return the unit rule */
    public Kind kind() {
        return kind;
    }

    /** @return the name as written in law text */
    public String spelling() {
        return spelling;
    }

    /** @return the function named {@code name} in law text, or null */
    public static Function named(String name) {
        for (Function f : values()) {
            if (f.spelling.equals(name)) {
                return f;
            }
        }
        return null;
    }

    /** @return the function's value at {@code x}, computed with {@link StrictMath} */
    public double apply(double x) {
        switch (this) {
            case EXP: return StrictMath.exp(x);
            case LOG: return StrictMath.log(x);
            case LOG10: return StrictMath.log10(x);
            case SQRT: return StrictMath.sqrt(x);
            case SIN: return StrictMath.sin(x);
            case COS: return StrictMath.cos(x);
            case TAN: return StrictMath.tan(x);
            case ASIN: return StrictMath.asin(x);
            case ACOS: return StrictMath.acos(x);
            case ATAN: return StrictMath.atan(x);
            case SINH: return StrictMath.sinh(x);
            case COSH: return StrictMath.cosh(x);
            case TANH: return StrictMath.tanh(x);
            case ABS: return Math.abs(x);
            case SIGN: return Math.signum(x);
            default: throw new AssertionError(this);
        }
    }
}
