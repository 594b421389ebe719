package dev.lawful.io;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.io.Writer;
import java.util.SplittableRandom;
import java.util.regex.Pattern;
import org.junit.jupiter.api.Test;

class JsonWriterTest {

    /** The number grammar of RFC 8259 section 6: {@code [ minus ] int [ frac ] [ exp ]}. Source: RFC 8259. */
    private static final Pattern JSON_NUMBER = Pattern.compile("-?(0|[1-9][0-9]*)(\\.[0-9]+)?([eE][+-]?[0-9]+)?");

    private static void document(JsonWriter json) {
        json.beginObject()
                .name("file").value("a.law")
                .name("valid").value(true)
                .name("n").value(3L)
                .name("x").value(0.5)
                .name("none").nullValue()
                .name("empty").beginArray().endArray()
                .name("list").beginArray()
                .value(1.0)
                .beginObject().name("k").value("v").endObject()
                .beginObject().endObject()
                .endArray()
                .endObject();
    }

    @Test
    void compactLayoutHasNoWhiteSpace() {
        StringBuilder sb = new StringBuilder();
        JsonWriter json = JsonWriter.compact(sb);
        document(json);
        assertEquals("{\"file\":\"a.law\",\"valid\":true,\"n\":3,\"x\":0.5,\"none\":null,\"empty\":[],"
                + "\"list\":[1,{\"k\":\"v\"},{}]}", sb.toString());
        assertTrue(json.isComplete());
    }

    @Test
    void prettyLayoutIndentsTwoSpacesPerLevel() {
        StringBuilder sb = new StringBuilder();
        document(JsonWriter.pretty(sb));
        assertEquals("""
                {
                  "file": "a.law",
                  "valid": true,
                  "n": 3,
                  "x": 0.5,
                  "none": null,
                  "empty": [],
                  "list": [
                    1,
                    {
                      "k": "v"
                    },
                    {}
                  ]
                }""", sb.toString());
    }

    @Test
    void topLevelScalarsAndEmptyContainers() {
        assertEquals("\"s\"", write(j -> j.value("s")));
        assertEquals("false", write(j -> j.value(false)));
        assertEquals("null", write(j -> j.value((String) null)));
        assertEquals("-7", write(j -> j.value(-7L)));
        assertEquals("{}", write(j -> j.beginObject().endObject()));
        assertEquals("[]", write(j -> j.beginArray().endArray()));
        assertEquals("[[],[1]]", write(j -> j.beginArray().beginArray().endArray().beginArray().value(1L)
                .endArray().endArray()));
    }

    // ---- strings: Source: RFC 8259 section 7 ---------------------------------------------------------------

    @Test
    void quotationMarkAndReverseSolidusAreEscaped() {
        // Source: RFC 8259 section 7: quotation mark and reverse solidus must be escaped
        assertEquals("\"a\\\"b\"", JsonWriter.quote("a\"b"));
        assertEquals("\"a\\\\b\"", JsonWriter.quote("a\\b"));
        assertEquals("\"\\\\\\\"\"", JsonWriter.quote("\\\""));
    }

    @Test
    void everyControlCharacterIsEscapedAsItsCodePoint() {
        // Source: RFC 8259 section 7: the control characters U+0000 through U+001F must be escaped; \\u followed
        // by four hex digits encodes the code point
        for (char c = 0; c < 0x20; c++) {
            String quoted = JsonWriter.quote("x" + c + "y");
            assertEquals(10, quoted.length(), quoted);
            assertEquals("\"x\\u00", quoted.substring(0, 6), quoted);
            assertEquals(c, Integer.parseInt(quoted.substring(6, 8), 16), quoted);
            assertEquals("y\"", quoted.substring(8));
        }
        assertEquals("\"\\u000A\\u0009\\u001F\"", JsonWriter.quote("\n\t\u001f"));
    }

    @Test
    void otherCharactersAreWrittenAsTheyAre() {
        // Source: RFC 8259 section 7: any other character may be written unescaped, the solidus included
        String s = " !#/~\u007f\u00e9\u03a9\u00b5 \uD83D\uDE00";
        assertEquals("\"" + s + "\"", JsonWriter.quote(s));
    }

    @Test
    void loneSurrogatesAreEscaped() {
        // a lone surrogate has no UTF-8 form; RFC 8259 section 8.2 lets the escape stand for it
        assertEquals("\"a\\uD800b\"", JsonWriter.quote("a\uD800b"));
        assertEquals("\"\\uDC00\"", JsonWriter.quote("\uDC00"));
        assertEquals("\"\\uD83D\"", JsonWriter.quote("\uD83D"));
        assertEquals("\"\\uDE00\\uD83D\"", JsonWriter.quote("\uDE00\uD83D"));
    }

    @Test
    void memberNamesAreEscapedToo() {
        assertEquals("{\"a\\\"\\u000A\":1}", write(j -> j.beginObject().name("a\"\n").value(1L).endObject()));
    }

    // ---- numbers ---------------------------------------------------------------------------------------------

    @Test
    void integralValuesHaveNoFraction() {
        assertEquals("0", JsonWriter.number(0.0));
        assertEquals("3", JsonWriter.number(3.0));
        assertEquals("-42", JsonWriter.number(-42.0));
        assertEquals("1000000", JsonWriter.number(1e6));
        assertEquals("9007199254740991", JsonWriter.number(9007199254740991.0));
        assertEquals("-9007199254740991", JsonWriter.number(-9007199254740991.0));
        // beyond 2^53 - 1 (Source: RFC 8259 section 6, the interoperable integer range) the exponent form is used
        assertEquals(Double.toString(9007199254740992.0), JsonWriter.number(9007199254740992.0));
        assertEquals("1.0E300", JsonWriter.number(1e300));
    }

    @Test
    void otherFiniteValuesUseTheRoundTripForm() {
        assertEquals("0.1", JsonWriter.number(0.1));
        assertEquals("-2.5", JsonWriter.number(-2.5));
        assertEquals("1.0E-5", JsonWriter.number(1e-5));
        assertEquals("-0.0", JsonWriter.number(-0.0));
        assertEquals("4.9E-324", JsonWriter.number(Double.MIN_VALUE));
        assertEquals("1.7976931348623157E308", JsonWriter.number(Double.MAX_VALUE));
    }

    @Test
    void nonFiniteValuesAreWrittenAsNull() {
        assertEquals("null", JsonWriter.number(Double.NaN));
        assertEquals("null", JsonWriter.number(Double.POSITIVE_INFINITY));
        assertEquals("[null,null,null,1.5]", write(j -> j.beginArray().value(Double.NaN)
                .value(Double.NEGATIVE_INFINITY).value(Double.POSITIVE_INFINITY).value(1.5).endArray()));
    }

    @Test
    void everyFiniteDoubleIsAJsonNumberThatParsesBackToItself() {
        double[] special = {0.0, -0.0, 1.0, -1.0, 0.1, 1.0 / 3, Math.PI, Double.MIN_VALUE, -Double.MIN_VALUE,
            Double.MIN_NORMAL, Math.nextDown(Double.MIN_NORMAL), Double.MAX_VALUE, -Double.MAX_VALUE, 1e15, 1e16,
            9007199254740991.0, 9007199254740992.0, Math.nextUp(9007199254740991.0), 0.5e-323, 1e22, 1e23,
            2.82879384806159E17, 123456789.125, 1e-7, 1e7, -1e-300};
        for (double v : special) {
            assertRoundTrip(v);
        }
        // random bit patterns cover every exponent, subnormals included
        SplittableRandom random = new SplittableRandom(20260101L);
        int checked = 0;
        while (checked < 200_000) {
            double v = Double.longBitsToDouble(random.nextLong());
            if (Double.isFinite(v)) {
                assertRoundTrip(v);
                checked++;
            }
        }
        // and integral values, where the plain decimal form is chosen
        for (int i = 0; i < 100_000; i++) {
            assertRoundTrip((double) (random.nextLong() >> random.nextInt(64)));
        }
    }

    private static void assertRoundTrip(double v) {
        String text = JsonWriter.number(v);
        assertTrue(JSON_NUMBER.matcher(text).matches(), () -> text + " is not a JSON number");
        assertEquals(Double.doubleToRawLongBits(v), Double.doubleToRawLongBits(Double.parseDouble(text)),
                () -> v + " written as " + text);
    }

    // ---- misuse ----------------------------------------------------------------------------------------------

    @Test
    void callsThatDoNotFormOneValueAreRejected() {
        assertThrows(IllegalStateException.class, () -> JsonWriter.compact(new StringBuilder()).beginObject()
                .value(1L));
        assertThrows(IllegalStateException.class, () -> JsonWriter.compact(new StringBuilder()).beginArray()
                .name("a"));
        assertThrows(IllegalStateException.class, () -> JsonWriter.compact(new StringBuilder()).name("a"));
        assertThrows(IllegalStateException.class, () -> JsonWriter.compact(new StringBuilder()).beginObject()
                .name("a").name("b"));
        assertThrows(IllegalStateException.class, () -> JsonWriter.compact(new StringBuilder()).beginObject()
                .name("a").endObject());
        assertThrows(IllegalStateException.class, () -> JsonWriter.compact(new StringBuilder()).beginObject()
                .endArray());
        assertThrows(IllegalStateException.class, () -> JsonWriter.compact(new StringBuilder()).beginArray()
                .endObject());
        assertThrows(IllegalStateException.class, () -> JsonWriter.compact(new StringBuilder()).endArray());
        assertThrows(IllegalStateException.class, () -> JsonWriter.compact(new StringBuilder()).value(1L)
                .value(2L));
        assertThrows(IllegalStateException.class, () -> JsonWriter.compact(new StringBuilder()).beginArray()
                .endArray().beginArray());
        IllegalStateException twice = assertThrows(IllegalStateException.class, () -> JsonWriter
                .compact(new StringBuilder()).beginObject().name("a").value(1L).name("a"));
        assertEquals("member 'a' is written twice in one object", twice.getMessage());
    }

    @Test
    void completenessIsTracked() {
        JsonWriter json = JsonWriter.compact(new StringBuilder());
        assertFalse(json.isComplete());
        json.beginArray().beginObject();
        assertFalse(json.isComplete());
        json.endObject();
        assertFalse(json.isComplete());
        json.endArray();
        assertTrue(json.isComplete());
    }

    @Test
    void writeErrorsAreRethrownUnchecked() {
        Writer failing = new Writer() {
            @Override
            public void write(char[] buffer, int offset, int length) throws IOException {
                throw new IOException("disk full");
            }

            @Override
            public void flush() throws IOException {
                throw new IOException("flush failed");
            }

            @Override
            public void close() {
            }
        };
        JsonWriter json = JsonWriter.compact(failing);
        UncheckedIOException e = assertThrows(UncheckedIOException.class, json::beginObject);
        assertEquals("disk full", e.getCause().getMessage());
        assertEquals("flush failed", assertThrows(UncheckedIOException.class, json::flush).getCause().getMessage());
    }

    private interface Body {
        void accept(JsonWriter json);
    }

    private static String write(Body body) {
        StringBuilder sb = new StringBuilder();
        JsonWriter json = JsonWriter.compact(sb);
        body.accept(json);
        assertTrue(json.isComplete());
        return sb.toString();
    }
}
