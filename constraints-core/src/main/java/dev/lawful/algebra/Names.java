package dev.lawful.algebra;

/**
 * Spelling help for messages: the nearest known name to a misspelt one. Used by the law language's diagnostics
 * and by tools built on it (the command line's CSV column names), so every suggestion follows one rule.
 */
public final class Names {
    private Names() {
    }

    /** Names longer than this get suggestions only for a difference in case (edit distance would cost too much). */
    private static final int MAX_SUGGEST_LENGTH = 64;

    /**
     * @param name       the name as written
     * @param candidates the known names, read only
     * @return a candidate that differs from {@code name} only in case; otherwise, for names of one or two
     *         characters, a candidate with one letter more; for longer names, the candidate with the smallest edit
     *         distance if that is at most a third of the name's length (at least 1, at most 3); otherwise null
     */
    public static String nearest(String name, Iterable<String> candidates) {
        for (String c : candidates) {
            if (c.equalsIgnoreCase(name) && !c.equals(name)) {
                return c;
            }
        }
        if (name.length() < 3) {
            // one- and two-letter names are all near each other, so only a dropped letter counts ('ot' for 'out')
            String best = null;
            for (String c : candidates) {
                if (c.length() == name.length() + 1 && distance(name, c) == 1
                        && (best == null || c.compareTo(best) < 0)) {
                    best = c;
                }
            }
            return best;
        }
        if (name.length() > MAX_SUGGEST_LENGTH) {
            return null;
        }
        int limit = Math.max(1, Math.min(3, name.length() / 3));
        String best = null;
        int bestDistance = Integer.MAX_VALUE;
        for (String c : candidates) {
            if (Math.abs(c.length() - name.length()) > limit || c.length() > MAX_SUGGEST_LENGTH) {
                continue;
            }
            int d = distance(name, c);
            if (d < bestDistance || (d == bestDistance && best != null && c.compareTo(best) < 0)) {
                bestDistance = d;
                best = c;
            }
        }
        return bestDistance <= limit ? best : null;
    }

    /**
     * @return the optimal string alignment distance between {@code a} and {@code b}: insertions, deletions,
     *         substitutions and swaps of neighbours
     */
    public static int distance(String a, String b) {
        int n = a.length();
        int m = b.length();
        int[][] d = new int[n + 1][m + 1];
        for (int i = 0; i <= n; i++) {
            d[i][0] = i;
        }
        for (int j = 0; j <= m; j++) {
            d[0][j] = j;
        }
        for (int i = 1; i <= n; i++) {
            for (int j = 1; j <= m; j++) {
                int cost = a.charAt(i - 1) == b.charAt(j - 1) ? 0 : 1;
                int v = Math.min(Math.min(d[i - 1][j] + 1, d[i][j - 1] + 1), d[i - 1][j - 1] + cost);
                if (i > 1 && j > 1 && a.charAt(i - 1) == b.charAt(j - 2) && a.charAt(i - 2) == b.charAt(j - 1)) {
                    v = Math.min(v, d[i - 2][j - 2] + 1);
                }
                d[i][j] = v;
            }
        }
        return d[n][m];
    }
}
