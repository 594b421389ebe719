package dev.lawful.spark;

import dev.lawful.algebra.LawSet;
import dev.lawful.enforce.ResidualAccumulator;
import java.util.Iterator;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.dataset.DataSet;

/**
 * Rows as Deeplearning4j data sets for {@link LawfulSpark#verifyDataSets}: each example's features are the law
 * inputs and its labels the law outputs, in declared order and units. Float32 values are widened to double exactly.
 */
final class DataSetRows implements DistributedCheck.Rows<DataSet> {
    private static final long serialVersionUID = 1L;

    @Override
    public long count(DataSet data) {
        return data.getLabels() == null ? 0 : data.getLabels().size(0);
    }

    @Override
    public void feed(Iterator<DataSet> sets, long first, LawSet laws, ResidualAccumulator a) {
        long start = first;
        while (sets.hasNext()) {
            DataSet data = sets.next();
            int n = (int) count(data);
            double[] x = laws.inputWidth() == 0 ? null
                    : values(data.getFeatures(), n, laws.inputWidth(), "features", "inputs", start, laws);
            double[] y = values(data.getLabels(), n, laws.outputWidth(), "labels", "outputs", start, laws);
            a.add(x, y, n, start, null);
            start += n;
        }
    }

    /** @return {@code array}'s values, row-major in double, after checking it is {@code rows × width} */
    private static double[] values(INDArray array, int rows, int width, String part, String role, long start,
                                   LawSet laws) {
        if (array == null || array.rank() != 2 || array.size(0) != rows || array.size(1) != width) {
            throw new IllegalArgumentException("LawfulSpark.verifyDataSets: the data set holding rows " + start
                    + " to " + (start + rows - 1) + " (counted from 0 in the RDD's order) has "
                    + (array == null ? "no " + part : part + " of shape " + java.util.Arrays.toString(array.shape()))
                    + "; expected " + rows + " × " + width + ", the law set's " + role + " in declared order ("
                    + DistributedCheck.layout(laws) + " are its inputs then its outputs)");
        }
        return array.castTo(DataType.DOUBLE).dup('c').data().asDouble();
    }
}
