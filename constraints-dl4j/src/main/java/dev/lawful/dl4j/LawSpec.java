package dev.lawful.dl4j;

import dev.lawful.algebra.LawException;
import dev.lawful.algebra.LawSet;
import dev.lawful.enforce.BoundCheck;
import dev.lawful.enforce.Completion;
import dev.lawful.enforce.OnBadSample;
import java.util.Arrays;
import java.util.Objects;

/**
 * The laws a Deeplearning4j layer, vertex or loss enforces, in a form that serialises with the network: the law
 * text itself (readable in the saved JSON configuration), optionally the completed outputs, and the bad-sample
 * policy. The checked {@link LawSet} and its {@link Completion} are rebuilt from the text on first use and never
 * serialised, so a saved file stays readable and a law text that no longer parses reports the law language's own
 * diagnostics ({@link LawException}) when the network is loaded and first used.
 *
 * <p>Public no-argument constructor, getters and setters: Deeplearning4j's JSON mapper needs them.
 */
public final class LawSpec implements java.io.Serializable {
    private static final long serialVersionUID = 1L;

    private String lawText;
    private String sourceName = "<network>";
    private String[] completed;
    private boolean maskBadSamples;
    private boolean certifyWhileTraining;
    private double[] limitWeights;
    private transient volatile LawSet laws;
    private transient volatile Completion completion;
    private transient volatile Sized sized;

    /** For the JSON mapper; use {@link #of(String)} or {@link #of(LawSet)}. */
    public LawSpec() {
    }

    /**
     * @param lawText law-language text
     * @return the spec
     * @throws LawException when the text does not parse or check
     */
    public static LawSpec of(String lawText) {
        LawSpec s = new LawSpec();
        s.setLawText(lawText);
        s.lawSet();
        return s;
    }

    /** @return a spec holding the printed text of {@code laws} */
    public static LawSpec of(LawSet laws) {
        return of(laws.toString());
    }

    /** @return the law text */
    public String getLawText() {
        return lawText;
    }

    /** Sets the law text; the checked law set is rebuilt on next use. */
    public void setLawText(String lawText) {
        this.lawText = Objects.requireNonNull(lawText, "lawText");
        this.laws = null;
        this.completion = null;
        this.sized = null;
    }

    /** @return the name diagnostics show for the law text */
    public String getSourceName() {
        return sourceName;
    }

    /** Sets the name diagnostics show for the law text (for example the file it came from). */
    public void setSourceName(String sourceName) {
        this.sourceName = Objects.requireNonNull(sourceName, "sourceName");
        this.laws = null;
        this.completion = null;
        this.sized = null;
    }

    /** @return the completed output elements ({@code name} or {@code name[i]}), or null to use the law text's choice */
    public String[] getCompleted() {
        return completed == null ? null : completed.clone();
    }

    /** Overrides the completed outputs; null uses the law text's {@code complete} statement or the automatic choice. */
    public void setCompleted(String[] completed) {
        this.completed = completed == null ? null : completed.clone();
        this.completion = null;
        this.sized = null;
    }

    /** @return whether bad samples give NaN rows ({@link OnBadSample#MASK}) rather than an exception */
    public boolean isMaskBadSamples() {
        return maskBadSamples;
    }

    /** Chooses {@link OnBadSample#MASK} (true) or {@link OnBadSample#THROW} (false, the default). */
    public void setMaskBadSamples(boolean maskBadSamples) {
        this.maskBadSamples = maskBadSamples;
        this.completion = null;
        this.sized = null;
    }

    /**
     * @return whether training passes also check every sample against the documented bound (false, the default:
     *         see {@link #check(boolean)})
     */
    public boolean isCertifyWhileTraining() {
        return certifyWhileTraining;
    }

    /**
     * Chooses whether training passes also certify every sample ({@link BoundCheck#EVERY_SAMPLE}) rather than
     * skipping that final evaluation ({@link BoundCheck#SKIP}, the default). Inference always certifies.
     */
    public void setCertifyWhileTraining(boolean certifyWhileTraining) {
        this.certifyWhileTraining = certifyWhileTraining;
    }

    /**
     * @return per declared output, its weight in the metric in which a sample outside a limit is moved, or null for
     *         weight 1 everywhere (see {@link #setLimitWeights(double[])})
     */
    public double[] getLimitWeights() {
        return limitWeights == null ? null : limitWeights.clone();
    }

    /**
     * Weights the outputs in the metric in which a sample outside a limit is moved: Σ_o w_o ((y*_o − y_o)/size_o)²,
     * so a large weight keeps an output nearly where the network put it and lets the others absorb the move. For
     * example, raising a negative rain to zero keeps the water budget closed by drying the column; weighting the
     * radiative fluxes lets the energy budget take the condensation's latent heat as warming, which is what
     * condensing water does, rather than as a change of radiation, which it does not cause. Null or all ones: every
     * output counts equally (in the units the loss sees, when a normalizer is folded).
     *
     * @param limitWeights per declared output, finite and positive; copied
     * @throws IllegalArgumentException when a weight is not finite and positive
     */
    public void setLimitWeights(double[] limitWeights) {
        if (limitWeights != null) {
            for (int o = 0; o < limitWeights.length; o++) {
                if (!(limitWeights[o] > 0 && limitWeights[o] < Double.POSITIVE_INFINITY)) {
                    throw new IllegalArgumentException("limit weight " + o + " must be finite and positive, found "
                            + limitWeights[o]);
                }
            }
        }
        this.limitWeights = limitWeights == null ? null : limitWeights.clone();
        this.completion = null;
        this.sized = null;
    }

    /**
     * Sets the limit weight of one output, every element of a vector output, in the metric of
     * {@link #setLimitWeights(double[])}; the others keep theirs (1 unless set).
     *
     * @param output an output name ({@code F_sfc}) or element ({@code out[2]})
     * @param weight finite and positive
     * @return this spec
     * @throws IllegalArgumentException when no output has that name or the weight is not finite and positive
     */
    public LawSpec limitWeight(String output, double weight) {
        java.util.List<String> names = lawSet().outputNames();
        double[] w = limitWeights == null ? new double[names.size()] : limitWeights.clone();
        if (limitWeights == null) {
            Arrays.fill(w, 1);
        }
        boolean found = false;
        for (int o = 0; o < names.size(); o++) {
            String n = names.get(o);
            if (n.equals(output) || n.startsWith(output + "[")) {
                w[o] = weight;
                found = true;
            }
        }
        if (!found) {
            throw new IllegalArgumentException("no output is called '" + output + "'; the outputs are "
                    + String.join(", ", names));
        }
        setLimitWeights(w);
        return this;
    }

    /**
     * @param training whether the pass is a training pass (its outputs feed a loss and its gradient)
     * @return {@link BoundCheck#SKIP} for a training pass unless {@link #isCertifyWhileTraining()}, else
     *         {@link BoundCheck#EVERY_SAMPLE}: outputs a user sees, scores on held-out data and deployment are
     *         always certified, while a training step does not pay one more evaluation of every law per sample
     */
    public BoundCheck check(boolean training) {
        return training && !certifyWhileTraining ? BoundCheck.SKIP : BoundCheck.EVERY_SAMPLE;
    }

    /**
     * @return the checked law set, parsed from the text on first use
     * @throws LawException with the law language's diagnostics when the text does not parse or check
     */
    public LawSet lawSet() {
        LawSet l = laws;
        if (l == null) {
            if (lawText == null) {
                throw new IllegalStateException("the law spec has no law text; set it with setLawText");
            }
            l = LawSet.parse(sourceName, lawText);
            laws = l;
        }
        return l;
    }

    /**
     * @return the completion of the law set (built on first use, then shared: it is immutable and thread-safe); its
     *         limits, if any, move outputs in the metric of one unit per declared unit (see
     *         {@link #completion(double[])} for the metric of normalised outputs)
     * @throws LawException when the laws cannot be completed as asked
     */
    public Completion completion() {
        Completion c = completion;
        if (c == null) {
            c = build(limitWeights == null || lawSet().limits().isEmpty() ? null : weighted(null));
            completion = c;
        }
        return c;
    }

    /**
     * The completion with its limits' metric set to the outputs' sizes (see
     * {@link Completion.Builder#limitScales(double...)}): a layer that folds a normalizer passes each output's
     * scale, so that a sample outside a limit moves the least in the normalised units its loss sees, each output's
     * size divided by the square root of its {@linkplain #setLimitWeights(double[]) limit weight}. Equal to
     * {@link #completion()} when the law set has no limits or {@code outputSizes} is null.
     *
     * @param outputSizes per declared output, its size in its declared unit (a normalizer's standard deviation or
     *                    range), or null
     * @return the completion (cached for the last sizes asked)
     * @throws LawException when the laws cannot be completed as asked
     * @throws IllegalArgumentException when a size is not finite and positive or their number is not the outputs'
     */
    public Completion completion(double[] outputSizes) {
        if (outputSizes == null || lawSet().limits().isEmpty()) {
            return completion();
        }
        Sized s = sized;
        if (s == null || !Arrays.equals(s.sizes, outputSizes)) {
            s = new Sized(outputSizes.clone(), build(weighted(outputSizes)));
            sized = s;
        }
        return s.completion;
    }

    /** @return the metric's sizes: size_o / √w_o, with size 1 when {@code sizes} is null and weight 1 when unset */
    private double[] weighted(double[] sizes) {
        int p = lawSet().outputWidth();
        if (limitWeights != null && limitWeights.length != p) {
            throw new IllegalArgumentException("limit weights must hold one value per output element (" + p
                    + "), found " + limitWeights.length);
        }
        double[] out = new double[p];
        for (int o = 0; o < p; o++) {
            out[o] = (sizes == null ? 1 : sizes[o]) / (limitWeights == null ? 1 : Math.sqrt(limitWeights[o]));
        }
        return out;
    }

    private Completion build(double[] outputSizes) {
        Completion.Builder b = Completion.builder(lawSet())
                .onBadSample(maskBadSamples ? OnBadSample.MASK : OnBadSample.THROW);
        if (completed != null) {
            b.complete(completed);
        }
        if (outputSizes != null) {
            b.limitScales(outputSizes);
        }
        return b.build();
    }

    /** A completion built for one set of output sizes. */
    private record Sized(double[] sizes, Completion completion) {
    }

    @Override
    public boolean equals(Object o) {
        return o instanceof LawSpec s && Objects.equals(lawText, s.lawText) && sourceName.equals(s.sourceName)
                && Arrays.equals(completed, s.completed) && maskBadSamples == s.maskBadSamples
                && certifyWhileTraining == s.certifyWhileTraining && Arrays.equals(limitWeights, s.limitWeights);
    }

    @Override
    public int hashCode() {
        return Objects.hash(lawText, sourceName, Arrays.hashCode(completed), maskBadSamples, certifyWhileTraining,
                Arrays.hashCode(limitWeights));
    }

    @Override
    public String toString() {
        return "LawSpec{" + sourceName + ", " + (lawText == null ? 0 : lawText.length()) + " characters"
                + (completed == null ? "" : ", completed " + String.join(", ", completed)) + "}";
    }
}
