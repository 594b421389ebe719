package dev.lawful.cli;

import dev.lawful.algebra.Diagnostic;
import dev.lawful.algebra.LawException;
import dev.lawful.io.JsonWriter;
import java.io.PrintWriter;
import java.util.List;

/**
 * The JSON form of {@code lawful check}: one object, pretty-printed, followed by a line end.
 *
 * <p>A valid file gives {@code file}, {@code valid: true}, {@code inputs}, {@code outputs}, {@code constants} (each
 * a list of {@code {name, length, unit}}), {@code definitions} ({@code {name, length, expression}}), {@code laws}
 * ({@code {name, unit, length, outputs}}), {@code limits} ({@code {name, unit, length, inequality, outputs}}, a
 * length counting scalar limits: two per element of a two-sided limit), {@code tier} (how the laws are solved:
 * {@code constant-affine},
 * {@code affine} or {@code nonlinear}), {@code condition} (the 2-norm condition number of the equilibrated dC/dy_completed at the
 * completion's reference point), {@code completed} (the completed output elements, from the {@code complete}
 * statement or else the automatic choice, in solve order), {@code free} (the other output elements) and
 * {@code warnings}; a file without laws has {@code tier} and {@code condition} null, {@code completed} empty and
 * every output free. An invalid file, or one whose laws cannot be completed, gives {@code file},
 * {@code valid: false}, {@code errors} and {@code warnings}. Each finding of the checker is
 * {@code {line, column, message}}; a warning about the completion has no place in the file and is
 * {@code {message}} alone. Lengths count elements (1 for a scalar; for a law, its scalar equations); units are the
 * text as written, {@code ""} for a pure number; output elements are written {@code name} or {@code name[i]}, as
 * in a CSV header.
 */
final class JsonReport {
    private JsonReport() {
    }

    /**
     * Prints the summary of a valid law file.
     *
     * @param s   what to report
     * @param out receives the object and a line end
     */
    static void valid(LawSummary s, PrintWriter out) {
        JsonWriter json = JsonWriter.pretty(out);
        json.beginObject().name("file").value(s.file()).name("valid").value(true);
        items(json, "inputs", s.inputs());
        items(json, "outputs", s.outputs());
        items(json, "constants", s.constants());
        json.name("definitions").beginArray();
        for (LawSummary.Definition d : s.definitions()) {
            json.beginObject().name("name").value(d.name()).name("length").value(d.length())
                    .name("expression").value(d.expression()).endObject();
        }
        json.endArray();
        json.name("laws").beginArray();
        for (LawSummary.Law l : s.laws()) {
            json.beginObject().name("name").value(l.name()).name("unit").value(l.unit().text())
                    .name("length").value(l.length());
            strings(json.name("outputs"), l.outputs());
            json.endObject();
        }
        json.endArray();
        json.name("limits").beginArray();
        for (LawSummary.Limit l : s.limits()) {
            json.beginObject().name("name").value(l.name()).name("unit").value(l.unit().text())
                    .name("length").value(l.length()).name("inequality").value(l.inequality());
            strings(json.name("outputs"), l.outputs());
            json.endObject();
        }
        json.endArray();
        json.name("tier").value(s.tier());
        json.name("condition");
        if (s.tier() == null) {
            json.nullValue();
        } else {
            json.value(s.condition());
        }
        strings(json.name("completed"), s.completed());
        strings(json.name("free"), s.free());
        json.name("warnings").beginArray();
        writeFindings(json, s.warnings());
        for (String w : s.completionWarnings()) {
            json.beginObject().name("message").value(w).endObject();
        }
        json.endArray();
        json.endObject();
        out.println();
    }

    /**
     * Prints the findings of an invalid law file.
     *
     * @param file the file name as given
     * @param e    the findings
     * @param out  receives the object and a line end
     */
    static void invalid(String file, LawException e, PrintWriter out) {
        JsonWriter json = JsonWriter.pretty(out);
        json.beginObject().name("file").value(file).name("valid").value(false);
        findings(json, "errors", e.errors());
        findings(json, "warnings", e.diagnostics().stream()
                .filter(d -> d.severity() == Diagnostic.Severity.WARNING).toList());
        json.endObject();
        out.println();
    }

    private static void items(JsonWriter json, String key, List<LawSummary.Item> items) {
        json.name(key).beginArray();
        for (LawSummary.Item i : items) {
            json.beginObject().name("name").value(i.name()).name("length").value(i.length())
                    .name("unit").value(i.unit().text()).endObject();
        }
        json.endArray();
    }

    private static void strings(JsonWriter json, List<String> values) {
        json.beginArray();
        for (String v : values) {
            json.value(v);
        }
        json.endArray();
    }

    private static void findings(JsonWriter json, String key, List<Diagnostic> findings) {
        json.name(key).beginArray();
        writeFindings(json, findings);
        json.endArray();
    }

    private static void writeFindings(JsonWriter json, List<Diagnostic> findings) {
        for (Diagnostic d : findings) {
            json.beginObject().name("line").value(d.line()).name("column").value(d.column())
                    .name("message").value(d.message()).endObject();
        }
    }
}
