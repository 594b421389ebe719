package dev.lawful.examples.report;

import dev.lawful.examples.TruthModel.ColumnGroup;
import dev.lawful.io.JsonWriter;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.util.List;

/**
 * Writes {@code report.json}: one pretty-printed object holding every number of the table at full precision.
 * The keys are listed in {@link ReportWriter}'s class comment.
 *
 * <p>JSON has no NaN or infinity. The only numbers that can be non-finite here are an R² that is not defined (the
 * group's true values are constant) and a loss that overflowed; both are written as {@code null}, and a reader
 * tells the cases apart by the key. Every other number was checked finite when the {@link ScenarioResult} was made.
 */
final class ReportJson {
    private ReportJson() {
    }

    /**
     * @param result  the scenario
     * @param metrics its runs' metrics, in run order
     * @param out     receives the JSON text and a final line end
     */
    static void write(ScenarioResult result, List<RunMetrics> metrics, Appendable out) {
        JsonWriter json = JsonWriter.pretty(out);
        json.beginObject();
        json.name("scenario").value(result.scenario());
        json.name("title").value(result.title());
        json.name("rows").value(result.rows());
        json.name("caution").value(result.caution());
        json.name("outputs").beginArray();
        for (String o : result.outputNames()) {
            json.value(o);
        }
        json.endArray();
        json.name("completedOutputs").beginArray();
        for (int c : result.completedOutputs()) {
            json.value(result.outputNames().get(c));
        }
        json.endArray();
        json.name("groups").beginArray();
        for (ColumnGroup g : result.groups()) {
            json.beginObject().name("name").value(g.name()).name("unit").value(g.unit());
            json.name("columns").beginArray();
            for (int c = g.first(); c < g.first() + g.count(); c++) {
                json.value(result.outputNames().get(c));
            }
            json.endArray().endObject();
        }
        json.endArray();
        json.name("laws").beginArray();
        for (int j = 0; j < result.lawCount(); j++) {
            json.beginObject().name("name").value(result.lawNames().get(j))
                    .name("unit").value(result.lawUnits().get(j))
                    .name("mark").value(result.marks().get(j).value())
                    .name("markLabel").value(result.marks().get(j).label())
                    .endObject();
        }
        json.endArray();
        json.name("percentile").beginObject().name("percent").value(99).name("method").value("nearest-rank")
                .endObject();
        json.name("networks").beginArray();
        for (int i = 0; i < metrics.size(); i++) {
            RunMetrics m = metrics.get(i);
            json.beginObject().name("label").value(m.label());
            json.name("testError").beginArray();
            for (GroupError g : m.groups()) {
                json.beginObject().name("group").value(g.group()).name("unit").value(g.unit())
                        .name("rmse").value(g.rmse()).name("rSquared").value(g.rSquared()).endObject();
            }
            json.endArray();
            json.name("residuals").beginArray();
            for (LawResidualStats s : m.laws()) {
                json.beginObject().name("law").value(s.law()).name("unit").value(s.unit())
                        .name("samples").value(s.samples()).name("maxAbs").value(s.max())
                        .name("meanAbs").value(s.mean()).name("p99Abs").value(s.p99())
                        .name("zeros").value(s.zeros()).name("aboveMark").value(s.aboveMark()).endObject();
            }
            json.endArray();
            json.name("secondsPerEpoch").value(m.secondsPerEpoch());
            json.name("epochs").value(m.epochs());
            json.name("finalLoss");
            if (m.epochs() == 0) {
                json.nullValue();
            } else {
                json.value(m.finalLoss());
            }
            json.name("lossPerEpoch").beginArray();
            for (double l : result.runs().get(i).lossPerEpoch()) {
                json.value(l);
            }
            json.endArray();
            json.endObject();
        }
        json.endArray();
        json.endObject();
        try {
            out.append('\n');
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }
}
