package dev.lawful.examples.report;

import static org.junit.jupiter.api.Assertions.assertEquals;

import org.junit.jupiter.api.Test;

class FiguresTest {
    @Test
    void threeSignificantDigitsPlainOrScientific() {
        // common practice: three significant digits, trailing zeros kept, scientific outside 1e-4 .. 1000
        assertEquals("0.500", Figures.of(0.5));
        assertEquals("12.3", Figures.of(12.34));
        assertEquals("0.000123", Figures.of(1.234e-4));
        assertEquals("1.23e-5", Figures.of(1.234e-5));
        assertEquals("4.50e-16", Figures.of(4.5e-16));
        assertEquals("1.23e4", Figures.of(12345));
        assertEquals("1.00e3", Figures.of(999.6));
        assertEquals("-2.00e-300", Figures.of(-2e-300));
        assertEquals("0", Figures.of(0.0));
        assertEquals("0", Figures.of(-0.0));
        assertEquals("n/a", Figures.of(Double.NaN));
        assertEquals("inf", Figures.of(Double.POSITIVE_INFINITY));
        assertEquals("-inf", Figures.of(Double.NEGATIVE_INFINITY));
    }

    @Test
    void rSquaredKeepsTheDigitsThatTellItFromOne() {
        // common practice: a fit is judged by 1 - R², so its leading digits must show
        assertEquals("0.9987", Figures.rSquared(0.99871));
        assertEquals("0.999987", Figures.rSquared(0.9999871));
        assertEquals("0.99950", Figures.rSquared(0.9995));
        assertEquals("1.0000", Figures.rSquared(1.0));
        assertEquals("-0.2500", Figures.rSquared(-0.25));
        assertEquals("-1.23e3", Figures.rSquared(-1234));
        assertEquals("n/a", Figures.rSquared(Double.NaN));
    }
}
