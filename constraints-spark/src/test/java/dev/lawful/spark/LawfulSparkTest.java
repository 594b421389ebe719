package dev.lawful.spark;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import java.io.File;
import java.io.IOException;
import java.io.OutputStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.jar.Attributes;
import java.util.jar.JarOutputStream;
import java.util.jar.Manifest;
import org.apache.spark.SparkConf;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The settings, checks and refusals of {@link LawfulSpark}, without a Spark context. */
class LawfulSparkTest {

    @Test
    void aManifestOnlyJarStandsForTheEntriesItsManifestNames(@TempDir Path temp) throws IOException {
        Path dir = Files.createDirectories(temp.resolve("lib dir"));
        Path a = jar(temp.resolve("a.jar"), "b.jar lib%20dir/c.jar");
        Path b = jar(temp.resolve("b.jar"), "a.jar");           // a cycle: each entry once
        Path c = jar(dir.resolve("c.jar"), null);
        Path classes = Files.createDirectories(temp.resolve("classes"));
        List<String> expanded = LawfulSpark.expand(a + File.pathSeparator + classes + File.pathSeparator + c);
        assertEquals(List.of(a.toString(), b.toString(), c.toString(), classes.toString()), expanded);
    }

    @Test
    void theKryoSerializerGetsNd4jsRegistratorAndExecutorsOneOpenMpThread() {
        SparkConf kryo = LawfulSpark.configure(new SparkConf(false).set("spark.serializer", LawfulSpark.KRYO));
        assertEquals("org.nd4j.kryo.Nd4jRegistrator", kryo.get("spark.kryo.registrator"));
        assertEquals("1", kryo.get("spark.executorEnv.OMP_NUM_THREADS"));
        SparkConf own = LawfulSpark.configure(new SparkConf(false).set("spark.serializer", LawfulSpark.KRYO)
                .set("spark.kryo.registrator", "my.Registrator").set("spark.executorEnv.OMP_NUM_THREADS", "4"));
        assertEquals("my.Registrator", own.get("spark.kryo.registrator"));
        assertEquals("4", own.get("spark.executorEnv.OMP_NUM_THREADS"));
        assertEquals(false, LawfulSpark.configure(new SparkConf(false)).contains("spark.kryo.registrator"));
    }

    @Test
    void theExecutorClassPathStartsWithTheDriversAndKeepsWhatWasSet() {
        SparkConf conf = LawfulSpark.shareDriverClassPath(new SparkConf(false)
                .set("spark.executor.extraClassPath", "/opt/extra.jar"));
        String joined = String.join(File.pathSeparator, LawfulSpark.driverClassPath());
        assertEquals(joined + File.pathSeparator + "/opt/extra.jar", conf.get("spark.executor.extraClassPath"));
    }

    @Test
    void onlyParameterAveragingIsAccepted() {
        UnsupportedOperationException e = assertThrows(UnsupportedOperationException.class,
                () -> LawfulSpark.multiLayer(null, null, null));
        assertEquals("training master null is not supported with law layers: use ParameterAveragingTrainingMaster"
                + " (LawfulSpark.parameterAveraging(examplesPerDataSet, batchSizePerWorker)); SharedTrainingMaster"
                + " hung or trained nothing across executor JVMs in Deeplearning4j 1.0.0-M2", e.getMessage());
        assertThrows(UnsupportedOperationException.class, () -> LawfulSpark.graph(null, null, null));
        IllegalArgumentException size = assertThrows(IllegalArgumentException.class,
                () -> LawfulSpark.parameterAveraging(32, 0));
        assertEquals("parameterAveraging: examplesPerDataSet (32) and batchSizePerWorker (0) must be positive",
                size.getMessage());
    }

    @Test
    void aDriverWithoutTheFlagsIsToldWhichAndWhere() {
        // the module's Surefire argLine lists LawfulSpark.DRIVER_JAVA_OPTIONS, as the README tells users to
        LawfulSpark.checkDriverJvm();
        assertEquals("this JVM cannot run a Spark driver on Java " + Runtime.version().feature() + ": it was started"
                + " without --add-opens=java.base/sun.nio.ch=ALL-UNNAMED; add it to the java command line, to"
                + " spark-submit's --driver-java-options, or to Maven Surefire's argLine (LawfulSpark.DRIVER_JAVA_OPTIONS"
                + " lists them all)", LawfulSpark.missingFlags(List.of("--add-opens=java.base/sun.nio.ch=ALL-UNNAMED")));
    }

    private static Path jar(Path file, String classPath) throws IOException {
        Manifest m = new Manifest();
        m.getMainAttributes().put(Attributes.Name.MANIFEST_VERSION, "1.0");
        if (classPath != null) {
            m.getMainAttributes().put(Attributes.Name.CLASS_PATH, classPath);
        }
        try (OutputStream out = Files.newOutputStream(file); JarOutputStream jar = new JarOutputStream(out, m)) {
            jar.flush();
        }
        return file;
    }
}
