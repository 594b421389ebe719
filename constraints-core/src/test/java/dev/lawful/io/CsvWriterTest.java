package dev.lawful.io;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.math.BigDecimal;
import java.math.MathContext;
import java.math.RoundingMode;
import java.util.List;
import java.util.SplittableRandom;
import java.util.regex.Pattern;
import org.junit.jupiter.api.Test;

/** {@link CsvWriter}: the shortest round-trip numbers of {@link ShortestDecimal}, quoting, and reading back. */
class CsvWriterTest {

    /** The layout {@link ShortestDecimal} promises: plain without a trailing zero, or d[.ddd]eN. */
    private static final Pattern PLAIN = Pattern.compile("-?(0|[1-9][0-9]*)(\\.[0-9]*[1-9])?");
    private static final Pattern SCIENTIFIC = Pattern.compile("-?[1-9](\\.[0-9]*[1-9])?e-?[1-9][0-9]*");

    // ---- known shortest forms ------------------------------------------------------------------------------

    @Test
    void knownShortestForms() {
        // Source: shortest round-trip decimal (common practice; Java 19+ Double.toString specification)
        assertEquals("0.1", ShortestDecimal.format(0.1));
        assertEquals("1e23", ShortestDecimal.format(1e23));          // Java 17: 9.999999999999999E22
        assertEquals("2e23", ShortestDecimal.format(2e23));          // Java 17: 1.9999999999999998E23
        assertEquals("8.41e21", ShortestDecimal.format(8.41e21));    // Java 17: 8.409999999999999E21
        assertEquals("2.82879384806159e17", ShortestDecimal.format(2.82879384806159e17)); // Java 17: 18 digits
        assertEquals("1.7976931348623157e308", ShortestDecimal.format(Double.MAX_VALUE));
        assertEquals("0.30000000000000004", ShortestDecimal.format(0.1 + 0.2));
        assertEquals("2.2250738585072014e-308", ShortestDecimal.format(Double.MIN_NORMAL));
        assertEquals("0.3333333333333333", ShortestDecimal.format(1.0 / 3));
        assertEquals("9.007199254740992e15", ShortestDecimal.format(0x1p53));
        // 2^-1074, the smallest subnormal: one digit reads back (Java 19+ writes 4.9E-324, preferring two digits
        // that are nearer when one digit suffices; the fewest digits win here)
        assertEquals("5e-324", ShortestDecimal.format(5e-324));
        assertEquals("5e-324", ShortestDecimal.format(Math.scalb(1.0, -1074)));
        assertEquals("1e-323", ShortestDecimal.format(2 * Double.MIN_VALUE));
        assertEquals("-1.5", ShortestDecimal.format(-1.5));
    }

    @Test
    void layoutIsPlainFromOneThousandthToTenMillionAndScientificOutside() {
        // Source: the layout rule of ShortestDecimal's class comment (this project's own format)
        assertEquals("1", ShortestDecimal.format(1));
        assertEquals("100", ShortestDecimal.format(100));
        assertEquals("1234567", ShortestDecimal.format(1234567));
        assertEquals("1e7", ShortestDecimal.format(1e7));
        assertEquals("1.2345678e7", ShortestDecimal.format(12345678));
        assertEquals("0.001", ShortestDecimal.format(0.001));
        assertEquals("1e-4", ShortestDecimal.format(1e-4));
        assertEquals("1.5e-5", ShortestDecimal.format(1.5e-5));
        assertEquals("12.5", ShortestDecimal.format(12.5));
        assertEquals("0", ShortestDecimal.format(0.0));
        assertEquals("-0", ShortestDecimal.format(-0.0));
        assertEquals("NaN", ShortestDecimal.format(Double.NaN));
        assertEquals("Infinity", ShortestDecimal.format(Double.POSITIVE_INFINITY));
        assertEquals("-Infinity", ShortestDecimal.format(Double.NEGATIVE_INFINITY));
        for (String s : List.of("-0", "NaN", "Infinity", "-Infinity")) {
            double v = Double.parseDouble(s);
            assertEquals(Double.doubleToRawLongBits(v), Double.doubleToRawLongBits(
                    Double.parseDouble(ShortestDecimal.format(v))), s);
        }
    }

    // ---- exhaustive random checks --------------------------------------------------------------------------

    @Test
    void randomBitPatternsRoundTripBitExactlyWithTheFewestDigits() {
        SplittableRandom random = new SplittableRandom(0x5107_7E57L);
        int shorter = 0;
        for (int trial = 0; trial < 20_000; trial++) {
            long bits = random.nextLong();
            // one in eight a subnormal, where the rounding interval is widest relative to the value
            double v = Double.longBitsToDouble(trial % 8 == 0 ? bits & 0x800F_FFFF_FFFF_FFFFL : bits);
            if (!Double.isFinite(v)) {
                continue;
            }
            String text = ShortestDecimal.format(v);
            assertEquals(Double.doubleToRawLongBits(v), Double.doubleToRawLongBits(Double.parseDouble(text)), text);
            assertTrue(PLAIN.matcher(text).matches() || SCIENTIFIC.matcher(text).matches(), text);
            int digits = digits(text);
            int java = ShortestDecimal.significantDigits(Double.toString(Math.abs(v)));
            assertTrue(digits <= java, text + " is longer than Java's " + Double.toString(v));
            if (digits < java) {
                shorter++;
            }
            assertFewestAndNearest(Math.abs(v), digits, text);
        }
        // Java 17 writes a digit too many now and then; the check above would pass vacuously if it never did
        assertTrue(shorter > 0, "expected some values where Java 17's Double.toString is not shortest");
    }

    /**
     * Independent of the bisection in ShortestDecimal: no decimal of one digit fewer reads back (the nearest such
     * decimal, by half-even rounding, and its neighbours one unit in the last place away), and when the nearest
     * decimal of the found length reads back it is the one chosen.
     */
    private static void assertFewestAndNearest(double a, int digits, String text) {
        BigDecimal exact = new BigDecimal(a);
        if (digits > 1) {
            BigDecimal near = exact.round(new MathContext(digits - 1, RoundingMode.HALF_EVEN));
            BigDecimal ulp = near.ulp();
            for (BigDecimal c : List.of(near, near.add(ulp), near.subtract(ulp))) {
                assertTrue(c.signum() <= 0 || Double.parseDouble(c.toString()) != a,
                        text + ": " + c + " has fewer digits and reads back too");
            }
        }
        BigDecimal nearest = exact.round(new MathContext(digits, RoundingMode.HALF_EVEN));
        if (Double.parseDouble(nearest.toString()) == a) {
            assertEquals(0, nearest.compareTo(new BigDecimal(text.startsWith("-") ? text.substring(1) : text)),
                    text + " is not the nearest " + digits + "-digit decimal " + nearest);
        }
    }

    @Test
    void decimalsOfAtMostFifteenDigitsComeBackAsWritten() {
        // Source: ISO C <float.h> DBL_DIG = 15 for IEEE 754 binary64 (from memory): every decimal of at most 15
        // significant digits survives a round trip through a double, and no other decimal of at most 15 digits
        // lies in its rounding interval, so it is the unique shortest form
        SplittableRandom random = new SplittableRandom(0xD161_7515L);
        for (int trial = 0; trial < 20_000; trial++) {
            int k = 1 + random.nextInt(15);
            long unscaled = random.nextLong(1, 10);
            for (int i = 1; i < k; i++) {
                unscaled = unscaled * 10 + random.nextInt(10);
            }
            int exponent = random.nextInt(-300, 300);
            BigDecimal written = new BigDecimal(java.math.BigInteger.valueOf(unscaled), -exponent + k - 1)
                    .stripTrailingZeros();
            double v = Double.parseDouble(written.toString());
            if (v == 0 || Double.isInfinite(v) || Math.abs(v) < Double.MIN_NORMAL) {
                continue;
            }
            ShortestDecimal.Decimal d = ShortestDecimal.shortest(v);
            assertEquals(written.unscaledValue().toString(), d.digits(), written + " -> " + ShortestDecimal.format(v));
            assertEquals(written.precision() - 1 - written.scale(), d.exponent(), written.toString());
            assertEquals(0, written.compareTo(new BigDecimal(ShortestDecimal.format(v))), written.toString());
        }
    }

    @Test
    void everyPowerOfTwoRoundTrips() {
        // powers of two sit on the boundary where the rounding interval is lopsided (half as wide below)
        for (int e = -1074; e <= 1023; e++) {
            double v = Math.scalb(1.0, e);
            String text = ShortestDecimal.format(v);
            assertEquals(v, Double.parseDouble(text), text);
            assertFewestAndNearest(v, digits(text), text);
        }
    }

    /** @return the significant digits of a text in ShortestDecimal's layout */
    private static int digits(String text) {
        String s = text.startsWith("-") ? text.substring(1) : text;
        int e = s.indexOf('e');
        if (e >= 0) {
            s = s.substring(0, e);
        }
        s = s.replace(".", "").replaceFirst("^0+", "").replaceFirst("0+$", "");
        return Math.max(1, s.length());
    }

    // ---- the writer ----------------------------------------------------------------------------------------

    @Test
    void writesHeaderRowsAndQuotesOnlyWhatNeedsIt() {
        StringBuilder sb = new StringBuilder();
        CsvWriter csv = new CsvWriter(sb).header(List.of("feed[0]", "a,b", "say \"hi\"", " padded", "#x", "T"));
        csv.value(0.1).value(1e23).value(-0.0).value(Double.NaN).value(Double.NEGATIVE_INFINITY).value("ok")
                .endRow();
        csv.values(new double[] {9, 1, 2, 3, 4, 5, 6}, 1, 5).value("singular system").endRow();
        assertEquals("feed[0],\"a,b\",\"say \"\"hi\"\"\",\" padded\",\"#x\",T\n"
                + "0.1,1e23,-0,NaN,-Infinity,ok\n"
                + "1,2,3,4,5,singular system\n", sb.toString());
        CsvReader back = CsvReader.of("back.csv", sb.toString());
        assertEquals(List.of("feed[0]", "a,b", "say \"hi\"", " padded", "#x", "T"), back.header());
    }

    @Test
    void randomTablesReadBackBitForBit() {
        SplittableRandom random = new SplittableRandom(0xC5F0_0D5L);
        for (int trial = 0; trial < 20; trial++) {
            int width = 1 + random.nextInt(8);
            int rows = random.nextInt(40);
            List<String> names = new java.util.ArrayList<>();
            for (int c = 0; c < width; c++) {
                names.add(c % 3 == 2 ? "v, " + c : "out[" + c + "]");
            }
            double[] values = new double[rows * width];
            for (int i = 0; i < values.length; i++) {
                int kind = random.nextInt(10);
                values[i] = kind == 0 ? Double.NaN : kind == 1 ? Double.POSITIVE_INFINITY : kind == 2 ? -0.0
                        : kind < 6 ? Double.longBitsToDouble(random.nextLong()) : random.nextDouble(-1e6, 1e6);
                if (!Double.isFinite(values[i]) && kind > 1) {
                    values[i] = 1.5;
                }
            }
            StringBuilder sb = new StringBuilder();
            CsvWriter csv = new CsvWriter(sb).header(names);
            for (int r = 0; r < rows; r++) {
                csv.values(values, r * width, width).endRow();
            }
            CsvTable table = CsvTable.parse("t.csv", sb.toString());
            assertEquals(names, table.columns());
            assertEquals(rows, table.rows());
            double[] back = table.values();
            for (int i = 0; i < values.length; i++) {
                assertEquals(Double.doubleToLongBits(values[i]), Double.doubleToLongBits(back[i]),
                        "value " + i + ": " + values[i]);
            }
        }
    }

    @Test
    void misuseIsRefused() {
        CsvWriter none = new CsvWriter(new StringBuilder());
        assertEquals("write the header first", assertThrows(IllegalStateException.class, () -> none.value(1))
                .getMessage());
        assertThrows(IllegalArgumentException.class, () -> none.header(List.of()));
        CsvWriter csv = new CsvWriter(new StringBuilder()).header(List.of("a", "b"));
        assertThrows(IllegalStateException.class, () -> csv.header(List.of("c")));
        csv.value(1);
        assertEquals("a row needs 2 values, found 1", assertThrows(IllegalStateException.class, csv::endRow)
                .getMessage());
        csv.value(2);
        assertEquals("the row already has 2 values; call endRow()",
                assertThrows(IllegalStateException.class, () -> csv.value(3)).getMessage());
        csv.endRow();
        assertThrows(IllegalArgumentException.class, () -> csv.value("two\nlines"));
    }
}
