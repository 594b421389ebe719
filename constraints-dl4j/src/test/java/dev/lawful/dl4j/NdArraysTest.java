package dev.lawful.dl4j;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;

import org.deeplearning4j.nn.workspace.ArrayType;
import org.deeplearning4j.nn.workspace.LayerWorkspaceMgr;
import org.junit.jupiter.api.Test;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.api.ndarray.INDArray;
import org.nd4j.linalg.factory.Nd4j;
import org.nd4j.linalg.indexing.NDArrayIndex;

/**
 * The bulk conversions between ND4J arrays and flat row-major doubles, against ND4J's own element access
 * ({@code getDouble}), for dense arrays, views, column-major arrays and both data types.
 */
class NdArraysTest {

    private static double[] elementWise(INDArray a) {
        double[] v = new double[(int) a.length()];
        for (int i = 0; i < a.rows(); i++) {
            for (int j = 0; j < a.columns(); j++) {
                v[i * a.columns() + j] = a.getDouble(i, j);
            }
        }
        return v;
    }

    @Test
    void everyLayoutReadsAsNd4jsOwnElementAccess() {
        for (DataType type : new DataType[] {DataType.FLOAT, DataType.DOUBLE}) {
            INDArray dense = Nd4j.rand(type, 7, 5);
            // Source: ND4J 1.0.0-M2.1 INDArray.getDouble (element access), the reference for every layout
            assertArrayEquals(elementWise(dense), NdArrays.toDouble(dense), type + " dense");
            INDArray f = dense.dup('f');
            assertArrayEquals(elementWise(f), NdArrays.toDouble(f), type + " column-major");
            INDArray cols = dense.get(NDArrayIndex.all(), NDArrayIndex.interval(1, 4));
            assertArrayEquals(elementWise(cols), NdArrays.toDouble(cols), type + " column view");
            INDArray rows = dense.get(NDArrayIndex.interval(2, 6), NDArrayIndex.all());
            assertArrayEquals(elementWise(rows), NdArrays.toDouble(rows), type + " row view");
        }
    }

    @Test
    void valuesWrittenIntoWorkspaceArraysReadBack() {
        double[] values = {1.5, -2.25, 1e-30, 3.0000001, 0, 7};
        for (DataType type : new DataType[] {DataType.FLOAT, DataType.DOUBLE}) {
            INDArray out = NdArrays.fromDouble(LayerWorkspaceMgr.noWorkspaces(), ArrayType.ACTIVATIONS, type, values,
                    2, 3);
            assertEquals(type, out.dataType());
            double[] expected = values.clone();
            if (type == DataType.FLOAT) {
                for (int i = 0; i < expected.length; i++) {
                    expected[i] = (float) expected[i];
                }
            }
            assertArrayEquals(expected, elementWise(out), type.toString());
        }
    }
}
