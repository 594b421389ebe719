package dev.lawful.spark;

import org.apache.spark.api.java.JavaDoubleRDD;
import org.apache.spark.api.java.JavaPairRDD;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.api.java.JavaSparkContext;
import org.deeplearning4j.core.loader.DataSetLoader;
import org.deeplearning4j.core.loader.MultiDataSetLoader;
import org.deeplearning4j.nn.multilayer.MultiLayerNetwork;
import org.deeplearning4j.spark.api.TrainingMaster;
import org.deeplearning4j.spark.impl.multilayer.SparkDl4jMultiLayer;
import org.nd4j.evaluation.IEvaluation;
import org.nd4j.evaluation.classification.Evaluation;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.dataset.DataSet;
import scala.Tuple2;

/**
 * {@link SparkDl4jMultiLayer} whose scoring, evaluation and inference on the executors run on a copy of the
 * network. Deeplearning4j 1.0.0-M2 broadcasts the network's own parameter array for them, and Spark 3 closes an
 * {@code AutoCloseable} broadcast value when it removes the broadcast (at the latest when the context cleaner
 * collects it), which frees the driver network's parameters under it: the next training round then fails with "Op.Z
 * argument was closed before call", or worse reads freed memory (measured with the Kryo serializer; see
 * docs/platform-facts.md). Training ({@code fit}) broadcasts a copy itself and
 * is unchanged. See {@link LawfulSpark#multiLayer}.
 */
final class CopyScoringMultiLayer extends SparkDl4jMultiLayer {
    private static final long serialVersionUID = 1L;

    /** True for the throw-away copy that does the work: its calls go to Deeplearning4j directly. */
    private final boolean isCopy;

    CopyScoringMultiLayer(JavaSparkContext sc, MultiLayerNetwork net, TrainingMaster<?, ?> master, boolean isCopy) {
        super(sc, net, master);
        this.isCopy = isCopy;
    }

    /** @return a trainer over a copy of the network, whose parameters Spark may close when it likes */
    private CopyScoringMultiLayer copy() {
        return new CopyScoringMultiLayer(getSparkContext(), getNetwork().clone(), getTrainingMaster(), true);
    }

    @Override
    public double calculateScore(JavaRDD<DataSet> data, boolean average, int minibatchSize) {
        return isCopy ? super.calculateScore(data, average, minibatchSize)
                : copy().calculateScore(data, average, minibatchSize);
    }

    @Override
    public JavaDoubleRDD scoreExamples(JavaRDD<DataSet> data, boolean includeRegularizationTerms, int batchSize) {
        return isCopy ? super.scoreExamples(data, includeRegularizationTerms, batchSize)
                : copy().scoreExamples(data, includeRegularizationTerms, batchSize);
    }

    @Override
    public <K> JavaPairRDD<K, Double> scoreExamples(JavaPairRDD<K, DataSet> data, boolean includeRegularizationTerms,
                                                    int batchSize) {
        return isCopy ? super.scoreExamples(data, includeRegularizationTerms, batchSize)
                : copy().scoreExamples(data, includeRegularizationTerms, batchSize);
    }

    @Override
    public <K> JavaPairRDD<K, INDArray> feedForwardWithMaskAndKey(
            JavaPairRDD<K, Tuple2<INDArray, INDArray>> featuresDataAndMask, int batchSize) {
        return isCopy ? super.feedForwardWithMaskAndKey(featuresDataAndMask, batchSize)
                : copy().feedForwardWithMaskAndKey(featuresDataAndMask, batchSize);
    }

    @Override
    @SafeVarargs
    public final <T extends IEvaluation> T[] doEvaluation(JavaRDD<DataSet> data, int evalNumWorkers, int evalBatchSize,
                                                          T... emptyEvaluations) {
        return isCopy ? super.doEvaluation(data, evalNumWorkers, evalBatchSize, emptyEvaluations)
                : copy().doEvaluation(data, evalNumWorkers, evalBatchSize, emptyEvaluations);
    }

    @Override
    protected IEvaluation[] doEvaluation(JavaRDD<String> data, int evalNumWorkers, int evalBatchSize,
                                         DataSetLoader loader, MultiDataSetLoader mdsLoader,
                                         IEvaluation... emptyEvaluations) {
        return isCopy ? super.doEvaluation(data, evalNumWorkers, evalBatchSize, loader, mdsLoader, emptyEvaluations)
                : copy().doEvaluation(data, evalNumWorkers, evalBatchSize, loader, mdsLoader, emptyEvaluations);
    }

    @Override
    public <T extends Evaluation> T evaluate(String path, int batchSize, DataSetLoader loader) {
        return isCopy ? super.evaluate(path, batchSize, loader) : copy().evaluate(path, batchSize, loader);
    }
}
