package dev.lawful.io;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** {@link CsvReader} and {@link CsvTable}: the accepted format, and every error with its line and column. */
class CsvReaderTest {

    @TempDir
    Path temp;

    private static final String TWELVE = "feed[0],feed[1],feed[2],feed[3],feed[4],feed[5],T,out[0],out[1],out[2],"
            + "out[3],out[4]";

    private static CsvException error(String text) {
        return assertThrows(CsvException.class, () -> CsvTable.parse("data.csv", text));
    }

    // ---- what is accepted ----------------------------------------------------------------------------------

    @Test
    void readsHeaderAndRowsSkippingCommentsAndBlankLines() {
        String text = "# demo\n\n  feed[0] , \"T\",\"out[2]\"  \n1,2,3\n   \n# between\n-4.5e-3, +6 ,.5\n";
        CsvTable t = CsvTable.parse("data.csv", text);
        assertEquals(List.of("feed[0]", "T", "out[2]"), t.columns());
        assertEquals(2, t.rows());
        assertArrayEquals(new double[] {1, 2, 3, -4.5e-3, 6, 0.5}, t.values());
        assertEquals(4, t.line(0));
        assertEquals(7, t.line(1));
        assertEquals(1, t.column("T"));
        assertEquals(-1, t.column("t"));
        assertEquals(0.5, t.get(1, 2));
        assertArrayEquals(new double[] {3, 1, 0.5, -4.5e-3}, t.gather(List.of("out[2]", "feed[0]")));
    }

    @Test
    void quotedHeaderNamesKeepCommasQuotesAndInnerSpaces() {
        CsvReader r = CsvReader.of("q.csv", "\"a,b\", \"say \"\"hi\"\"\" ,\" x \"\n1,2,3\n");
        assertEquals(List.of("a,b", "say \"hi\"", " x "), r.header());
        assertEquals(1, r.headerLine());
        assertArrayEquals(new double[] {1, 2, 3}, r.readAll().values());
    }

    @Test
    void lineEndsOfEveryKindCountAsEditorsCountThem() {
        assertEquals(3, CsvTable.parse("d.csv", "\uFEFFa,b\r\n\r\n1,2\r\n").line(0));
        assertEquals(3, CsvTable.parse("d.csv", "a,b\r\r1,2").line(0));
        assertEquals(List.of("a", "b"), CsvTable.parse("d.csv", "\uFEFFa,b\n").columns(), "byte order mark");
        CsvException e = error("a,b\r\n\r\n1,2\r\n1\r\n");
        assertEquals(4, e.line());
    }

    @Test
    void numbersInEveryAcceptedForm() {
        String[] accepted = {"12", "-0.5", ".5", "1.", "6.02e23", "1E-5", "+3", "-0", "NaN", "nan", "-Inf", "inf",
            "Infinity", "+INFINITY", "1e+3", "0005"};
        double[] expected = {12, -0.5, 0.5, 1, 6.02e23, 1e-5, 3, -0.0, Double.NaN, Double.NaN,
            Double.NEGATIVE_INFINITY, Double.POSITIVE_INFINITY, Double.POSITIVE_INFINITY, Double.POSITIVE_INFINITY,
            1000, 5};
        for (int i = 0; i < accepted.length; i++) {
            double v = CsvTable.parse("n.csv", "x\n" + accepted[i] + "\n").get(0, 0);
            assertEquals(Double.doubleToLongBits(expected[i]), Double.doubleToLongBits(v), accepted[i]);
        }
        for (String refused : List.of("0x1p3", "1d", "1f", "1_000", "1e", "e5", ".", "+", "--1", "1 2", "1,5e",
                "Infinit", "NaN1", "1e5.5", "١")) {
            assertFalse(CsvReader.isNumber(refused), refused);
        }
    }

    @Test
    void readsOnlyTheColumnsAskedForInTheirOrder() {
        CsvReader r = CsvReader.of("full.csv", "x,status,y\n1,ok,2\n3,singular system,4\n");
        CsvTable t = r.read(List.of("y", "x"));
        assertEquals(List.of("y", "x"), t.columns());
        assertArrayEquals(new double[] {2, 1, 4, 3}, t.values());
        assertThrows(IllegalStateException.class, () -> r.read(List.of("x")));
        assertThrows(IllegalArgumentException.class, () -> CsvReader.of("f.csv", "x\n").read(List.of("z")));
        assertThrows(IllegalArgumentException.class, () -> CsvReader.of("f.csv", "x\n").read(List.of("x", "x")));
    }

    @Test
    void headerWithoutRowsIsAnEmptyTable() {
        CsvTable t = CsvTable.parse("h.csv", "a,b\n# nothing yet\n");
        assertEquals(0, t.rows());
        assertEquals(2, t.width());
    }

    // ---- errors, word for word -----------------------------------------------------------------------------

    @Test
    void rowOfTheWrongLengthNamesItsLine() {
        String row = "1,2,3,4,5,6,7,8,9,10,11,12\n";
        String text = "# reformer\n" + TWELVE + "\n" + row + "\n" + row + "# short row next\n" + "1,2,3,4,5,6,7,8,9,10,11\n";
        CsvException e = error(text);
        assertEquals("data.csv: line 7: expected 12 values, found 11", e.getMessage());
        assertEquals(7, e.line());
        assertNull(e.column());
        assertEquals("data.csv", e.source());
        assertEquals("expected 12 values, found 11", e.detail());
        assertEquals("data.csv: line 2: expected 1 value, found 2", error("x\n1,2\n").getMessage());
    }

    @Test
    void valueThatIsNotANumberNamesLineAndColumn() {
        String text = TWELVE + "\n\n\n\n\n\n1,2,3,4,5,6,7,8,9,abc,11,12\n";
        CsvException e = error(text);
        assertEquals("data.csv: line 7, column 'out[2]': 'abc' is not a number", e.getMessage());
        assertEquals("out[2]", e.column());
        assertEquals("data.csv: line 2, column 'b': the value is empty; expected a number",
                error("a,b\n1,\n").getMessage());
        assertEquals("data.csv: line 2, column 'a': '" + "9".repeat(39) + "x..." + "' is not a number",
                error("a\n" + "9".repeat(39) + "x" + "9".repeat(10) + "\n").getMessage());
    }

    @Test
    void emptyFileAndFileOfCommentsHaveNoHeader() {
        for (String text : List.of("", "\n\n", "# only a comment\n   \n")) {
            CsvException e = error(text);
            assertEquals("data.csv: the file has no header row; expected a first line naming the columns",
                    e.getMessage());
            assertEquals(0, e.line());
        }
    }

    @Test
    void duplicateAndEmptyHeaderNamesAreRefused() {
        assertEquals("data.csv: line 2, column 'T': the name appears twice in the header (columns 1 and 3)",
                error("# x\nT, out[0], T\n").getMessage());
        assertEquals("data.csv: line 1: column 2 of the header has no name", error("a,,b\n").getMessage());
        assertEquals("data.csv: line 1: column 3 of the header has no name", error("a,b,\n1,2,3\n").getMessage());
    }

    @Test
    void brokenQuotesNameTheirLine() {
        assertEquals("data.csv: line 1: value 2 opens a quote that is not closed on this line",
                error("a,\"b\n").getMessage());
        assertEquals("data.csv: line 2: value 1 has text after its closing quote; expected a comma or the end of"
                + " the line", error("a\n\"1\"2\n").getMessage());
    }

    @Test
    void fileThatIsNotUtf8NamesTheLine() throws IOException {
        Path file = temp.resolve("latin1.csv");
        byte[] head = "a,b\n1,2\n".getBytes(StandardCharsets.US_ASCII);
        byte[] bytes = new byte[head.length + 4];
        System.arraycopy(head, 0, bytes, 0, head.length);
        bytes[head.length] = (byte) 0xB5;   // ISO 8859-1 micro sign, not UTF-8
        bytes[head.length + 1] = ',';
        bytes[head.length + 2] = '1';
        bytes[head.length + 3] = '\n';
        Files.write(file, bytes);
        CsvException e = assertThrows(CsvException.class, () -> CsvTable.read(file));
        assertEquals(file + ": line 3: the file is not valid UTF-8 (byte 0xB5); save it as UTF-8", e.getMessage());
    }

    @Test
    void readsAFile() throws IOException {
        Path file = Files.writeString(temp.resolve("ok.csv"), "x,y\n1,2\n", StandardCharsets.UTF_8);
        CsvTable t = CsvTable.read(file);
        assertEquals(file.toString(), t.source());
        assertArrayEquals(new double[] {1, 2}, t.values());
        assertTrue(assertThrows(IndexOutOfBoundsException.class, () -> t.get(1, 0)).getMessage() != null);
    }
}
