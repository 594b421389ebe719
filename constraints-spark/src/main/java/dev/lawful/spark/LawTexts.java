package dev.lawful.spark;

import dev.lawful.algebra.LawSet;
import java.util.Map;
import java.util.concurrent.ConcurrentHashMap;

/**
 * The law sets this JVM has parsed, keyed by their text: an executor parses a job's law text once, however many
 * partitions and partial reports it handles. Holds at most {@value #CAPACITY} texts (a job uses one; the cache is
 * cleared rather than grown past that).
 */
final class LawTexts {
    static final int CAPACITY = 32;
    private static final Map<String, LawSet> PARSED = new ConcurrentHashMap<>();

    private LawTexts() {
    }

    /**
     * @param text law text
     * @return its law set, parsed on the first call in this JVM
     * @throws dev.lawful.algebra.LawException when the text has errors
     */
    static LawSet parse(String text) {
        LawSet laws = PARSED.get(text);
        if (laws != null) {
            return laws;
        }
        if (PARSED.size() >= CAPACITY) {
            PARSED.clear();
        }
        return PARSED.computeIfAbsent(text, t -> LawSet.parse("law text", t));
    }
}
