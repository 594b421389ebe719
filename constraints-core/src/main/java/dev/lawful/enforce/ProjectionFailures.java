package dev.lawful.enforce;

import java.util.ArrayList;
import java.util.List;

import dev.lawful.algebra.ExpandedLaws;

/**
 * The messages of {@link Projection}'s per-sample failures under {@link OnBadSample#THROW}: which sample, what was
 * wrong, which laws. Built once per projection; only the failure paths allocate.
 */
final class ProjectionFailures {
    private static final String ADVICE = "; fix the data of this sample, or build the projection with"
            + " OnBadSample.MASK to get NaN rows flagged in a status mask instead";

    private final ExpandedLaws laws;
    private final List<List<String>> byInput = new ArrayList<>();
    private final List<List<String>> byOutput = new ArrayList<>();
    private final List<String> all = new ArrayList<>();

    ProjectionFailures(ExpandedLaws laws) {
        this.laws = laws;
        for (int v = 0; v < laws.inputWidth(); v++) {
            byInput.add(new ArrayList<>());
        }
        for (int j = 0; j < laws.outputWidth(); j++) {
            byOutput.add(new ArrayList<>());
        }
        for (int i = 0; i < laws.size(); i++) {
            all.add(laws.name(i));
            for (int v : laws.inputs(i)) {
                byInput.get(v).add(laws.name(i));
            }
            for (int j : laws.outputs(i)) {
                byOutput.get(j).add(laws.name(i));
            }
        }
    }

    EnforcementException input(int sample, int v, double value) {
        return nonFinite(sample, "input '" + laws.variableName(v) + "' is " + value, byInput.get(v));
    }

    EnforcementException output(int sample, int j, double value) {
        return nonFinite(sample, "output '" + outputName(j) + "' is " + value, byOutput.get(j));
    }

    EnforcementException gradient(int sample, int j, double value) {
        return nonFinite(sample, "the upstream gradient of output '" + outputName(j) + "' is " + value,
                byOutput.get(j));
    }

    EnforcementException coefficient(int sample, int law) {
        return nonFinite(sample, "the output coefficients of law '" + laws.name(law) + "' are not finite at its"
                + " inputs", List.of(laws.name(law)));
    }

    EnforcementException inputCoefficient(int sample, int law) {
        return nonFinite(sample, "the derivatives of law '" + laws.name(law) + "' with respect to its inputs are"
                + " not finite", List.of(laws.name(law)));
    }

    EnforcementException residual(int sample, int law, double value) {
        return nonFinite(sample, "the residual of law '" + laws.name(law) + "' is " + value,
                List.of(laws.name(law)));
    }

    private EnforcementException nonFinite(int sample, String what, List<String> involved) {
        List<String> names = involved.isEmpty() ? all : involved;
        return new EnforcementException(sample, SampleStatus.NOT_FINITE, names, "sample " + sample + ": " + what
                + ", so laws " + ProjectionChecks.quoted(names) + " cannot be enforced" + ADVICE);
    }

    EnforcementException dependent(int sample, ProjectionFactor f, int law) {
        String name = laws.name(law);
        if (f.norm[law] == 0) {
            return new EnforcementException(sample, SampleStatus.SINGULAR, List.of(name), "sample " + sample
                    + ": the output coefficients of law '" + name + "' are all zero at this sample, so moving the"
                    + " outputs cannot enforce it (singular system)" + ADVICE);
        }
        List<String> others = new ArrayList<>();
        for (int i : f.dependence(law, ProjectionChecks.PART_OF_DEPENDENCE)) {
            others.add(laws.name(i));
        }
        if (others.isEmpty()) {
            for (int i = 0; i < law; i++) {
                others.add(laws.name(i));
            }
        }
        List<String> involved = new ArrayList<>(others);
        involved.add(name);
        return new EnforcementException(sample, SampleStatus.SINGULAR, involved, "sample " + sample + ": laws "
                + ProjectionChecks.quoted(involved) + " are linearly dependent at this sample (the output"
                + " coefficients of law '" + name + "' are a linear combination of those of "
                + ProjectionChecks.quoted(others) + "), so the projection is singular" + ADVICE);
    }

    EnforcementException imprecise(int sample, int law, double residual, double bound) {
        String name = laws.name(law);
        return new EnforcementException(sample, SampleStatus.SINGULAR, List.of(name), "sample " + sample
                + ": after refinement law '" + name + "' still has residual " + residual + " (SI), above its bound "
                + bound + " (the laws are numerically singular at this sample)" + ADVICE);
    }

    EnforcementException overflow(int sample) {
        return new EnforcementException(sample, SampleStatus.SINGULAR, all, "sample " + sample + ": the projected"
                + " outputs overflow (the laws are numerically singular at this sample)" + ADVICE);
    }

    private String outputName(int j) {
        return laws.variableName(laws.inputWidth() + j);
    }
}
