package dev.lawful.examples.demo;

import dev.lawful.algebra.ExpandedLaws;
import dev.lawful.algebra.LawEvaluator;
import dev.lawful.algebra.LawSet;
import dev.lawful.algebra.Unit;
import dev.lawful.dl4j.ConstrainedGraph;
import dev.lawful.dl4j.LawSpec;
import dev.lawful.dl4j.LawVertex;
import dev.lawful.dl4j.Scaling;
import dev.lawful.enforce.Completion;
import dev.lawful.enforce.RoundingBound;
import dev.lawful.examples.TruthModel;
import java.io.IOException;
import java.io.InputStream;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;
import org.deeplearning4j.nn.graph.ComputationGraph;
import org.nd4j.linalg.activations.Activation;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.dataset.DataSet;
import org.nd4j.linalg.dataset.api.preprocessor.NormalizerStandardize;
import org.nd4j.linalg.factory.Nd4j;
import org.nd4j.linalg.learning.config.Adam;

/**
 * Trains the three networks of a scenario on the same data, split and seed, and measures them on the test rows:
 * <ul>
 *   <li>{@value #UNCONSTRAINED}: the head predicts all outputs, MSE loss;</li>
 *   <li>{@value #PENALTY}: the same network with the laws' squared relative residuals added to the loss
 *       ({@link ConstrainedGraph.Builder#buildPenalized(double, double[])});</li>
 *   <li>{@value #EXACT}: the head predicts the free outputs and a law vertex completes the rest
 *       ({@link ConstrainedGraph.Builder#build()}).</li>
 * </ul>
 * The data are standardised as a user would (Deeplearning4j's {@code NormalizerStandardize}, fitted on the training
 * rows, features and labels), the networks are float32 with identical hidden layers, initialisation seed, updater
 * and minibatch order. Predictions are mapped back to physical units in double; residuals are evaluated there with
 * the law set's own evaluator against the test inputs as given (double), and judged with {@link RoundingBound}: for
 * the exact network the bound includes the float rounding of the normalised inputs and outputs the network saw and
 * emitted.
 */
public final class ScenarioTrainer {
    /** Label of the network without laws. */
    public static final String UNCONSTRAINED = "unconstrained";
    /** Label of the network trained with the soft penalty. */
    public static final String PENALTY = "penalty";
    /** Label of the network with the law vertex. */
    public static final String EXACT = "exact";
    /** Share of the rows used for training; the rest are the test rows. */
    public static final double TRAIN_SHARE = 0.8;

    private ScenarioTrainer() {
    }

    /**
     * One trained network measured on the test rows.
     *
     * @param label           {@value #UNCONSTRAINED}, {@value #PENALTY} or {@value #EXACT}
     * @param predicted       physical outputs, {@code testRows × outputWidth}, declared order and units
     * @param residuals       residual of every scalar law, {@code testRows × lawCount}, in each law's reporting unit
     * @param outsideBound    test rows with at least one law outside the documented bound of {@link RoundingBound}
     * @param lossPerEpoch    mean training score of each epoch (normalised units; the penalty network's includes
     *                        its penalty)
     * @param secondsPerEpoch mean wall time of a training epoch, the first left out when there are several (it also
     *                        pays for compiling the code)
     * @param sideCheckMax    for each of the scenario's side checks, the largest |value| over the test rows
     * @param limits          the test rows outside each limit of the law file, and the worst violation
     */
    public record Network(String label, double[] predicted, double[] residuals, int outsideBound,
            double[] lossPerEpoch, double secondsPerEpoch, double[] sideCheckMax, LimitTally limits) {
    }

    /**
     * What a scenario run produced.
     *
     * @param scenario  the scenario with the sizes used
     * @param laws      its law set
     * @param completion its completion (which outputs the exact network computes)
     * @param trainRows rows used for training
     * @param testRows  rows measured
     * @param testX     test inputs, physical
     * @param testY     true test outputs, physical
     * @param lawNames  name of each scalar law
     * @param lawUnits  the unit each law's residuals are reported in
     * @param lawMarks  each law's mark ({@link TruthModel#lawMarks()}) converted to its reporting unit
     * @param meanScale each law's mean natural scale on the test rows' true values, reporting unit
     * @param networks  the three networks, in the order unconstrained, penalty, exact
     * @param dropped   rows the truth model did not converge on
     * @param seed      the seed of data, split, initialisation and minibatch order
     */
    public record Outcome(Scenario scenario, LawSet laws, Completion completion, int trainRows, int testRows,
            double[] testX, double[] testY, List<String> lawNames, List<String> lawUnits,
            List<TruthModel.LawMark> lawMarks, double[] meanScale, List<Network> networks, int dropped, long seed) {
    }

    /**
     * @param lawFile a law file name under {@code /laws/} on the class path
     * @return its text
     * @throws IllegalStateException when it is not there (a packaging error)
     */
    public static String lawText(String lawFile) {
        try (InputStream in = ScenarioTrainer.class.getResourceAsStream("/laws/" + lawFile)) {
            if (in == null) {
                throw new IllegalStateException("law file /laws/" + lawFile + " is not on the class path; rebuild"
                        + " the examples module");
            }
            return new String(in.readAllBytes(), StandardCharsets.UTF_8);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    /**
     * Generates the data, trains the three networks and measures them.
     *
     * @param scenario the scenario (its sizes are used)
     * @param seed     seed of everything random
     * @param progress where to show progress
     * @return the outcome
     */
    public static Outcome run(Scenario scenario, long seed, Progress progress) {
        TruthModel truth = scenario.truth();
        String text = lawText(truth.lawFile());
        LawSet laws = LawSet.parse(truth.lawFile(), text);
        LawSpec spec = LawSpec.of(laws);
        if (!laws.limits().isEmpty()) {
            scenario.limitWeights().forEach(spec::limitWeight);
        }
        Completion completion = spec.completion();
        int k = laws.inputWidth();
        int p = laws.outputWidth();
        if (k != truth.inputWidth() || p != truth.outputWidth()) {
            throw new IllegalStateException(truth.lawFile() + " declares " + k + " inputs and " + p + " outputs but"
                    + " its truth model makes " + truth.inputWidth() + " and " + truth.outputWidth());
        }
        ScenarioData data = ScenarioData.generate(truth, scenario.samples(), seed, progress,
                scenario.name() + ": data");
        int train = (int) Math.round(data.rows() * TRAIN_SHARE);
        int test = data.rows() - train;
        if (train < 2 || test < 1) {
            throw new IllegalArgumentException("scenario " + scenario.name() + ": " + data.rows() + " rows are too"
                    + " few to split into training and test rows; ask for more samples");
        }
        double[] trainX = java.util.Arrays.copyOfRange(data.x(), 0, train * k);
        double[] trainY = java.util.Arrays.copyOfRange(data.y(), 0, train * p);
        double[] testX = java.util.Arrays.copyOfRange(data.x(), train * k, data.rows() * k);
        double[] testY = java.util.Arrays.copyOfRange(data.y(), train * p, data.rows() * p);

        NormalizerStandardize normalizer = new NormalizerStandardize();
        normalizer.fitLabel(true);
        normalizer.fit(new DataSet(matrix(trainX, train, k, DataType.DOUBLE), matrix(trainY, train, p,
                DataType.DOUBLE)));
        ConstrainedGraph.Builder builder = ConstrainedGraph.builder(spec).hidden(scenario.hidden())
                .activation(Activation.TANH).updater(new Adam(scenario.learningRate())).dataType(DataType.FLOAT)
                .seed(seed).normalizedWith(normalizer);
        ComputationGraph exact = builder.build();
        LawVertex vertex = (LawVertex) exact.getConfiguration().getVertices().get(ConstrainedGraph.LAWS);
        Scaling in = vertex.getInputScaling();
        Scaling out = vertex.getOutputScaling();
        float[] trainXn = toFloat(in.toNormalised(trainX, train));
        float[] trainYn = toFloat(out.toNormalised(trainY, train));
        double[] testXn = widen(toFloat(in.toNormalised(testX, test)));

        ExpandedLaws expanded = laws.expand();
        LawEvaluator evaluator = laws.evaluator();
        int m = evaluator.lawCount();
        double[] factor = new double[m];
        List<String> names = new ArrayList<>();
        List<String> units = new ArrayList<>();
        for (int i = 0; i < m; i++) {
            Unit u = expanded.unit(i);
            factor[i] = u.factor();
            names.add(expanded.name(i));
            units.add(u.isNone() ? "1" : u.display());
        }
        double[] trainScale = meanScales(evaluator, trainX, trainY, train, factor);
        double[] lawWeights = new double[m];
        for (int i = 0; i < m; i++) {
            lawWeights[i] = trainScale[i] > 0 ? 1 / (trainScale[i] * trainScale[i]) : 1;
        }

        List<Network> networks = new ArrayList<>();
        SplittableRandom order = new SplittableRandom(seed ^ 0x5DEECE66DL);
        long orderSeed = order.nextLong();
        String[] labels = {UNCONSTRAINED, PENALTY, EXACT};
        for (String label : labels) {
            ComputationGraph net = label.equals(EXACT) ? exact : label.equals(PENALTY)
                    ? builder.buildPenalized(scenario.penaltyWeight(), lawWeights) : builder.buildUnconstrained();
            double[][] fit = train(net, label.equals(PENALTY) ? spec : null, trainXn, trainYn, train, k, p,
                    scenario, orderSeed, progress, scenario.name() + ": " + label);
            INDArray outN = net.output(matrix(testXn, test, k, DataType.FLOAT))[0];
            double[] yn = outN.castTo(DataType.DOUBLE).dup('c').data().asDouble();
            double[] y = out.toPhysical(yn, test);
            double[] residuals = new double[test * m];
            double[] bounds = new double[test * m];
            double[] xRounding = in.floatOutputError(in.toNormalised(testX, test), test);
            double[] yRounding = out.floatOutputError(yn, test);
            int outside = RoundingBound.of(completion).evaluate(testX, xRounding, y, test, yRounding, residuals,
                    bounds);
            LimitTally limits = LimitTally.of(laws, testX, y, yRounding, xRounding, test);
            for (int s = 0; s < test; s++) {
                for (int i = 0; i < m; i++) {
                    residuals[s * m + i] /= factor[i];
                }
            }
            List<Scenario.SideCheck> checks = scenario.sideChecks();
            double[] sideMax = new double[checks.size()];
            for (int c = 0; c < checks.size(); c++) {
                for (int s = 0; s < test; s++) {
                    sideMax[c] = Math.max(sideMax[c], Math.abs(checks.get(c).function().apply(testX, s * k, y, s * p)));
                }
            }
            networks.add(new Network(label, y, residuals, outside, fit[0], fit[1][0], sideMax, limits));
        }
        List<TruthModel.LawMark> marks = new ArrayList<>();
        List<TruthModel.LawMark> given = truth.lawMarks();
        for (int i = 0; i < m; i++) {
            TruthModel.LawMark g = i < given.size() ? given.get(i) : new TruthModel.LawMark(names.get(i), 0, "");
            marks.add(new TruthModel.LawMark(g.law(), g.value() / factor[i], g.label()));
        }
        return new Outcome(scenario, laws, completion, train, test, testX, testY, List.copyOf(names),
                List.copyOf(units), List.copyOf(marks), meanScales(evaluator, testX, testY, test, factor),
                List.copyOf(networks), data.dropped(), seed);
    }

    /** Trains for the scenario's epochs; returns {lossPerEpoch, {secondsPerEpoch}}. */
    private static double[][] train(ComputationGraph net, LawSpec penaltySpec, float[] xn, float[] yn, int rows,
            int k, int p, Scenario scenario, long orderSeed, Progress progress, String label) {
        int batch = Math.min(scenario.batchSize(), rows);
        int steps = (rows + batch - 1) / batch;
        int epochs = scenario.epochs();
        double[] loss = new double[epochs];
        long nanos = 0;
        int timed = 0;
        SplittableRandom order = new SplittableRandom(orderSeed);
        int[] perm = new int[rows];
        for (int i = 0; i < rows; i++) {
            perm[i] = i;
        }
        try (Progress.Task task = progress.start(label, epochs)) {
            for (int e = 0; e < epochs; e++) {
                for (int i = rows - 1; i > 0; i--) {
                    int j = order.nextInt(i + 1);
                    int t = perm[i];
                    perm[i] = perm[j];
                    perm[j] = t;
                }
                double sum = 0;
                long start = System.nanoTime();
                for (int b = 0; b < steps; b++) {
                    int from = b * batch;
                    int count = Math.min(batch, rows - from);
                    float[] bx = new float[count * k];
                    float[] by = new float[count * p];
                    for (int r = 0; r < count; r++) {
                        System.arraycopy(xn, perm[from + r] * k, bx, r * k, k);
                        System.arraycopy(yn, perm[from + r] * p, by, r * p, p);
                    }
                    DataSet ds = new DataSet(Nd4j.create(bx, new long[] {count, k}, 'c'),
                            Nd4j.create(by, new long[] {count, p}, 'c'));
                    if (penaltySpec != null) {
                        net.fit(ConstrainedGraph.penaltyData(penaltySpec, ds));
                    } else {
                        net.fit(ds);
                    }
                    sum += net.score();
                }
                // the first epoch also pays for compiling the code it runs (shared by every network, so it would
                // favour whichever network trains later): time the others when there are any
                if (e > 0 || epochs == 1) {
                    nanos += System.nanoTime() - start;
                    timed++;
                }
                loss[e] = sum / steps;
                task.stepTo(e + 1);
                task.message(String.format(java.util.Locale.ROOT, "loss %.3g", loss[e]));
            }
        }
        return new double[][] {loss, {nanos * 1e-9 / timed}};
    }

    /** Mean natural scale of each law over the rows, in its reporting unit. */
    private static double[] meanScales(LawEvaluator ev, double[] x, double[] y, int rows, double[] factor) {
        int m = ev.lawCount();
        double[] res = new double[rows * m];
        double[] scale = new double[rows * m];
        ev.residuals(x, y, rows, res, scale);
        double[] mean = new double[m];
        for (int s = 0; s < rows; s++) {
            for (int i = 0; i < m; i++) {
                mean[i] += scale[s * m + i];
            }
        }
        for (int i = 0; i < m; i++) {
            mean[i] /= rows * factor[i];
        }
        return mean;
    }

    private static INDArray matrix(double[] v, int rows, int cols, DataType type) {
        return Nd4j.create(v, new long[] {rows, cols}, 'c').castTo(type);
    }

    private static float[] toFloat(double[] v) {
        float[] f = new float[v.length];
        for (int i = 0; i < v.length; i++) {
            f[i] = (float) v[i];
        }
        return f;
    }

    private static double[] widen(float[] v) {
        double[] d = new double[v.length];
        for (int i = 0; i < v.length; i++) {
            d[i] = v[i];
        }
        return d;
    }
}
