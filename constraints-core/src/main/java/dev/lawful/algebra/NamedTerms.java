package dev.lawful.algebra;

import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.concurrent.atomic.AtomicReferenceArray;

/**
 * Named scalar terms of one law set and what an evaluator stores for each: its value, its natural scale
 * ({@link TermPool#magnitude}) and the entries of its {@link JacobianPattern}. The terms may be anything over the
 * law set's variables: laws' residuals, guesses, or any other relation whose values and derivatives are wanted.
 *
 * <p>Scales and derivatives are built the first time a program needs them, since many evaluations never ask
 * for the Jacobian. Safe to share between threads: two threads may build the same roots, and one list wins.
 */
final class NamedTerms {
    private final TermPool pool;
    private final int inputWidth;
    private final int outputWidth;
    private final List<Term> terms;
    private final String[] names;
    /** The scale of each term given up front, or null to build them from the terms on demand. */
    private final List<Term> scales;
    private final JacobianPattern pattern;
    private final AtomicReferenceArray<List<Program.Root>> roots = new AtomicReferenceArray<>(Program.TARGETS);

    private NamedTerms(ExpandedLaws e, List<Term> terms, String[] names, List<Term> scales, JacobianPattern pattern) {
        this.pool = e.pool();
        this.inputWidth = e.inputWidth();
        this.outputWidth = e.outputWidth();
        this.terms = List.copyOf(terms);
        this.names = names;
        this.scales = scales == null ? null : List.copyOf(scales);
        this.pattern = pattern;
    }

    /**
     * @param e the scalar laws
     * @return their residuals, named as the laws, with every entry of the Jacobian each law involves
     */
    static NamedTerms ofLaws(ExpandedLaws e) {
        List<Term> residuals = new ArrayList<>(e.size());
        String[] names = new String[e.size()];
        int[][] outputs = new int[e.size()][];
        int[][] inputs = new int[e.size()][];
        for (int i = 0; i < e.size(); i++) {
            residuals.add(e.residual(i));
            names[i] = e.name(i);
            outputs[i] = e.outputs(i);
            inputs[i] = e.inputs(i);
        }
        return new NamedTerms(e, residuals, names, null, JacobianPattern.of(outputs, inputs));
    }

    /**
     * Arbitrary terms of a law set. Their scales are built at once (a term too large to take its magnitude of
     * fails here rather than at its first evaluation); their derivatives when first asked for.
     *
     * @param e         the law set the terms belong to
     * @param terms     the terms, in the order their results are stored per sample
     * @param names     one name per term
     * @param jacobians whether to store the entries of every variable each term depends on; without, the terms
     *                  have no Jacobian entries
     * @throws IllegalArgumentException when the counts differ or a term belongs to another law set
     */
    static NamedTerms of(ExpandedLaws e, List<Term> terms, List<String> names, boolean jacobians) {
        if (terms.size() != names.size()) {
            throw new IllegalArgumentException("one name per term: " + terms.size() + " terms, " + names.size()
                    + " names");
        }
        List<Term> scales = new ArrayList<>(terms.size());
        for (int i = 0; i < terms.size(); i++) {
            Term t = terms.get(i);
            if (t.pool != e.pool()) {
                throw new IllegalArgumentException("term " + i + " belongs to another law set");
            }
            scales.add(e.pool().magnitude(t));
        }
        JacobianPattern pattern = jacobians ? JacobianPattern.ofVariables(terms, e.inputWidth())
                : JacobianPattern.none(terms.size());
        return new NamedTerms(e, terms, names.toArray(new String[0]), scales, pattern);
    }

    TermPool pool() {
        return pool;
    }

    int inputWidth() {
        return inputWidth;
    }

    int outputWidth() {
        return outputWidth;
    }

    /** @return the number of terms */
    int size() {
        return terms.size();
    }

    /** @return the name of term {@code i} */
    String name(int i) {
        return names[i];
    }

    JacobianPattern pattern() {
        return pattern;
    }

    /** @return per target ({@link Program#VALUE} ..), the results stored per sample */
    int[] slots() {
        return new int[] {size(), size(), pattern.outputNonzeros(), pattern.inputNonzeros()};
    }

    /**
     * @param target {@link Program#VALUE}, {@link Program#SCALE}, {@link Program#JACOBIAN_Y} or
     *               {@link Program#JACOBIAN_X}
     * @return the roots storing every result of {@code target}, in slot order, built on first use
     * @throws LawException when the derivatives grow beyond {@link Limits#MAX_SCALAR_NODES}
     */
    List<Program.Root> roots(int target) {
        List<Program.Root> r = roots.get(target);
        if (r == null) {
            try {
                roots.compareAndSet(target, null, List.copyOf(build(target)));
            } catch (TermPool.TooLarge tooLarge) {
                Diagnostics d = new Diagnostics(new SourceText("<derivatives>", ""));
                d.error(new Span(0, 0), "the derivatives of the law set need more than " + Limits.MAX_SCALAR_NODES
                        + " scalar expression nodes; split the law set or use fewer vector elements");
                throw new LawException(d.all(), 0);
            }
            r = roots.get(target);
        }
        return r;
    }

    private List<Program.Root> build(int target) {
        List<Program.Root> built = new ArrayList<>();
        for (int i = 0; i < terms.size(); i++) {
            if (target == Program.VALUE) {
                built.add(new Program.Root(terms.get(i), Program.VALUE, i));
            } else if (target == Program.SCALE) {
                Term scale = scales != null ? scales.get(i) : pool.magnitude(terms.get(i));
                built.add(new Program.Root(scale, Program.SCALE, i));
            } else {
                derivatives(i, target, built);
            }
        }
        return built;
    }

    /** Adds the roots of term {@code i}'s entries of {@code target}, zero where the derivative vanishes. */
    private void derivatives(int i, int target, List<Program.Root> built) {
        boolean byOutput = target == Program.JACOBIAN_Y;
        int from = byOutput ? pattern.outputOffset(i) : pattern.inputOffset(i);
        int to = byOutput ? pattern.outputOffset(i + 1) : pattern.inputOffset(i + 1);
        if (from == to) {
            return;
        }
        Map<Integer, Term> gradient = terms.get(i).gradient();
        Term zero = pool.constant(0);
        for (int k = from; k < to; k++) {
            int variable = byOutput ? inputWidth + pattern.outputColumn(k) : pattern.inputColumn(k);
            built.add(new Program.Root(gradient.getOrDefault(variable, zero), target, k));
        }
    }
}
