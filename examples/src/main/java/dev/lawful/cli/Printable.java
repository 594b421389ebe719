package dev.lawful.cli;

/**
 * Text made safe for a terminal. Messages quote law and data files, and a control character in a file (an escape
 * sequence that moves the cursor, recolours or retitles the terminal, a backspace, a bidirectional override that
 * reorders what is shown) must be shown, not obeyed. Every such character becomes a visible escape in the form
 * JSON and Java share, a backslash, {@code u} and four hexadecimal digits ({@code u001B} for ESC, {@code u202E} for
 * the right-to-left override): the C0 and C1 control
 * characters, DEL, and the Unicode format characters (general category Cf: bidirectional controls, zero-width
 * characters). A JSON text stays valid JSON with the same meaning. Line feed, carriage return (the progress display rewrites its
 * line with it) and tab are kept, so line structure and alignment survive.
 */
final class Printable {
    private Printable() {
    }

    /**
     * @param text any text
     * @return {@code text} with each control or format character other than {@code \n}, {@code \r} and {@code \t}
     *         replaced by its escape; {@code text} itself when it has none
     */
    static String escape(String text) {
        int n = text.length();
        int i = 0;
        while (i < n && !unsafe(text.charAt(i))) {
            i++;
        }
        if (i == n) {
            return text;
        }
        StringBuilder sb = new StringBuilder(n + 8).append(text, 0, i);
        for (; i < n; i++) {
            char c = text.charAt(i);
            if (!unsafe(c)) {
                sb.append(c);
            } else {
                sb.append(String.format("\\u%04X", (int) c));
            }
        }
        return sb.toString();
    }

    private static boolean unsafe(char c) {
        if (c == '\n' || c == '\r' || c == '\t') {
            return false;
        }
        return c < 0x20 || (c >= 0x7F && c < 0xA0) || Character.getType(c) == Character.FORMAT;
    }
}
