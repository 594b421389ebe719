package dev.lawful.enforce;

import dev.lawful.algebra.Declaration;
import dev.lawful.algebra.ExpandedLaws;
import dev.lawful.algebra.Expr;
import dev.lawful.algebra.LawEvaluator;
import dev.lawful.algebra.LawSet;
import dev.lawful.algebra.Term;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashSet;
import java.util.List;
import java.util.Map;
import java.util.Set;

/**
 * Residual completion: the network predicts the free outputs z, and this enforcer computes the n completed
 * outputs y_c from the n scalar laws C(x, z, y_c) = 0, so every law holds to rounding.
 *
 * <p><b>Tiers</b> ({@link Tier}): constant-affine law sets are folded at build time into y_c = M z + N x + k;
 * affine ones solve A(x, z) y_c = b(x, z) per sample by LU with partial pivoting (A = ∂C/∂y_c); nonlinear ones
 * run damped Newton per sample from the law text's {@code guess} values (or, without a guess, from fixed values
 * between 0.5 and 1.5 of the output's declared unit, different per output so that symmetric laws are not started
 * on their degenerate point; which root Newton then finds is not specified), stopping when every residual is at
 * rounding level or after
 * {@link Builder#maxIterations(int)} steps. Every tier ends with one refinement step on the residual evaluated with
 * compensated sums.
 *
 * <p><b>Exactness.</b> With the double entry points each scalar law i holds to
 * |C_i| ≤ (d_i + 3)·2⁻⁵³·s_i, where s_i is its natural scale (the sum of the magnitudes of its addends with
 * products distributed over sums, {@link dev.lawful.algebra.ExpandedLaws#scale(int)}) and d_i its rounding depth
 * (products, quotients, powers and functions along the deepest addend,
 * {@link dev.lawful.algebra.ExpandedLaws#roundingDepth(int)}); for an element balance d_i is 1, so the bound is
 * 4 double ulps of the magnitude of its terms. The bound is checked on every sample: a sample that misses it counts
 * as not converged, never as a silent success (a caller that only trains on the outputs may skip this final check
 * with {@link BoundCheck#SKIP}; the result is then the solve's alone and not certified). With the float entry points the outputs are rounded to float
 * after enforcement in double, which adds at most ½·Σ_j |∂C_i/∂y_c,j|·ulp_f32(y_c,j) (plus the double bound):
 * for a law linear in its completed outputs that is at most 2⁻²⁴·s_i, about one float ulp of the magnitude of
 * its terms; a term y_c^k contributes up to k times as much.
 *
 * <p><b>Gradients</b> (identical for all tiers, from the implicit function theorem, never by unrolling Newton):
 * with upstream ḡ on the outputs, solve Aᵀλ = ḡ_c at the solution, then ḡ_z = ḡ_f − (∂C/∂z)ᵀλ and
 * ḡ_x = −(∂C/∂x)ᵀλ. {@link #jacobians} gives dy/dz and dy/dx per sample.
 *
 * <p><b>Bad samples</b>: NaN or infinite inputs, a singular A, or a Newton that does not converge never give
 * silently wrong numbers. By default ({@link OnBadSample#THROW}) the call fails with an
 * {@link EnforcementException} naming the sample and the laws; with {@link OnBadSample#MASK} the sample's outputs
 * are NaN and its {@link SampleStatus} code goes to the caller's status mask.
 *
 * <p><b>Layout</b>: outputs come back in declaration order by default (so label columns never need reordering),
 * or free outputs first and completed last ({@link Layout#FREE_FIRST}); {@link #columns()} names each column.
 *
 * <p>Immutable and safe to share between threads; each thread passes its own {@link Workspace}.
 */
public final class Completion {
    /** Column order of the full output vector. */
    public enum Layout {
        /** Outputs in the order the law set declares them. */
        DECLARED,
        /** Free outputs first (in {@link #freeOutputs()} order), then completed ones. */
        FREE_FIRST
    }

    private final LawSet laws;
    private final ExpandedLaws expanded;
    final LawEvaluator evaluator;
    final int nIn;
    final int nOut;
    final int n;
    final int nFree;
    final int[] completed;
    final int[] free;
    /** For each output: its completed index k ≥ 0, or −(f+1) for free index f. */
    private final int[] role;
    private final Tier tier;
    private final double condition;
    private final List<String> warnings;
    private final OnBadSample policy;
    private final Layout layout;
    final int maxIterations;
    /** Per scalar law, d_i + 3 of the bound, with d_i its rounding depth. */
    final int[] boundFactor;
    // output-Jacobian entries of the evaluator: law and completed index (or −(f+1))
    final int[] entryLaw;
    final int[] entryRole;
    final int[] inEntryLaw;
    final int[] inEntryColumn;
    // constant-affine fold y_c = M z + N x + k
    final double[] foldM;
    final double[] foldN;
    final double[] foldK;
    /** The solve order: triangular levels first, then the coupled block. */
    final Stages stages;
    /** Per stage: factors of its block when the block is constant (constant-affine, or affine with constant A). */
    final double[][] stageLu;
    final int[][] stagePivot;
    /** Factors of the whole block A when it is constant, for the gradients. */
    final double[] constantLu;
    final int[] constantPivot;
    // Newton starting values
    final LawEvaluator guessEvaluator;
    final int[] guessTarget;
    final double[] startValue;

    /** The per-batch solving of every tier. */
    private final CompletionSolve solve;

    /** Work arrays for one thread; grows to the largest batch it has seen, then allocates nothing. */
    public static final class Workspace {
        final LawEvaluator.Workspace evaluation;
        final LawEvaluator.Workspace guessEvaluation;
        final double[] a;
        final int[] pivot;
        final double[] vector;
        int capacity;
        double[] x;
        double[] z;
        double[] y;
        double[] out;
        double[] residual;
        double[] scale;
        double[] jy;
        double[] jx;
        double[] lu;
        int[] pivots;
        double[] previous;
        double[] step;
        double[] stepLength;
        double[] norm;
        double[] referenceScale;
        int[] iterations;
        byte[] status;
        double[] guesses;
        double[] g;
        double[] gyFloat;
        double[] gz;
        double[] gx;
        /** Newton's still-active samples, gathered: their indices, inputs, outputs and evaluations. */
        int[] active;
        double[] activeX;
        double[] activeY;
        double[] activeResidual;
        double[] activeScale;
        double[] activeJy;

        Workspace(Completion c) {
            this.evaluation = c.evaluator.newWorkspace();
            this.guessEvaluation = c.guessEvaluator == null ? null : c.guessEvaluator.newWorkspace();
            this.a = new double[Math.max(1, c.n * c.n)];
            this.pivot = new int[Math.max(1, c.n)];
            this.vector = new double[Math.max(1, Math.max(c.n, c.nOut))];
        }

        void ensure(Completion c, int batch) {
            if (batch <= capacity) {
                return;
            }
            capacity = batch;
            x = new double[batch * c.nIn];
            z = new double[batch * c.nFree];
            y = new double[batch * c.nOut];
            out = new double[batch * c.nOut];
            residual = new double[batch * c.n];
            scale = new double[batch * c.n];
            jy = new double[batch * c.evaluator.outputNonzeros()];
            jx = new double[batch * c.evaluator.inputNonzeros()];
            lu = new double[batch * c.n * c.n];
            pivots = new int[batch * c.n];
            previous = new double[batch * c.n];
            step = new double[batch * c.n];
            stepLength = new double[batch];
            norm = new double[batch];
            referenceScale = new double[batch * c.n];
            iterations = new int[batch];
            status = new byte[batch];
            guesses = c.guessEvaluator == null ? null : new double[batch * c.guessEvaluator.lawCount()];
            g = new double[batch * c.nOut];
            gyFloat = new double[batch * c.nOut];
            gz = new double[batch * c.nFree];
            gx = new double[batch * c.nIn];
            active = new int[batch];
            activeX = new double[batch * c.nIn];
            activeY = new double[batch * c.nOut];
            activeResidual = new double[batch * c.n];
            activeScale = new double[batch * c.n];
            activeJy = new double[batch * c.evaluator.outputNonzeros()];
        }
    }

    /** Configures a completion; see {@link Completion#builder(LawSet)}. */
    public static final class Builder {
        private final LawSet laws;
        private String[] completedNames;
        private boolean automatic;
        private String[] allowed;
        private OnBadSample policy = OnBadSample.THROW;
        private Layout layout = Layout.DECLARED;
        private int maxIterations = 50;
        private double[] xRef;
        private double[] yRef;

        private Builder(LawSet laws) {
            this.laws = laws;
        }

        /** Completes exactly these output elements ({@code name} or {@code name[i]}), overriding the law text. */
        public Builder complete(String... elements) {
            this.completedNames = elements.clone();
            this.automatic = false;
            return this;
        }

        /** Lets the library choose the best-conditioned completed outputs, overriding the law text. */
        public Builder automatic() {
            this.automatic = true;
            this.completedNames = null;
            return this;
        }

        /** Restricts the automatic choice to these output elements (default: all outputs). */
        public Builder allow(String... elements) {
            this.allowed = elements.clone();
            return this;
        }

        /** What to do with a sample that cannot be enforced (default {@link OnBadSample#THROW}). */
        public Builder onBadSample(OnBadSample policy) {
            this.policy = policy;
            return this;
        }

        /** Column order of the outputs (default {@link Layout#DECLARED}). */
        public Builder layout(Layout layout) {
            this.layout = layout;
            return this;
        }

        /** Newton's iteration cap for nonlinear laws (default 50). */
        public Builder maxIterations(int maxIterations) {
            if (maxIterations < 1) {
                throw new IllegalArgumentException("maxIterations must be at least 1, found " + maxIterations);
            }
            this.maxIterations = maxIterations;
            return this;
        }

        /**
         * The point (inputs, outputs in declared units) where the automatic choice, the rank check and the
         * condition number are evaluated. Default: a fixed generic point, every element a pseudo-random value in
         * [0.5, 1.5) of its declared unit (the same on every run), so that special points where laws happen to be
         * dependent are not met by accident.
         */
        public Builder referencePoint(double[] x, double[] y) {
            this.xRef = x.clone();
            this.yRef = y.clone();
            return this;
        }

        /**
         * @return the completion
         * @throws dev.lawful.algebra.LawException when the choice is impossible: wrong number of completed outputs,
         *         an output no law involves, dependent (redundant or contradictory) laws, a singular block, or a
         *         guess that uses a completed output
         */
        public Completion build() {
            return new Completion(this);
        }
    }

    /**
     * @param laws the law set
     * @return a completion of the outputs named by the law text's {@code complete} statement, or of an automatic
     *         well-conditioned choice when there is none; failing on bad samples
     */
    public static Completion of(LawSet laws) {
        return builder(laws).build();
    }

    /** @return a builder for a completion of {@code laws} */
    public static Builder builder(LawSet laws) {
        return new Builder(laws);
    }

    private Completion(Builder b) {
        this.laws = b.laws;
        this.expanded = laws.expand();
        this.evaluator = laws.evaluator();
        this.nIn = laws.inputWidth();
        this.nOut = laws.outputWidth();
        this.n = expanded.size();
        this.policy = b.policy;
        this.layout = b.layout;
        this.maxIterations = b.maxIterations;
        List<String> notes = new ArrayList<>();
        if (n == 0) {
            throw laws.problem(null, "the law set has no laws, so there is nothing to complete");
        }
        double[] xRef = b.xRef != null ? b.xRef : generic(nIn, 0x5EED1L);
        double[] yRef = b.yRef != null ? b.yRef : generic(nOut, 0x5EED2L);
        if (xRef.length != nIn || yRef.length != nOut) {
            throw new IllegalArgumentException("the reference point needs " + nIn + " inputs and " + nOut
                    + " outputs, found " + xRef.length + " and " + yRef.length);
        }
        OutputChoice choice = new OutputChoice(laws, xRef, yRef);
        choice.requireIndependentLaws();
        int[] chosen;
        Declaration about = laws.completion().orElse(null);
        if (b.completedNames != null) {
            chosen = indices(b.completedNames, "completed output");
            about = null;
        } else if (!b.automatic && laws.completion().isPresent()) {
            chosen = laws.completedOutputs();
        } else {
            int[] allowed = b.allowed == null ? range(nOut) : indices(b.allowed, "allowed output");
            chosen = choice.automatic(allowed);
            notes.add("completed outputs chosen automatically: " + String.join(", ", names(chosen)));
            about = null;
        }
        if (chosen.length != n) {
            throw laws.problem(about, "the laws give " + n + " scalar equation" + (n == 1 ? "" : "s") + " but "
                    + chosen.length + " output" + (chosen.length == 1 ? " is" : "s are") + " completed; complete"
                    + " exactly " + n + " (one per scalar law)");
        }
        this.completed = chosen;
        this.role = new int[nOut];
        Arrays.fill(role, Integer.MIN_VALUE);
        for (int k = 0; k < n; k++) {
            role[completed[k]] = k;
        }
        this.nFree = nOut - n;
        this.free = new int[nFree];
        for (int o = 0, f = 0; o < nOut; o++) {
            if (role[o] == Integer.MIN_VALUE) {
                free[f] = o;
                role[o] = -(f + 1);
                f++;
            }
        }
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
        this.condition = choice.condition(completed);
        if (!(condition < 1e15)) {
            String auto;
            try {
                auto = String.join(", ", names(choice.automatic(range(nOut))));
            } catch (RuntimeException e) {
                auto = null;
            }
            throw laws.problem(about, "the completed outputs " + String.join(", ", names(completed)) + " make the"
                    + " laws singular at the reference point (no law system for them has a unique solution)"
                    + (auto == null ? "" : "; a well-conditioned choice is: complete " + auto));
        }
        if (condition > OutputChoice.WARN_CONDITION) {
            notes.add(String.format(java.util.Locale.ROOT, "the completed outputs are ill-conditioned (condition number %.3g > %.0e):"
                    + " errors of the free outputs are amplified; consider the automatic choice", condition,
                    OutputChoice.WARN_CONDITION));
        }
        this.tier = classify();
        this.boundFactor = new int[n];
        for (int i = 0; i < n; i++) {
            boundFactor[i] = expanded.roundingDepth(i) + 3;
        }
        int nnz = evaluator.outputNonzeros();
        this.entryLaw = new int[nnz];
        this.entryRole = new int[nnz];
        for (int i = 0; i < n; i++) {
            int[] cols = evaluator.outputColumns(i);
            for (int k = 0; k < cols.length; k++) {
                entryLaw[evaluator.outputOffset(i) + k] = i;
                entryRole[evaluator.outputOffset(i) + k] = role[cols[k]];
            }
        }
        int nnzX = evaluator.inputNonzeros();
        this.inEntryLaw = new int[nnzX];
        this.inEntryColumn = new int[nnzX];
        for (int i = 0; i < n; i++) {
            int[] cols = evaluator.inputColumns(i);
            for (int k = 0; k < cols.length; k++) {
                inEntryLaw[evaluator.inputOffset(i) + k] = i;
                inEntryColumn[evaluator.inputOffset(i) + k] = cols[k];
            }
        }
        // guesses and default starting values for Newton
        Map<Integer, Term> guesses = expanded.guesses();
        List<Term> guessTerms = new ArrayList<>();
        List<String> guessNames = new ArrayList<>();
        List<Integer> targets = new ArrayList<>();
        Set<Integer> completedVars = new HashSet<>();
        for (int o : completed) {
            completedVars.add(nIn + o);
        }
        for (Map.Entry<Integer, Term> e : guesses.entrySet()) {
            if (role[e.getKey()] < 0) {
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
            targets.add(role[e.getKey()]);
        }
        this.guessEvaluator = guessTerms.isEmpty() ? null : LawEvaluator.forTerms(expanded, guessTerms, guessNames);
        this.guessTarget = targets.stream().mapToInt(Integer::intValue).toArray();
        // without a guess: generic values, different per output, so Newton never starts on a symmetric point
        // (equal velocities in a collision) where the laws are degenerate
        this.startValue = generic(n, 0x5EED3L);
        // the solve order, and the factors of every block that is constant
        this.stages = Stages.of(expanded, role, entryLaw, entryRole);
        if (tier == Tier.NONLINEAR) {
            // only outputs of stages that are nonlinear in their own outputs depend on where Newton starts
            List<String> missing = new ArrayList<>();
            for (Stages.Stage st : stages.stages) {
                if (!stageIsNonlinear(st)) {
                    continue;
                }
                for (int k : st.vars()) {
                    if (!targets.contains(k)) {
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
        boolean constantBlock = tier == Tier.CONSTANT_AFFINE || (tier == Tier.AFFINE && blockIsConstant());
        this.stageLu = new double[stages.stages.size()][];
        this.stagePivot = new int[stages.stages.size()][];
        if (constantBlock) {
            for (int g = 0; g < stages.stages.size(); g++) {
                Stages.Stage st = stages.stages.get(g);
                int m = st.size();
                stageLu[g] = new double[m * m];
                stagePivot[g] = new int[m];
                for (int j = 0; j < m; j++) {
                    for (int k = 0; k < m; k++) {
                        stageLu[g][j * m + k] = choice.jacobian[st.laws()[j] * nOut + completed[st.vars()[k]]];
                    }
                }
                if (!DenseLu.factor(stageLu[g], m, stagePivot[g])) {
                    throw new AssertionError("a block with finite condition number did not factor");
                }
            }
            this.constantLu = new double[n * n];
            for (int i = 0; i < n; i++) {
                for (int k = 0; k < n; k++) {
                    constantLu[i * n + k] = choice.jacobian[i * nOut + completed[k]];
                }
            }
            this.constantPivot = new int[n];
            if (!DenseLu.factor(constantLu, n, constantPivot)) {
                throw new AssertionError("a block with finite condition number did not factor");
            }
        } else {
            this.constantLu = null;
            this.constantPivot = null;
        }
        if (tier == Tier.CONSTANT_AFFINE) {
            double[][] fold = ConstantAffineFold.fold(this, choice.jacobian);
            this.foldM = fold[0];
            this.foldN = fold[1];
            this.foldK = fold[2];
        } else {
            this.foldM = null;
            this.foldN = null;
            this.foldK = null;
        }
        this.warnings = List.copyOf(notes);
        this.solve = new CompletionSolve(this);
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

    private Tier classify() {
        Set<Integer> completedVars = new HashSet<>();
        for (int o : completed) {
            completedVars.add(nIn + o);
        }
        boolean allConstant = true;
        for (int i = 0; i < n; i++) {
            for (Map.Entry<Integer, Term> e : expanded.gradient(i).entrySet()) {
                Term d = e.getValue();
                if (d.kind() != Term.Kind.CONST) {
                    allConstant = false;
                }
                if (completedVars.contains(e.getKey())) {
                    for (int v : d.variables()) {
                        if (completedVars.contains(v)) {
                            return Tier.NONLINEAR;
                        }
                    }
                }
            }
        }
        return allConstant ? Tier.CONSTANT_AFFINE : Tier.AFFINE;
    }

    /** @return whether some law of the stage has a derivative, with respect to a stage output, that uses one */
    private boolean stageIsNonlinear(Stages.Stage st) {
        Set<Integer> vars = new HashSet<>();
        for (int k : st.vars()) {
            vars.add(nIn + completed[k]);
        }
        for (int i : st.laws()) {
            for (Map.Entry<Integer, Term> e : expanded.gradient(i).entrySet()) {
                if (vars.contains(e.getKey())) {
                    for (int v : e.getValue().variables()) {
                        if (vars.contains(v)) {
                            return true;
                        }
                    }
                }
            }
        }
        return false;
    }

    private boolean blockIsConstant() {
        for (int i = 0; i < n; i++) {
            for (Map.Entry<Integer, Term> e : expanded.gradient(i).entrySet()) {
                int v = e.getKey() - nIn;
                if (v >= 0 && role[v] >= 0 && e.getValue().kind() != Term.Kind.CONST) {
                    return false;
                }
            }
        }
        return true;
    }

    // ---- description -----------------------------------------------------------------------------------------

    /** @return the law set */
    public LawSet laws() {
        return laws;
    }

    /** @return how the laws are solved */
    public Tier tier() {
        return tier;
    }

    /** @return the 2-norm condition number of ∂C/∂y_c at the reference point */
    public double condition() {
        return condition;
    }

    /** @return notes from the build: the automatic choice, ill-conditioning, missing guesses */
    public List<String> warnings() {
        return warnings;
    }

    /** @return the bad-sample policy */
    public OnBadSample onBadSample() {
        return policy;
    }

    /** @return the output layout */
    public Layout layout() {
        return layout;
    }

    /** @return the free output elements (what the network predicts), as indices into the declared outputs */
    public int[] freeOutputs() {
        return free.clone();
    }

    /** @return the completed output elements, as indices into the declared outputs, in solve order */
    public int[] completedOutputs() {
        return completed.clone();
    }

    /** @return names of the free output elements, {@code name} or {@code name[i]} */
    public List<String> freeNames() {
        return names(free);
    }

    /** @return names of the completed output elements */
    public List<String> completedNames() {
        return names(completed);
    }

    /** @return the name of each column of the full output vector, in this completion's layout */
    public List<String> columns() {
        if (layout == Layout.DECLARED) {
            return laws.outputNames();
        }
        List<String> c = new ArrayList<>(names(free));
        c.addAll(names(completed));
        return c;
    }

    /** @return input elements per sample */
    public int inputWidth() {
        return nIn;
    }

    /** @return free output elements per sample (the network head's width) */
    public int freeWidth() {
        return nFree;
    }

    /** @return output elements per sample */
    public int outputWidth() {
        return nOut;
    }

    /** @return a new workspace for one thread */
    public Workspace newWorkspace() {
        return new Workspace(this);
    }

    // ---- forward ---------------------------------------------------------------------------------------------

    /**
     * Completes a batch in double precision.
     *
     * @param x      inputs, {@code batch * inputWidth()} values in declared units (null when there are none); read only
     * @param z      free outputs, {@code batch * freeWidth()} values in {@link #freeOutputs()} order; read only
     * @param batch  number of samples
     * @param y      output buffer of {@code batch * outputWidth()} values in this completion's layout
     * @param status optional buffer of {@code batch} bytes for {@link SampleStatus} codes (null to skip)
     * @param ws     this thread's workspace
     * @throws EnforcementException under {@link OnBadSample#THROW} for the first sample that cannot be enforced (what
     *         {@code y} then holds is unspecified)
     * @throws IllegalArgumentException when an array is too short
     */
    public void forward(double[] x, double[] z, int batch, double[] y, byte[] status, Workspace ws) {
        forward(x, z, batch, y, status, ws, BoundCheck.EVERY_SAMPLE);
    }

    /**
     * Completes a batch in double precision, certifying the result or not as {@code check} says (see
     * {@link BoundCheck}: {@link BoundCheck#SKIP} is for training, where it saves one evaluation of every law per
     * sample).
     *
     * @see #forward(double[], double[], int, double[], byte[], Workspace)
     */
    public void forward(double[] x, double[] z, int batch, double[] y, byte[] status, Workspace ws,
            BoundCheck check) {
        if (check == null) {
            throw new IllegalArgumentException("check must be BoundCheck.EVERY_SAMPLE or BoundCheck.SKIP, not null");
        }
        boolean certify = check == BoundCheck.EVERY_SAMPLE;
        need("x", x, (long) batch * nIn);
        need("z", z, (long) batch * nFree);
        need("y", y, (long) batch * nOut);
        if (status != null) {
            need(status, batch);
        }
        if (batch == 0) {
            return;
        }
        ws.ensure(this, batch);
        // in declared order the caller's buffer is the solve's (unless it is also an input)
        double[] full = layout == Layout.DECLARED && y != x && y != z ? y : ws.y;
        byte[] st = ws.status;
        // the fold finds non-finite inputs itself
        solve.scatterFree(x, z, batch, full, tier == Tier.CONSTANT_AFFINE ? null : st);
        switch (tier) {
            case CONSTANT_AFFINE:
                solve.forwardConstantAffine(x, z, batch, full, st);
                if (certify) {
                    solve.refineAll(x, batch, full, st, ws);
                }
                break;
            case AFFINE:
                solve.forwardAffine(x, batch, full, st, ws, certify);
                break;
            default:
                solve.forwardNewton(x, batch, full, st, ws, certify);
                break;
        }
        if (!certify) {
            // the certifying evaluation would have caught an overflow as a residual that is not finite
            solve.markNonFiniteResults(batch, full, st);
        }
        finish(batch, full, st, y, status);
    }

    /**
     * Completes a batch given and returned in float; the enforcement runs in double and the outputs are rounded at
     * the end (see the class documentation for the resulting bound).
     *
     * @see #forward(double[], double[], int, double[], byte[], Workspace)
     */
    public void forward(float[] x, float[] z, int batch, float[] y, byte[] status, Workspace ws) {
        forward(x, z, batch, y, status, ws, BoundCheck.EVERY_SAMPLE);
    }

    /**
     * Float variant of {@link #forward(double[], double[], int, double[], byte[], Workspace, BoundCheck)}.
     */
    public void forward(float[] x, float[] z, int batch, float[] y, byte[] status, Workspace ws, BoundCheck check) {
        need("x", x, (long) batch * nIn);
        need("z", z, (long) batch * nFree);
        need("y", y, (long) batch * nOut);
        if (batch == 0) {
            return;
        }
        ws.ensure(this, batch);
        widen(x, ws.x, batch * nIn);
        widen(z, ws.z, batch * nFree);
        forward(ws.x, ws.z, batch, ws.out, status, ws, check);
        for (int i = 0; i < batch * nOut; i++) {
            y[i] = (float) ws.out[i];
        }
    }

    private void finish(int batch, double[] full, byte[] st, double[] y, byte[] status) {
        for (int s = 0; s < batch; s++) {
            if (st[s] != SampleStatus.OK && policy == OnBadSample.THROW) {
                throw failure(s, st[s]);
            }
        }
        for (int s = 0; s < batch; s++) {
            boolean bad = st[s] != SampleStatus.OK;
            if (layout == Layout.DECLARED) {
                if (bad) {
                    Arrays.fill(y, s * nOut, (s + 1) * nOut, Double.NaN);
                } else if (full != y) {
                    System.arraycopy(full, s * nOut, y, s * nOut, nOut);
                }
            } else {
                for (int f = 0; f < nFree; f++) {
                    y[s * nOut + f] = bad ? Double.NaN : full[s * nOut + free[f]];
                }
                for (int k = 0; k < n; k++) {
                    y[s * nOut + nFree + k] = bad ? Double.NaN : full[s * nOut + completed[k]];
                }
            }
            if (status != null) {
                status[s] = st[s];
            }
        }
    }

    private EnforcementException failure(int s, byte code) {
        List<String> lawNames = new ArrayList<>();
        for (int i = 0; i < n; i++) {
            lawNames.add(expanded.name(i));
        }
        String laws = String.join(", ", lawNames.stream().map(l -> "'" + l + "'").toList());
        String what;
        switch (code) {
            case SampleStatus.NOT_FINITE:
                what = "an input or free output is NaN or infinite";
                break;
            case SampleStatus.SINGULAR:
                what = "the laws " + laws + " are singular in the completed outputs "
                        + String.join(", ", completedNames()) + " at this sample (their Jacobian block has no inverse)"
                        + (tier == Tier.NONLINEAR ? "; if this happens where Newton starts, give a 'guess' for the"
                        + " completed outputs away from that point" : "");
                break;
            default:
                what = tier == Tier.NONLINEAR
                        ? "the residuals of " + laws + " did not reach rounding level within " + maxIterations
                        + " Newton iterations; give a 'guess' for the completed outputs or check the inputs"
                        : "the residuals of " + laws + " stay above rounding level after the solve and one"
                        + " refinement (the system is nearly singular at this sample)";
                break;
        }
        return new EnforcementException(s, code, lawNames, "sample " + s + ": " + what
                + " (use OnBadSample.MASK to get NaN rows and a status mask instead)");
    }

    // ---- gradients -------------------------------------------------------------------------------------------

    /**
     * Vector-Jacobian product: maps gradients on the outputs to gradients on the free outputs (and inputs), by
     * the implicit function theorem at the solution {@code y}.
     *
     * @param x     inputs of the forward call (null when there are none); read only
     * @param y     outputs the forward call returned (this completion's layout); read only
     * @param gy    upstream gradients on y, same layout; read only
     * @param batch number of samples
     * @param gz    output buffer, {@code batch * freeWidth()} values
     * @param gx    optional output buffer, {@code batch * inputWidth()} values (null to skip)
     * @param ws    this thread's workspace
     * @throws EnforcementException under {@link OnBadSample#THROW} when A is singular at a sample (under MASK its
     *         gradients are NaN)
     */
    public void backward(double[] x, double[] y, double[] gy, int batch, double[] gz, double[] gx, Workspace ws) {
        need("x", x, (long) batch * nIn);
        need("y", y, (long) batch * nOut);
        need("gy", gy, (long) batch * nOut);
        need("gz", gz, (long) batch * nFree);
        if (gx != null) {
            need("gx", gx, (long) batch * nIn);
        }
        if (batch == 0) {
            return;
        }
        ws.ensure(this, batch);
        double[] full = y;
        double[] g = gy;
        if (layout != Layout.DECLARED) {
            // the solve reads outputs and gradients in declared order
            full = ws.y;
            g = ws.g;
            for (int s = 0; s < batch; s++) {
                for (int c = 0; c < nOut; c++) {
                    int o = outputAt(c);
                    full[s * nOut + o] = y[s * nOut + c];
                    g[s * nOut + o] = gy[s * nOut + c];
                }
            }
        }
        int singular = solve.backward(tier == Tier.CONSTANT_AFFINE, policy == OnBadSample.THROW, x, batch, full, g, gz,
                gx, ws);
        if (singular >= 0) {
            throw failure(singular, SampleStatus.SINGULAR);
        }
    }

    /** Float variant of {@link #backward(double[], double[], double[], int, double[], double[], Workspace)}. */
    public void backward(float[] x, float[] y, float[] gy, int batch, float[] gz, float[] gx, Workspace ws) {
        need("x", x, (long) batch * nIn);
        need("y", y, (long) batch * nOut);
        need("gy", gy, (long) batch * nOut);
        if (batch == 0) {
            return;
        }
        ws.ensure(this, batch);
        double[] xd = ws.x;
        widen(x, xd, batch * nIn);
        double[] yd = ws.out;
        widen(y, yd, batch * nOut);
        double[] gyd = ws.gyFloat;
        widen(gy, gyd, batch * nOut);
        backward(xd, yd, gyd, batch, ws.gz, gx == null ? null : ws.gx, ws);
        for (int i = 0; i < batch * nFree; i++) {
            gz[i] = (float) ws.gz[i];
        }
        if (gx != null) {
            for (int i = 0; i < batch * nIn; i++) {
                gx[i] = (float) ws.gx[i];
            }
        }
    }

    /**
     * Full per-sample Jacobians of the outputs at the solution: dy/dz (outputWidth × freeWidth, row-major, rows in
     * this completion's layout) and dy/dx (outputWidth × inputWidth).
     *
     * @param x     inputs (null when there are none)
     * @param y     outputs from forward, this completion's layout
     * @param batch number of samples
     * @param dydz  output buffer, {@code batch * outputWidth * freeWidth} values, or null
     * @param dydx  output buffer, {@code batch * outputWidth * inputWidth} values, or null
     * @param ws    this thread's workspace
     */
    public void jacobians(double[] x, double[] y, int batch, double[] dydz, double[] dydx, Workspace ws) {
        if (dydz != null) {
            need("dydz", dydz, (long) batch * nOut * nFree);
        }
        if (dydx != null) {
            need("dydx", dydx, (long) batch * nOut * nIn);
        }
        double[] gy = new double[batch * nOut];
        double[] gz = new double[batch * nFree];
        double[] gx = dydx == null ? null : new double[batch * nIn];
        // one vector-Jacobian product per output row: exact, and reuses the backward path of every tier
        for (int c = 0; c < nOut; c++) {
            Arrays.fill(gy, 0);
            for (int s = 0; s < batch; s++) {
                gy[s * nOut + c] = 1;
            }
            backward(x, y, gy, batch, gz, gx, ws);
            for (int s = 0; s < batch; s++) {
                if (dydz != null) {
                    System.arraycopy(gz, s * nFree, dydz, (s * nOut + c) * nFree, nFree);
                }
                if (dydx != null) {
                    System.arraycopy(gx, s * nIn, dydx, (s * nOut + c) * nIn, nIn);
                }
            }
        }
    }

    // ---- helpers ---------------------------------------------------------------------------------------------

    /** @return the declared output index of column {@code c} in this completion's layout */
    private int outputAt(int c) {
        if (layout == Layout.DECLARED) {
            return c;
        }
        return c < nFree ? free[c] : completed[c - nFree];
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

    /**
     * A generic reference point: fixed pseudo-random values in [0.5, 1.5), so special points (equal velocities in
     * a collision, a symmetric mixture) where laws happen to be dependent are not met by accident.
     */
    private static double[] generic(int k, long seed) {
        java.util.SplittableRandom random = new java.util.SplittableRandom(seed);
        double[] v = new double[k];
        for (int i = 0; i < k; i++) {
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

    private static void widen(float[] from, double[] to, int count) {
        for (int i = 0; i < count; i++) {
            to[i] = from[i];
        }
    }

    private static void need(String what, double[] a, long count) {
        if (count > 0 && (a == null || a.length < count)) {
            throw new IllegalArgumentException(what + " must hold at least " + count + " values for this batch, found "
                    + (a == null ? "null" : a.length));
        }
    }

    private static void need(String what, float[] a, long count) {
        if (count > 0 && (a == null || a.length < count)) {
            throw new IllegalArgumentException(what + " must hold at least " + count + " values for this batch, found "
                    + (a == null ? "null" : a.length));
        }
    }

    private static void need(byte[] status, int batch) {
        if (status.length < batch) {
            throw new IllegalArgumentException("status must hold at least " + batch + " bytes, found " + status.length);
        }
    }
}
