package dev.lawful.spark;

import dev.lawful.algebra.LawSet;
import dev.lawful.enforce.ResidualAccumulator;
import java.util.Arrays;
import java.util.Iterator;
import java.util.function.UnaryOperator;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.dataset.DataSet;

/**
 * Rows as Deeplearning4j data sets, for {@link LawfulSpark#verifyDataSets} and {@link LawfulSpark#verifyPredictions}:
 * each example's features are the law inputs (ignored when the laws have none), and the law outputs are its labels
 * or, with a {@link Predictor}, the network's predictions for its features; all in declared order and physical
 * units. Float32 values are widened to double exactly.
 */
final class DataSetRows implements DistributedCheck.Rows<DataSet> {
    private static final long serialVersionUID = 1L;

    private final String where;
    /** The network that predicts the outputs, or null when the labels are the outputs. */
    private final Predictor predictor;

    DataSetRows(String where, Predictor predictor) {
        this.where = where;
        this.predictor = predictor;
    }

    @Override
    public long count(DataSet data) {
        INDArray rows = predictor == null ? data.getLabels() : data.getFeatures();
        return rows == null ? 0 : rows.size(0);
    }

    @Override
    public void feed(Iterator<DataSet> sets, long first, LawSet laws, ResidualAccumulator a) {
        UnaryOperator<INDArray> predict = predictor == null || !sets.hasNext() ? null : predictor.open();
        long start = first;
        while (sets.hasNext()) {
            DataSet data = sets.next();
            int n = (int) count(data);
            double[] x = laws.inputWidth() == 0 ? null
                    : values(data.getFeatures(), n, laws.inputWidth(), "features", "inputs", start, laws);
            double[] y = predict == null
                    ? values(data.getLabels(), n, laws.outputWidth(), "labels", "outputs", start, laws)
                    : values(predict.apply(data.getFeatures()), n, laws.outputWidth(), "predictions", "outputs", start,
                            laws);
            a.add(x, y, n, start, null);
            start += n;
        }
    }

    /** @return {@code array}'s values, row-major in double, after checking it is {@code rows × width} */
    private double[] values(INDArray array, int rows, int width, String part, String role, long start, LawSet laws) {
        if (array == null || array.rank() != 2 || array.size(0) != rows || array.size(1) != width) {
            throw new IllegalArgumentException(where + ": the data set holding rows " + start + " to "
                    + (start + rows - 1) + " (counted from 0 in the RDD's order) has "
                    + (array == null ? "no " + part : part + " of shape " + Arrays.toString(array.shape()))
                    + "; expected " + rows + " × " + width + ", the law set's " + role + " in declared order ("
                    + DistributedCheck.layout(laws) + " are its inputs then its outputs)");
        }
        return array.castTo(DataType.DOUBLE).dup('c').data().asDouble();
    }
}
