package dev.lawful.spark;

import org.apache.spark.api.java.JavaDoubleRDD;
import org.apache.spark.api.java.JavaPairRDD;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.api.java.JavaSparkContext;
import org.deeplearning4j.core.loader.DataSetLoader;
import org.deeplearning4j.core.loader.MultiDataSetLoader;
import org.deeplearning4j.nn.graph.ComputationGraph;
import org.deeplearning4j.spark.api.TrainingMaster;
import org.deeplearning4j.spark.impl.graph.SparkComputationGraph;
import org.nd4j.evaluation.IEvaluation;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.dataset.DataSet;
import org.nd4j.linalg.dataset.api.MultiDataSet;

/**
 * {@link SparkComputationGraph} whose scoring, evaluation and inference on the executors run on a copy of the graph,
 * for the reason {@link CopyScoringMultiLayer} gives. See {@link LawfulSpark#graph}.
 */
final class CopyScoringGraph extends SparkComputationGraph {
    private static final long serialVersionUID = 1L;

    /** True for the throw-away copy that does the work: its calls go to Deeplearning4j directly. */
    private final boolean isCopy;

    CopyScoringGraph(JavaSparkContext sc, ComputationGraph net, TrainingMaster<?, ?> master, boolean isCopy) {
        super(sc, net, master);
        this.isCopy = isCopy;
    }

    /** @return a trainer over a copy of the graph, whose parameters Spark may close when it likes */
    private CopyScoringGraph copy() {
        return new CopyScoringGraph(getSparkContext(), getNetwork().clone(), getTrainingMaster(), true);
    }

    @Override
    public double calculateScore(JavaRDD<DataSet> data, boolean average, int minibatchSize) {
        return isCopy ? super.calculateScore(data, average, minibatchSize)
                : copy().calculateScore(data, average, minibatchSize);
    }

    @Override
    public double calculateScoreMultiDataSet(JavaRDD<MultiDataSet> data, boolean average, int minibatchSize) {
        return isCopy ? super.calculateScoreMultiDataSet(data, average, minibatchSize)
                : copy().calculateScoreMultiDataSet(data, average, minibatchSize);
    }

    @Override
    public JavaDoubleRDD scoreExamplesMultiDataSet(JavaRDD<MultiDataSet> data, boolean includeRegularizationTerms,
                                                   int batchSize) {
        return isCopy ? super.scoreExamplesMultiDataSet(data, includeRegularizationTerms, batchSize)
                : copy().scoreExamplesMultiDataSet(data, includeRegularizationTerms, batchSize);
    }

    @Override
    public <K> JavaPairRDD<K, Double> scoreExamplesMultiDataSet(JavaPairRDD<K, MultiDataSet> data,
                                                                boolean includeRegularizationTerms, int batchSize) {
        return isCopy ? super.scoreExamplesMultiDataSet(data, includeRegularizationTerms, batchSize)
                : copy().scoreExamplesMultiDataSet(data, includeRegularizationTerms, batchSize);
    }

    @Override
    public <K> JavaPairRDD<K, INDArray[]> feedForwardWithKey(JavaPairRDD<K, INDArray[]> featuresData, int batchSize) {
        return isCopy ? super.feedForwardWithKey(featuresData, batchSize)
                : copy().feedForwardWithKey(featuresData, batchSize);
    }

    @Override
    @SafeVarargs
    public final <T extends IEvaluation> T[] doEvaluation(JavaRDD<DataSet> data, int evalNumWorkers, int evalBatchSize,
                                                          T... emptyEvaluations) {
        return isCopy ? super.doEvaluation(data, evalNumWorkers, evalBatchSize, emptyEvaluations)
                : copy().doEvaluation(data, evalNumWorkers, evalBatchSize, emptyEvaluations);
    }

    @Override
    @SafeVarargs
    public final <T extends IEvaluation> T[] doEvaluationMDS(JavaRDD<MultiDataSet> data, int evalNumWorkers,
                                                             int evalBatchSize, T... emptyEvaluations) {
        return isCopy ? super.doEvaluationMDS(data, evalNumWorkers, evalBatchSize, emptyEvaluations)
                : copy().doEvaluationMDS(data, evalNumWorkers, evalBatchSize, emptyEvaluations);
    }

    @Override
    protected IEvaluation[] doEvaluation(JavaRDD<String> data, int evalNumWorkers, int evalBatchSize,
                                         DataSetLoader loader, MultiDataSetLoader mdsLoader,
                                         IEvaluation... emptyEvaluations) {
        return isCopy ? super.doEvaluation(data, evalNumWorkers, evalBatchSize, loader, mdsLoader, emptyEvaluations)
                : copy().doEvaluation(data, evalNumWorkers, evalBatchSize, loader, mdsLoader, emptyEvaluations);
    }
}
