package dev.lawful.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;

import java.util.Random;
import java.util.zip.CRC32;
import org.junit.jupiter.api.Test;

/** {@link Crc32Combine} against {@link java.util.zip.CRC32} run over the two strings one after the other. */
class Crc32CombineTest {

    private static long crc(byte[] b, int from, int length) {
        CRC32 c = new CRC32();
        c.update(b, from, length);
        return c.getValue();
    }

    @Test
    void combinedCrcEqualsTheCrcOfTheConcatenation() {
        Random random = new Random(7);
        for (int trial = 0; trial < 200; trial++) {
            byte[] b = new byte[random.nextInt(5000)];
            random.nextBytes(b);
            int cut = b.length == 0 ? 0 : random.nextInt(b.length + 1);
            assertEquals(crc(b, 0, b.length), Crc32Combine.combine(crc(b, 0, cut), crc(b, cut, b.length - cut),
                    b.length - cut), "length " + b.length + " cut at " + cut);
        }
    }
}
