package dev.lawful.enforce.plan;

import dev.lawful.algebra.Declaration;
import dev.lawful.algebra.ExpandedLaws;
import dev.lawful.algebra.Expr;
import dev.lawful.algebra.LawEvaluator;
import dev.lawful.algebra.LawSet;
import dev.lawful.algebra.ScalarLimit;
import dev.lawful.algebra.Term;
import dev.lawful.enforce.Tier;
import dev.lawful.enforce.linear.DenseLu;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Set;
import java.util.SplittableRandom;

/**
 * Makes a {@link CompletionPlan}: checks the laws at the reference point, chooses or checks the completed outputs,
 * classifies the tier, orders the solve, factors the constant blocks and folds a constant-affine set. Every refusal
 * is a {@link dev.lawful.algebra.LawException} that names the laws or outputs involved and says what to change.
 */
public final class CompletionPlanner {
    /** Condition number from which a completed block counts as singular. */
    private static final double SINGULAR_CONDITION = 1e15;
    private static final long START_SEED = 0x5EED3L;
    /** Linearise-and-project steps per sample outside a limit: one suffices for affine dependence on z. */
    private static final int LIMIT_ITERATIONS = 20;

    /**
     * What the user asked for.
     *
     * @param completedNames the completed output elements, or null for the law text's choice (or automatic)
     * @param automatic      choose automatically even when the law text has a {@code complete} statement
     * @param allowed        output elements the automatic choice may use, or null for all
     * @param maxIterations  Newton's iteration cap
     * @param reference      the reference point, or null for {@link ReferencePoint#generic(LawSet)}
     * @param limitScales    per output, its typical size for the limits' metric, or null for 1 of each declared unit
     */
    public record Request(String[] completedNames, boolean automatic, String[] allowed, int maxIterations,
            ReferencePoint reference, double[] limitScales) {
    }

    private final LawSet laws;
    private final ExpandedLaws expanded;
    private final LawEvaluator evaluator;
    private final int n;
    private final int nIn;
    private final List<String> notes = new ArrayList<>();

    private CompletionPlanner(LawSet laws) {
        this.laws = laws;
        this.expanded = laws.expand();
        this.evaluator = laws.evaluator();
        this.n = expanded.size();
        this.nIn = laws.inputWidth();
    }

    /**
     * @param laws    the law set
     * @param request the user's choices
     * @return the plan
     * @throws dev.lawful.algebra.LawException when the choice is impossible: no laws, wrong number of completed
     *         outputs, an output no law involves, dependent laws, a singular block, or a guess that uses a completed
     *         output
     */
    public static CompletionPlan plan(LawSet laws, Request request) {
        return new CompletionPlanner(laws).plan(request);
    }

    private CompletionPlan plan(Request request) {
        if (n == 0) {
            throw laws.problem(null, "the law set has no laws, so there is nothing to complete");
        }
        ReferencePoint reference = request.reference() != null ? request.reference() : ReferencePoint.generic(laws);
        OutputChoice choice = new OutputChoice(laws, reference);
        choice.requireIndependentLaws();
        Declaration about = request.completedNames() == null && !request.automatic()
                ? laws.completion().orElse(null) : null;
        int[] chosen = choose(request, choice);
        if (chosen.length != n) {
            throw laws.problem(about, "the laws give " + n + " scalar equation" + (n == 1 ? "" : "s") + " but "
                    + chosen.length + " output" + (chosen.length == 1 ? " is" : "s are") + " completed; complete"
                    + " exactly " + n + " (one per scalar law)");
        }
        Roles roles = Roles.of(chosen, laws.outputWidth());
        requireInvolved(roles.completed(), about);
        double condition = checkCondition(choice, roles.completed(), about);
        Tier tier = classify(roles.completed());
        int[] boundFactor = new int[n];
        for (int i = 0; i < n; i++) {
            boundFactor[i] = expanded.roundingDepth(i) + 3;
        }
        EntryMaps entries = EntryMaps.of(evaluator, roles.role());
        NewtonStart start = newtonStart(roles);
        Stages stages = Stages.of(expanded, roles.role(), entries.entryLaw(), entries.entryRole());
        if (tier == Tier.NONLINEAR) {
            noteMissingGuesses(stages, roles.completed(), start.target());
        }
        boolean constantBlock = tier == Tier.CONSTANT_AFFINE || (tier == Tier.AFFINE && blockIsConstant(roles));
        ConstantBlocks blocks = constantBlock ? factorBlocks(stages, roles.completed(), choice.jacobian) : null;
        Fold fold = tier == Tier.CONSTANT_AFFINE
                ? ConstantAffineFold.fold(evaluator, roles, entries, stages, blocks, choice.jacobian) : null;
        return new CompletionPlan(laws, expanded, evaluator, roles, tier, condition, List.copyOf(notes), boundFactor,
                entries, stages, blocks, fold, start, request.maxIterations(), limits(request.limitScales()));
    }

    /** @return the limits of the law set, or null when it has none */
    private LimitPlan limits(double[] scales) {
        int m = expanded.limitCount();
        if (m == 0) {
            return null;
        }
        int p = laws.outputWidth();
        if (scales != null && scales.length != p) {
            throw new IllegalArgumentException("limitScales needs one size per output element (" + p + "), found "
                    + scales.length);
        }
        double[] s = new double[p];
        for (int o = 0; o < p; o++) {
            s[o] = scales == null ? 1 : scales[o];
            if (!(s[o] > 0) || Double.isInfinite(s[o])) {
                throw new IllegalArgumentException("limitScales: the size of output " + laws.outputNames().get(o)
                        + " must be positive and finite, found " + s[o]);
            }
        }
        List<String> names = new ArrayList<>();
        int[] single = new int[m];
        double[] bound = new double[m];
        boolean[] lower = new boolean[m];
        for (int j = 0; j < m; j++) {
            ScalarLimit l = expanded.limit(j);
            names.add(l.name());
            single[j] = Double.isFinite(l.bound()) ? l.singleOutput() : -1;
            bound[j] = l.bound();
            lower[j] = l.lower();
        }
        return new LimitPlan(expanded.limitEvaluator(), List.copyOf(names), single, bound, lower, s,
                LIMIT_ITERATIONS);
    }

    /** @return the completed outputs: the request's, the law text's, or the automatic choice (with a note) */
    private int[] choose(Request request, OutputChoice choice) {
        if (request.completedNames() != null) {
            return indices(request.completedNames(), "completed output");
        }
        if (!request.automatic() && laws.completion().isPresent()) {
            return laws.completedOutputs();
        }
        int[] allowed = request.allowed() == null ? range(laws.outputWidth())
                : indices(request.allowed(), "allowed output");
        int[] chosen = choice.automatic(allowed);
        notes.add("completed outputs chosen automatically: " + String.join(", ", names(chosen)));
        return chosen;
    }

    private void requireInvolved(int[] completed, Declaration about) {
        Set<Integer> involved = new HashSet<>();
        for (int i = 0; i < n; i++) {
            for (int o : expanded.outputs(i)) {
                involved.add(o);
            }
        }
        for (int o : completed) {
            if (!involved.contains(o)) {
                throw laws.problem(about, "completed output " + laws.outputNames().get(o) + " is not involved in any"
                        + " law, so no law can determine it; complete an output that a law involves");
            }
        }
    }

    /** @return the condition number of the completed block; refuses a singular one and notes an ill-conditioned one */
    private double checkCondition(OutputChoice choice, int[] completed, Declaration about) {
        double condition = choice.condition(completed);
        if (!(condition < SINGULAR_CONDITION)) {
            String auto;
            try {
                auto = String.join(", ", names(choice.automatic(range(laws.outputWidth()))));
            } catch (RuntimeException e) {
                auto = null;
            }
            throw laws.problem(about, "the completed outputs " + String.join(", ", names(completed)) + " make the"
                    + " laws singular at the reference point (no law system for them has a unique solution)"
                    + (auto == null ? "" : "; a well-conditioned choice is: complete " + auto));
        }
        if (condition > OutputChoice.WARN_CONDITION) {
            notes.add(String.format(Locale.ROOT, "the completed outputs are ill-conditioned (condition number %.3g >"
                    + " %.0e): errors of the free outputs are amplified; consider the automatic choice", condition,
                    OutputChoice.WARN_CONDITION));
        }
        return condition;
    }

    /**
     * @return NONLINEAR when a derivative with respect to a completed output uses a completed output,
     *         CONSTANT_AFFINE when every derivative is a constant, AFFINE otherwise
     */
    private Tier classify(int[] completed) {
        Set<Integer> completedVars = variables(completed);
        boolean allConstant = true;
        for (int i = 0; i < n; i++) {
            for (Map.Entry<Integer, Term> e : expanded.gradient(i).entrySet()) {
                Term d = e.getValue();
                if (d.kind() != Term.Kind.CONST) {
                    allConstant = false;
                }
                if (completedVars.contains(e.getKey()) && uses(d, completedVars)) {
                    return Tier.NONLINEAR;
                }
            }
        }
        return allConstant ? Tier.CONSTANT_AFFINE : Tier.AFFINE;
    }

    private boolean blockIsConstant(Roles roles) {
        for (int i = 0; i < n; i++) {
            for (Map.Entry<Integer, Term> e : expanded.gradient(i).entrySet()) {
                int v = e.getKey() - nIn;
                if (v >= 0 && roles.role()[v] >= 0 && e.getValue().kind() != Term.Kind.CONST) {
                    return false;
                }
            }
        }
        return true;
    }

    /** @return the guesses of the completed outputs and the generic starting values */
    private NewtonStart newtonStart(Roles roles) {
        Set<Integer> completedVars = variables(roles.completed());
        List<Term> guessTerms = new ArrayList<>();
        List<String> guessNames = new ArrayList<>();
        List<Integer> targets = new ArrayList<>();
        for (Map.Entry<Integer, Term> e : expanded.guesses().entrySet()) {
            if (roles.role()[e.getKey()] < 0) {
                continue;
            }
            for (int v : e.getValue().variables()) {
                if (completedVars.contains(v)) {
                    throw laws.problem(guessFor(e.getKey()), "the guess for " + laws.outputNames().get(e.getKey())
                            + " uses the completed output " + expanded.variableName(v) + "; a guess may use inputs,"
                            + " constants and free outputs only");
                }
            }
            guessTerms.add(e.getValue());
            guessNames.add(laws.outputNames().get(e.getKey()));
            targets.add(roles.role()[e.getKey()]);
        }
        LawEvaluator guesses = guessTerms.isEmpty() ? null : LawEvaluator.forTerms(expanded, guessTerms, guessNames);
        // without a guess: generic values, different per output, so Newton never starts on a symmetric point
        // (equal velocities in a collision) where the laws are degenerate
        return new NewtonStart(guesses, targets.stream().mapToInt(Integer::intValue).toArray(), startValues(n));
    }

    /** Notes the completed outputs of stages nonlinear in their own outputs that Newton starts without a guess. */
    private void noteMissingGuesses(Stages stages, int[] completed, int[] guessTargets) {
        Set<Integer> guessed = new HashSet<>();
        for (int k : guessTargets) {
            guessed.add(k);
        }
        List<String> missing = new ArrayList<>();
        for (Stages.Stage st : stages.stages()) {
            if (!stageIsNonlinear(st, completed)) {
                continue;
            }
            for (int k : st.vars()) {
                if (!guessed.contains(k)) {
                    missing.add(laws.outputNames().get(completed[k]));
                }
            }
        }
        if (!missing.isEmpty()) {
            notes.add("nonlinear laws: Newton starts " + String.join(", ", missing) + " at fixed values between"
                    + " 0.5 and 1.5 (in the declared unit); add a 'guess' statement to pick the root and speed"
                    + " convergence");
        }
    }

    /** @return whether some law of the stage has a derivative, with respect to a stage output, that uses one */
    private boolean stageIsNonlinear(Stages.Stage st, int[] completed) {
        Set<Integer> vars = new HashSet<>();
        for (int k : st.vars()) {
            vars.add(nIn + completed[k]);
        }
        for (int i : st.laws()) {
            for (Map.Entry<Integer, Term> e : expanded.gradient(i).entrySet()) {
                if (vars.contains(e.getKey()) && uses(e.getValue(), vars)) {
                    return true;
                }
            }
        }
        return false;
    }

    /** Factors every stage's block and the whole block A from the (constant) Jacobian at the reference point. */
    private ConstantBlocks factorBlocks(Stages stages, int[] completed, double[] jacobian) {
        int nOut = laws.outputWidth();
        double[][] stageLu = new double[stages.count()][];
        int[][] stagePivot = new int[stages.count()][];
        for (int g = 0; g < stages.count(); g++) {
            Stages.Stage st = stages.get(g);
            int m = st.size();
            stageLu[g] = new double[m * m];
            stagePivot[g] = new int[m];
            for (int j = 0; j < m; j++) {
                for (int k = 0; k < m; k++) {
                    stageLu[g][j * m + k] = jacobian[st.laws()[j] * nOut + completed[st.vars()[k]]];
                }
            }
            factor(stageLu[g], m, stagePivot[g]);
        }
        double[] wholeLu = new double[n * n];
        for (int i = 0; i < n; i++) {
            for (int k = 0; k < n; k++) {
                wholeLu[i * n + k] = jacobian[i * nOut + completed[k]];
            }
        }
        int[] wholePivot = new int[n];
        factor(wholeLu, n, wholePivot);
        return new ConstantBlocks(stageLu, stagePivot, wholeLu, wholePivot);
    }

    private static void factor(double[] a, int m, int[] pivot) {
        if (!DenseLu.factor(a, m, pivot)) {
            throw new AssertionError("a block with finite condition number did not factor");
        }
    }

    private Declaration guessFor(int output) {
        String name = laws.outputNames().get(output);
        for (Declaration d : laws.declarations()) {
            if (d instanceof Declaration.Guess g) {
                Expr t = g.target();
                String base = t instanceof Expr.Name nm ? nm.name() : t instanceof Expr.Index ix ? ix.name()
                        : ((Expr.Slice) t).name();
                if (name.equals(base) || name.startsWith(base + "[")) {
                    return d;
                }
            }
        }
        return null;
    }

    private int[] indices(String[] elements, String what) {
        List<String> names = laws.outputNames();
        int[] out = new int[elements.length];
        Set<Integer> seen = new HashSet<>();
        for (int i = 0; i < elements.length; i++) {
            int o = names.indexOf(elements[i].replace(" ", ""));
            if (o < 0) {
                throw laws.problem(null, "no output element '" + elements[i] + "' for the " + what + "; the outputs"
                        + " are " + String.join(", ", names));
            }
            if (!seen.add(o)) {
                throw laws.problem(null, "output " + elements[i] + " is named twice as " + what);
            }
            out[i] = o;
        }
        return out;
    }

    private List<String> names(int[] outputs) {
        List<String> all = laws.outputNames();
        List<String> out = new ArrayList<>(outputs.length);
        for (int o : outputs) {
            out.add(all.get(o));
        }
        return out;
    }

    private Set<Integer> variables(int[] outputs) {
        Set<Integer> vars = new HashSet<>();
        for (int o : outputs) {
            vars.add(nIn + o);
        }
        return vars;
    }

    private static boolean uses(Term t, Set<Integer> vars) {
        for (int v : t.variables()) {
            if (vars.contains(v)) {
                return true;
            }
        }
        return false;
    }

    /** Newton's generic starting values: fixed pseudo-random values in [0.5, 1.5) of each output's declared unit. */
    private static double[] startValues(int count) {
        SplittableRandom random = new SplittableRandom(START_SEED);
        double[] v = new double[count];
        for (int i = 0; i < count; i++) {
            v[i] = 0.5 + random.nextDouble();
        }
        return v;
    }

    private static int[] range(int k) {
        int[] v = new int[k];
        for (int i = 0; i < k; i++) {
            v[i] = i;
        }
        return v;
    }
}
