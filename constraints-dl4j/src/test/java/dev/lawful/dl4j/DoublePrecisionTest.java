package dev.lawful.dl4j;

import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.nd4j.linalg.api.buffer.DataType;
import org.nd4j.linalg.factory.Nd4j;

/**
 * Base of the gradient-check tests: Deeplearning4j's checker refuses to run unless ND4J's default data type is
 * double, so it is set for the class and restored afterwards (other tests in the same JVM keep their defaults).
 */
abstract class DoublePrecisionTest {
    private static DataType savedDefault;
    private static DataType savedFloatingDefault;

    @BeforeAll
    static void doublePrecision() {
        savedDefault = Nd4j.dataType();
        savedFloatingDefault = Nd4j.defaultFloatingPointType();
        Nd4j.setDefaultDataTypes(DataType.DOUBLE, DataType.DOUBLE);
    }

    @AfterAll
    static void restorePrecision() {
        Nd4j.setDefaultDataTypes(savedDefault, savedFloatingDefault);
    }
}
