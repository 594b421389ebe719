package dev.lawful.algebra;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.Collections;
import java.util.List;
import java.util.Map;

/**
 * A law set expanded into scalar laws: one residual {@code C_i(x, y) = lhs - rhs} per law element, as a
 * {@link Term} over one variable space (inputs {@code 0 .. inputWidth-1}, then outputs), in coherent SI units.
 * Holds each law's sparsity (which inputs and outputs it involves). Safe to share: the term pool it reads
 * synchronises its own entry points.
 */
public final class ExpandedLaws {
    private final LawSet laws;
    private final TermPool pool;
    private final List<Expander.ScalarLaw> scalar;
    private final String[] variableNames;
    private final int[][] outputs;
    private final int[][] inputs;
    private final Expander expander;
    private final List<ScalarLimit> limits;
    private volatile LawEvaluator limitEvaluator;

    ExpandedLaws(LawSet laws, TermPool pool, List<Expander.ScalarLaw> scalar, List<ScalarLimit> limits,
                 String[] variableNames, Expander expander) {
        this.laws = laws;
        this.limits = List.copyOf(limits);
        this.expander = expander;
        this.pool = pool;
        this.scalar = List.copyOf(scalar);
        this.variableNames = variableNames;
        this.outputs = new int[scalar.size()][];
        this.inputs = new int[scalar.size()][];
        int nIn = laws.inputWidth();
        for (int i = 0; i < scalar.size(); i++) {
            int[] vars = scalar.get(i).residual().variables();
            inputs[i] = Arrays.stream(vars).filter(v -> v < nIn).toArray();
            outputs[i] = Arrays.stream(vars).filter(v -> v >= nIn).map(v -> v - nIn).toArray();
        }
    }

    /** @return the law set this was expanded from */
    public LawSet lawSet() {
        return laws;
    }

    /** @return the number of scalar laws (a vector law of length k counts k) */
    public int size() {
        return scalar.size();
    }

    /** @return the number of input elements */
    public int inputWidth() {
        return laws.inputWidth();
    }

    /** @return the number of output elements */
    public int outputWidth() {
        return laws.outputWidth();
    }

    /** @return the name of scalar law {@code i}: the law's name, or {@code name[k]} for element k of a vector law */
    public String name(int i) {
        return scalar.get(i).name();
    }

    /** @return the declared law that scalar law {@code i} belongs to */
    public Declaration.Law law(int i) {
        return scalar.get(i).law();
    }

    /**
     * @return the unit scalar law {@code i} is reported in; residuals and scales are computed in coherent SI units,
     *         so a residual in this unit is {@code residual / unit(i).factor()}
     */
    public Unit unit(int i) {
        return laws.lawUnit(scalar.get(i).law().name());
    }

    /** @return the residual lhs - rhs of scalar law {@code i}, in coherent SI units of the law's dimension */
    public Term residual(int i) {
        return scalar.get(i).residual();
    }

    /**
     * @return the top-level terms of the residual of law {@code i} (the addends of its flat sum)
     */
    public List<Term> terms(int i) {
        Term r = residual(i);
        return r.kind() == Term.Kind.SUM ? List.of(r.args()) : List.of(r);
    }

    /**
     * @return the natural scale of law {@code i} as a term: the sum of the magnitudes of its addends once
     *         products are distributed over sums (see {@link LawEvaluator}); residuals are judged against it
     */
    public Term scale(int i) {
        return pool.magnitude(residual(i));
    }

    /**
     * @return how many rounded operations (products, quotients, powers, functions) the deepest addend of law
     *         {@code i} passes through; evaluating the residual in double is then accurate to
     *         (depth + 1)·2⁻⁵³·scale
     */
    public int roundingDepth(int i) {
        return pool.roundingDepth(residual(i));
    }

    /** @return the sorted output element indices law {@code i} involves */
    public int[] outputs(int i) {
        return outputs[i].clone();
    }

    /** @return the sorted input element indices law {@code i} involves */
    public int[] inputs(int i) {
        return inputs[i].clone();
    }

    /** @return the nonzero partial derivatives of law {@code i}'s residual, keyed by variable index */
    public Map<Integer, Term> gradient(int i) {
        return residual(i).gradient();
    }

    /** @return the name of variable {@code v}: {@code name} or {@code name[k]} (inputs first, then outputs) */
    public String variableName(int v) {
        return variableNames[v];
    }

    /** @return every variable's name, inputs then outputs */
    public List<String> variableNames() {
        return Collections.unmodifiableList(Arrays.asList(variableNames));
    }

    /**
     * @param element an element name as in {@link #variableName(int)}, such as {@code out[2]} or {@code T}
     * @return its variable index
     * @throws IllegalArgumentException naming the nearest known element when there is none of that name
     */
    public int variable(String element) {
        for (int v = 0; v < variableNames.length; v++) {
            if (variableNames[v].equals(element)) {
                return v;
            }
        }
        String near = Names.nearest(element, Arrays.asList(variableNames));
        throw new IllegalArgumentException("no input or output element '" + element + "'"
                + (near == null ? "" : "; did you mean '" + near + "'?"));
    }

    /**
     * @param name a definition ({@code let}) of the law set
     * @return its elements as scalar terms (one for a scalar definition)
     * @throws IllegalArgumentException when there is no such definition
     */
    public List<Term> definition(String name) {
        if (laws.definitions().stream().noneMatch(d -> d.name().equals(name))) {
            throw new IllegalArgumentException("no definition named '" + name + "'");
        }
        return List.of(expander.definition(name));
    }

    /** @return 0 when definition {@code name} is a scalar, else its length */
    public int definitionShape(String name) {
        definition(name);
        return expander.definitionShape(name);
    }

    /**
     * @return the starting value Newton uses for each output element that has a {@code guess}, keyed by output
     *         element index, as a term over the variables (in the output's declared unit)
     */
    public Map<Integer, Term> guesses() {
        return java.util.Collections.unmodifiableMap(expander.guesses());
    }

    // ---- limits ----------------------------------------------------------------------------------------------

    /** @return the number of scalar limits (a vector limit of length k counts k, a two-sided one twice that) */
    public int limitCount() {
        return limits.size();
    }

    /**
     * @param j a scalar limit index, {@code 0 <= j < limitCount()}: limits in declaration order, element by element,
     *          and the lower piece of a two-sided limit before its upper piece
     * @return scalar limit {@code j}: its value g (g &ge; 0 inside), unit, outputs and, where it is a plain bound
     *         on one output, that output and bound
     * @throws IndexOutOfBoundsException when there is no such scalar limit
     */
    public ScalarLimit limit(int j) {
        return limits.get(j);
    }

    /**
     * Compiles the values g of every scalar limit, their natural scales and their Jacobians, compiled once and then
     * shared. Its "laws" are the scalar limits in {@link #limit(int)} order, named as they are; values are in coherent
     * SI units (divide by {@link ScalarLimit#unit()}'s factor to report them); the Jacobian entries dg/dy and dg/dx
     * follow the layout of a law evaluator ({@link LawEvaluator#outputColumns(int)},
     * {@link LawEvaluator#inputColumns(int)}).
     *
     * @return the evaluator of the scalar limits (with no laws when there are no limits)
     */
    public LawEvaluator limitEvaluator() {
        LawEvaluator e = limitEvaluator;
        if (e == null) {
            synchronized (this) {
                e = limitEvaluator;
                if (e == null) {
                    List<Term> values = new ArrayList<>(limits.size());
                    List<String> names = new ArrayList<>(limits.size());
                    for (ScalarLimit l : limits) {
                        values.add(l.value());
                        names.add(l.name());
                    }
                    e = LawEvaluator.forTerms(this, values, names, true);
                    limitEvaluator = e;
                }
            }
        }
        return e;
    }

    TermPool pool() {
        return pool;
    }

    /** @return names of the output elements law {@code i} involves, as {@code name} or {@code name[k]} */
    public List<String> outputNames(int i) {
        List<String> names = new ArrayList<>();
        for (int k : outputs[i]) {
            names.add(variableNames[laws.inputWidth() + k]);
        }
        return names;
    }
}
