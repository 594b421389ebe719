package dev.lawful.enforce;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.lawful.algebra.ExpandedLaws;
import dev.lawful.algebra.LawEvaluator;
import dev.lawful.algebra.LawSet;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.SplittableRandom;
import java.util.function.Consumer;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.SingularValueDecomposition;
import org.junit.jupiter.api.Test;

/**
 * The random law sets the completion tests run on, and the seeded trial runner they use (repeatable randomised
 * checks on JUnit alone). Each {@link Model} is law text generated from addend lists, so the test knows every law
 * exactly and can evaluate it independently of the library (in double-double, {@link #exactCheck}); the tests here
 * check that the generated text means what the model says, so the other tests may rely on it.
 */
public class CompletionModelsTest {
    /** Unit roundoff of double, 2⁻⁵³, as in the documented bound. */
    public static final double U = 0x1p-53;
    private static final long GOLDEN = 0x9E3779B97F4A7C15L;

    // ---- trials: repeatable randomised checks on JUnit alone -------------------------------------------------

    /**
     * Runs {@code property} on {@code tries} generators seeded from {@code seed} and the trial number; a failure names
     * the seed, and {@code -Dlawful.trial.seed=S} reruns that one trial alone.
     */
    public static void trials(String name, long seed, int tries, Consumer<SplittableRandom> property) {
        String only = System.getProperty("lawful.trial.seed");
        if (only != null) {
            property.accept(new SplittableRandom(Long.parseLong(only)));
            return;
        }
        for (int i = 0; i < tries; i++) {
            long s = seed + GOLDEN * i;
            try {
                property.accept(new SplittableRandom(s));
            } catch (AssertionError | RuntimeException e) {
                throw new AssertionError(name + ": trial " + i + " of " + tries + " failed; rerun it alone with"
                        + " -Dlawful.trial.seed=" + s + "\n" + e.getMessage(), e);
            }
        }
    }

    public static double uniform(SplittableRandom r, double from, double to) {
        return from + (to - from) * r.nextDouble();
    }

    /** A magnitude in [from, to) with a random sign. */
    public static double signed(SplittableRandom r, double from, double to) {
        return (r.nextBoolean() ? 1 : -1) * uniform(r, from, to);
    }

    // ---- the random law sets ---------------------------------------------------------------------------------

    /** Factor forms: the variable itself, its square, exp or log of it. */
    static final int PLAIN = 0;
    static final int SQUARE = 1;
    static final int EXP = 2;
    static final int LOG = 3;

    /** A factor of an addend; {@code variable} counts inputs first, then outputs (as {@link ExpandedLaws}). */
    record Factor(int variable, int form) {
    }

    /** coefficient · Π factors. */
    record Addend(double coefficient, List<Factor> factors) {
        /** Roundings the evaluator makes computing it: one per product (a square is one product). */
        int products() {
            int k = coefficient == 1 ? -1 : 0;
            for (Factor f : factors) {
                k += f.form() == SQUARE ? 2 : 1;
            }
            return Math.max(0, k);
        }
    }

    /** One law: Σ lhs = Σ rhs. */
    record Law(String name, List<Addend> lhs, List<Addend> rhs) {
        List<Addend> addends() {
            List<Addend> all = new ArrayList<>(lhs);
            all.addAll(rhs);
            return all;
        }
    }

    /** How a sample of a model is drawn: fills the variables (inputs, then all outputs) of one sample. */
    interface Sampler {
        void draw(SplittableRandom r, double[] variables);
    }

    /**
     * A generated law set: dimensionless input vector {@code x[q]} and output vector {@code y[p]}, laws as addend
     * lists, the completed outputs, optional guess lines, the tier it must be classified as, and a sampler that draws
     * the inputs and free outputs of one sample (for nonlinear models it also writes the intended root into the
     * completed outputs' slots).
     */
    static final class Model {
        final int q;
        final int p;
        final List<Law> laws;
        final int[] completed;
        final List<String> guesses;
        final Tier tier;
        Sampler sampler;

        Model(int q, int p, List<Law> laws, int[] completed, List<String> guesses, Tier tier) {
            this.q = q;
            this.p = p;
            this.laws = laws;
            this.completed = completed;
            this.guesses = guesses;
            this.tier = tier;
        }

        String text() {
            StringBuilder sb = new StringBuilder();
            sb.append("input x[").append(q).append("]\n");
            sb.append("output y[").append(p).append("]\n");
            for (Law l : laws) {
                sb.append("law ").append(l.name()).append(": ").append(side(l.lhs())).append(" = ")
                        .append(side(l.rhs())).append('\n');
            }
            for (String g : guesses) {
                sb.append(g).append('\n');
            }
            sb.append("complete ");
            for (int k = 0; k < completed.length; k++) {
                sb.append(k == 0 ? "" : ", ").append("y[").append(completed[k]).append(']');
            }
            return sb.append('\n').toString();
        }

        private String side(List<Addend> side) {
            if (side.isEmpty()) {
                return "0";
            }
            StringBuilder sb = new StringBuilder();
            for (int i = 0; i < side.size(); i++) {
                Addend a = side.get(i);
                double c = a.coefficient();
                sb.append(i == 0 ? (c < 0 ? "-" : "") : (c < 0 ? " - " : " + "));
                String body = "";
                for (Factor f : a.factors()) {
                    body += (body.isEmpty() ? "" : "*") + factorText(f);
                }
                if (body.isEmpty()) {
                    sb.append(Double.toString(Math.abs(c)));
                } else if (Math.abs(c) == 1) {
                    sb.append(body);
                } else {
                    sb.append(Double.toString(Math.abs(c))).append('*').append(body);
                }
            }
            return sb.toString();
        }

        private String factorText(Factor f) {
            String v = f.variable() < q ? "x[" + f.variable() + "]" : "y[" + (f.variable() - q) + "]";
            switch (f.form()) {
                case SQUARE:
                    return v + "^2";
                case EXP:
                    return "exp(" + v + ")";
                case LOG:
                    return "log(" + v + ")";
                default:
                    return v;
            }
        }

        LawSet lawSet() {
            return LawSet.parse("<random>", text());
        }

        int[] free() {
            int[] f = new int[p - completed.length];
            for (int o = 0, k = 0; o < p; o++) {
                final int out = o;
                if (Arrays.stream(completed).noneMatch(c -> c == out)) {
                    f[k++] = o;
                }
            }
            return f;
        }

        /** Draws a batch: x (batch·q), z (batch·free, declaration order) and the whole variable rows. */
        double[][] batch(SplittableRandom r, int batch) {
            int[] free = free();
            double[] x = new double[batch * q];
            double[] z = new double[batch * free.length];
            double[] rows = new double[batch * (q + p)];
            double[] v = new double[q + p];
            for (int s = 0; s < batch; s++) {
                Arrays.fill(v, 0);
                sampler.draw(r, v);
                System.arraycopy(v, 0, x, s * q, q);
                for (int f = 0; f < free.length; f++) {
                    z[s * free.length + f] = v[q + free[f]];
                }
                System.arraycopy(v, 0, rows, s * (q + p), q + p);
            }
            return new double[][] {x, z, rows};
        }
    }

    static double factorValue(Factor f, double[] v) {
        double a = v[f.variable()];
        switch (f.form()) {
            case SQUARE:
                return a * a;
            case EXP:
                return StrictMath.exp(a);
            case LOG:
                return StrictMath.log(a);
            default:
                return a;
        }
    }

    static double value(Addend a, double[] v) {
        double t = a.coefficient();
        for (Factor f : a.factors()) {
            t *= factorValue(f, v);
        }
        return t;
    }

    // ---- double-double arithmetic: exact products by fma, sums to ~2⁻¹⁰⁴ relative -------------------------

    /** hi + lo of a·b, exactly. */
    static double[] times(double a, double b) {
        double p = a * b;
        return new double[] {p, Math.fma(a, b, -p)};
    }

    /** (hi, lo)·b to about 2⁻¹⁰⁴ relative. */
    static double[] times(double[] a, double b) {
        double p = a[0] * b;
        double e = Math.fma(a[0], b, -p) + a[1] * b;
        double s = p + e;
        return new double[] {s, e - (s - p)};
    }

    /** (hi, lo) + (hi, lo) to about 2⁻¹⁰⁴ of the larger. */
    static double[] plus(double[] a, double[] b) {
        double s = a[0] + b[0];
        double z = s - a[0];
        double e = (a[0] - (s - z)) + (b[0] - z) + a[1] + b[1];
        double t = s + e;
        return new double[] {t, e - (t - s)};
    }

    /**
     * The addend in double-double: coefficient times the product of the factors with no rounding beyond ~2⁻¹⁰⁴
     * (exp and log enter as the StrictMath values the library also uses, so only products are compared).
     */
    static double[] exact(Addend a, double[] v) {
        double[] t = {a.coefficient(), 0};
        for (Factor f : a.factors()) {
            double x = v[f.variable()];
            if (f.form() == SQUARE) {
                t = times(times(t, x), x);
            } else {
                t = times(t, f.form() == PLAIN ? x : factorValue(f, v));
            }
        }
        return t;
    }

    /** d(addend)/d(variable) in double. */
    static double derivative(Addend a, int variable, double[] v) {
        double total = 0;
        List<Factor> fs = a.factors();
        for (int i = 0; i < fs.size(); i++) {
            Factor f = fs.get(i);
            if (f.variable() != variable) {
                continue;
            }
            double x = v[variable];
            double d = f.form() == SQUARE ? 2 * x : f.form() == EXP ? StrictMath.exp(x) : f.form() == LOG ? 1 / x : 1;
            double t = a.coefficient() * d;
            for (int j = 0; j < fs.size(); j++) {
                if (j != i) {
                    t *= factorValue(fs.get(j), v);
                }
            }
            total += t;
        }
        return total;
    }

    /** ∂C/∂y_completed of a model at the variables {@code v} (n×n, rows laws, columns in completed order). */
    static double[][] block(Model m, double[] v) {
        int n = m.laws.size();
        double[][] a = new double[n][n];
        for (int i = 0; i < n; i++) {
            Law l = m.laws.get(i);
            for (int k = 0; k < n; k++) {
                int var = m.q + m.completed[k];
                for (Addend ad : l.lhs()) {
                    a[i][k] += derivative(ad, var, v);
                }
                for (Addend ad : l.rhs()) {
                    a[i][k] -= derivative(ad, var, v);
                }
            }
        }
        return a;
    }

    /** 2-norm condition number. */
    static double condition(double[][] a) {
        // Source: Apache Commons Math 3.6.1 SingularValueDecomposition
        return new SingularValueDecomposition(new Array2DRowRealMatrix(a)).getConditionNumber();
    }

    private static int[] randomSubset(SplittableRandom r, int p, int n) {
        int[] all = new int[p];
        for (int i = 0; i < p; i++) {
            all[i] = i;
        }
        for (int i = p - 1; i > 0; i--) {
            int j = r.nextInt(i + 1);
            int t = all[i];
            all[i] = all[j];
            all[j] = t;
        }
        return Arrays.copyOf(all, n);
    }

    private static Addend addend(double c, int... plainVariables) {
        List<Factor> f = new ArrayList<>();
        for (int v : plainVariables) {
            f.add(new Factor(v, PLAIN));
        }
        return new Addend(c, f);
    }

    /** A homogeneous scale for a whole sample, 10^[-4, 4): the bound is relative, so it must hold at any scale. */
    private static double sampleScale(SplittableRandom r) {
        return Math.pow(10, uniform(r, -4, 4));
    }

    /**
     * Constant coefficients: law i is Σ_j a_ij y_j = Σ_k b_ik x_k (sides sometimes swapped), with a well-conditioned
     * completed block (condition number below 1e3).
     */
    static Model constantAffine(SplittableRandom r) {
        while (true) {
            int p = 2 + r.nextInt(6);
            int n = 1 + r.nextInt(p);
            int q = 1 + r.nextInt(4);
            int[] completed = randomSubset(r, p, n);
            double[][] a = new double[n][p];
            for (int i = 0; i < n; i++) {
                for (int j = 0; j < p; j++) {
                    a[i][j] = r.nextInt(4) == 0 ? 0 : signed(r, 0.1, 2);
                }
            }
            double[][] blk = new double[n][n];
            for (int i = 0; i < n; i++) {
                for (int k = 0; k < n; k++) {
                    blk[i][k] = a[i][completed[k]];
                }
            }
            if (!(condition(blk) < 1e3)) {
                continue;
            }
            List<Law> laws = new ArrayList<>();
            for (int i = 0; i < n; i++) {
                List<Addend> ys = new ArrayList<>();
                for (int j = 0; j < p; j++) {
                    if (a[i][j] != 0) {
                        ys.add(addend(a[i][j], q + j));
                    }
                }
                List<Addend> xs = new ArrayList<>();
                for (int k = 0; k < q; k++) {
                    if (r.nextInt(3) != 0) {
                        xs.add(addend(signed(r, 0.1, 2), k));
                    }
                }
                boolean swap = r.nextBoolean();
                laws.add(new Law("L" + i, swap ? xs : ys, swap ? ys : xs));
            }
            Model m = new Model(q, p, laws, completed, List.of(), Tier.CONSTANT_AFFINE);
            m.sampler = (rnd, v) -> {
                double scale = sampleScale(rnd);
                for (int i = 0; i < q + p; i++) {
                    v[i] = scale * signed(rnd, 0.1, 10);
                }
            };
            return m;
        }
    }

    /**
     * Coefficients from the inputs: law i is Σ_j x[i·p + j] y_j (+ c·y_f·y_c, a coefficient from a free output) =
     * x[n·p + i] (+ a constant-coefficient term); samples whose completed block has condition number 1e3 or more are
     * drawn again.
     */
    static Model inputAffine(SplittableRandom r) {
        int p = 2 + r.nextInt(5);
        int n = 1 + r.nextInt(p);
        int q = n * p + n;
        int[] completed = randomSubset(r, p, n);
        int[] free = new int[p - n];
        for (int o = 0, k = 0; o < p; o++) {
            final int out = o;
            if (Arrays.stream(completed).noneMatch(c -> c == out)) {
                free[k++] = o;
            }
        }
        List<Law> laws = new ArrayList<>();
        for (int i = 0; i < n; i++) {
            List<Addend> lhs = new ArrayList<>();
            for (int j = 0; j < p; j++) {
                final int out = j;
                if (r.nextInt(4) != 0 || Arrays.stream(completed).anyMatch(c -> c == out)) {
                    lhs.add(addend(1, i * p + j, q + j));
                }
            }
            if (free.length > 0 && r.nextBoolean()) {
                lhs.add(addend(signed(r, 0.1, 1), q + free[r.nextInt(free.length)], q + completed[r.nextInt(n)]));
            }
            List<Addend> rhs = new ArrayList<>();
            rhs.add(addend(1, n * p + i));
            if (r.nextBoolean()) {
                rhs.add(addend(signed(r, 0.1, 2), q + r.nextInt(p)));
            }
            laws.add(new Law("L" + i, lhs, rhs));
        }
        Model m = new Model(q, p, laws, completed, List.of(), Tier.AFFINE);
        m.sampler = (rnd, v) -> {
            double scale = sampleScale(rnd);
            do {
                for (int i = 0; i < q; i++) {
                    v[i] = signed(rnd, 0.2, 2);
                }
                for (int j = 0; j < p; j++) {
                    v[q + j] = scale * signed(rnd, 0.1, 10);
                }
                for (int i = 0; i < n; i++) {
                    v[n * p + i] *= scale;
                }
            } while (!(condition(block(m, v)) < 1e3));
            for (int k : completed) {
                v[q + k] = 0;
            }
        };
        return m;
    }

    /**
     * Nonlinear in the completed outputs: law i is D_i·y[c_i] + (squares, products, exp and log of completed and free
     * outputs, input-weighted squares) = x[i], with D_i large enough that ∂C/∂y_c is diagonally dominant wherever the
     * completed outputs lie in [0.4, 2.5]. A sample draws the intended root y* in [0.6, 1.9], computes x[i] from it,
     * and puts the guess inputs x[n + k] within 3% of y*, so {@code guess y[c_k] = x[n + k]} starts Newton near it.
     */
    static Model nonlinear(SplittableRandom r) {
        int p = 1 + r.nextInt(5);
        int n = 1 + r.nextInt(Math.min(p, 4));
        int coefficients = 2;
        int q = 2 * n + coefficients;
        int[] completed = randomSubset(r, p, n);
        int[] free = new int[p - n];
        for (int o = 0, k = 0; o < p; o++) {
            final int out = o;
            if (Arrays.stream(completed).noneMatch(c -> c == out)) {
                free[k++] = o;
            }
        }
        List<Law> laws = new ArrayList<>();
        for (int i = 0; i < n; i++) {
            List<Addend> terms = new ArrayList<>();
            double dominance = 1;
            int count = 2 + r.nextInt(3);
            for (int t = 0; t < count; t++) {
                double c = signed(r, 0.1, 1);
                int a = q + completed[r.nextInt(n)];
                int b = q + completed[r.nextInt(n)];
                int kind = r.nextInt(free.length > 0 ? 8 : 5);
                if (t == 0 && kind > 4) {
                    kind = 0;
                }
                switch (kind) {
                    case 0:
                        terms.add(new Addend(c, List.of(new Factor(a, SQUARE))));
                        dominance += 5 * Math.abs(c);
                        break;
                    case 1:
                        terms.add(addend(c, a, b));
                        dominance += 5 * Math.abs(c);
                        break;
                    case 2:
                        terms.add(new Addend(c, List.of(new Factor(a, EXP))));
                        dominance += 12.2 * Math.abs(c);
                        break;
                    case 3:
                        terms.add(new Addend(c, List.of(new Factor(a, LOG))));
                        dominance += 2.5 * Math.abs(c);
                        break;
                    case 4:
                        terms.add(new Addend(c, List.of(new Factor(2 * n + r.nextInt(coefficients), PLAIN),
                                new Factor(a, SQUARE))));
                        dominance += 10 * Math.abs(c);
                        break;
                    case 5:
                        terms.add(addend(c, q + free[r.nextInt(free.length)], a));
                        dominance += 2 * Math.abs(c);
                        break;
                    case 6:
                        terms.add(new Addend(c, List.of(new Factor(q + free[r.nextInt(free.length)], SQUARE))));
                        break;
                    default:
                        terms.add(new Addend(c, List.of(new Factor(q + free[r.nextInt(free.length)], EXP))));
                        break;
                }
            }
            List<Addend> lhs = new ArrayList<>();
            lhs.add(addend((r.nextBoolean() ? 1 : -1) * uniform(r, dominance, 1.5 * dominance), q + completed[i]));
            lhs.addAll(terms);
            laws.add(new Law("N" + i, lhs, List.of(addend(1, i))));
        }
        List<String> guesses = new ArrayList<>();
        for (int k = 0; k < n; k++) {
            guesses.add("guess y[" + completed[k] + "] = x[" + (n + k) + "]");
        }
        Model m = new Model(q, p, laws, completed, guesses, Tier.NONLINEAR);
        m.sampler = (rnd, v) -> {
            for (int j = 0; j < p; j++) {
                v[q + j] = uniform(rnd, 0.6, 1.9);
            }
            for (int c = 0; c < coefficients; c++) {
                v[2 * n + c] = uniform(rnd, 0.5, 2);
            }
            for (int i = 0; i < n; i++) {
                double[] lhs = {0, 0};
                for (Addend a : laws.get(i).lhs()) {
                    lhs = plus(lhs, exact(a, v));
                }
                v[i] = lhs[0] + lhs[1];
            }
            for (int k = 0; k < n; k++) {
                v[n + k] = v[q + completed[k]] * (1 + uniform(rnd, -0.03, 0.03));
            }
        };
        return m;
    }


    /**
     * The residual of {@code law} at the variables {@code v} in double-double, its natural scale (the sum of the
     * addends' magnitudes) and what the documented bound allows for it: (d + 3)·2⁻⁵³·scale for the computed residual,
     * plus the rounding of each addend's products (which the exact residual does not have), the final rounding of the
     * compensated sum and the double-double error of this evaluation.
     *
     * @return {residual, scale, allowance}
     */
    static double[] exactCheck(Law law, double[] v, int depth) {
        double[] r = {0, 0};
        double scale = 0;
        double rounding = 0;
        int addends = 0;
        for (int side = 0; side < 2; side++) {
            for (Addend a : side == 0 ? law.lhs() : law.rhs()) {
                double[] e = exact(a, v);
                r = plus(r, side == 0 ? e : new double[] {-e[0], -e[1]});
                scale += Math.abs(e[0]);
                rounding += a.products() * Math.abs(e[0]);
                addends++;
            }
        }
        double residual = r[0] + r[1];
        double bound = ((depth + 3) * scale + rounding) * U * (1 + 1e-9) + Math.abs(residual) * U
                + 8 * addends * U * U * scale;
        return new double[] {residual, scale, bound};
    }


    // ---- the models mean what they say -----------------------------------------------------------------------

    /** At random points (not solutions), the library's residual and scale agree with the model's own evaluation. */
    private static void checkAgainstLibrary(Model m, SplittableRandom r) {
        LawSet laws = m.lawSet();
        ExpandedLaws expanded = laws.expand();
        LawEvaluator ev = laws.evaluator();
        assertEquals(m.laws.size(), ev.lawCount());
        int batch = 20;
        double[] x = new double[batch * m.q];
        double[] y = new double[batch * m.p];
        double[][] drawn = m.batch(r, batch);
        for (int s = 0; s < batch; s++) {
            System.arraycopy(drawn[2], s * (m.q + m.p), x, s * m.q, m.q);
            for (int o = 0; o < m.p; o++) {
                y[s * m.p + o] = uniform(r, 0.5, 2);
            }
        }
        double[] residual = new double[batch * ev.lawCount()];
        double[] scale = new double[batch * ev.lawCount()];
        ev.residuals(x, y, batch, residual, scale);
        double[] v = new double[m.q + m.p];
        for (int s = 0; s < batch; s++) {
            System.arraycopy(x, s * m.q, v, 0, m.q);
            System.arraycopy(y, s * m.p, v, m.q, m.p);
            for (int i = 0; i < m.laws.size(); i++) {
                double[] check = exactCheck(m.laws.get(i), v, expanded.roundingDepth(i));
                int at = s * ev.lawCount() + i;
                assertEquals(check[1], scale[at], 1e-13 * check[1], "scale of law " + i + "\n" + m.text());
                // the computed residual is the exact one up to the rounding the allowance accounts for
                assertEquals(check[0], residual[at], check[2], "residual of law " + i + "\n" + m.text());
            }
        }
    }

    @Test
    void generatedLawTextMeansWhatTheModelSays() {
        trials("models vs library", 0x30DE1L, 30, r -> {
            checkAgainstLibrary(constantAffine(r), r);
            checkAgainstLibrary(inputAffine(r), r);
            checkAgainstLibrary(nonlinear(r), r);
        });
    }

    @Test
    void nonlinearSamplesCarryARootOfTheirLaws() {
        trials("nonlinear roots", 0x30DE2L, 30, r -> {
            Model m = nonlinear(r);
            double[][] drawn = m.batch(r, 10);
            double[] v = new double[m.q + m.p];
            for (int s = 0; s < 10; s++) {
                System.arraycopy(drawn[2], s * (m.q + m.p), v, 0, m.q + m.p);
                for (Law law : m.laws) {
                    double[] check = exactCheck(law, v, 0);
                    // x[i] was rounded once from the exact left side
                    assertTrue(Math.abs(check[0]) <= 2 * U * check[1], "intended root of " + law.name());
                }
            }
        });
    }
}
