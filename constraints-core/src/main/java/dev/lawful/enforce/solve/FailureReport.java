package dev.lawful.enforce.solve;

import dev.lawful.enforce.EnforcementException;
import dev.lawful.enforce.SampleStatus;
import dev.lawful.enforce.Tier;
import dev.lawful.enforce.plan.CompletionPlan;
import java.util.ArrayList;
import java.util.List;

/** The exception for a sample a completion could not enforce: which sample, which laws, why, and what to do. */
public final class FailureReport {
    private final List<String> lawNames;
    private final String quoted;
    private final String completedNames;
    private final Tier tier;
    private final int maxIterations;
    private final String limitNames;

    /** @param plan the completion's plan */
    public FailureReport(CompletionPlan plan) {
        List<String> names = new ArrayList<>();
        for (int i = 0; i < plan.lawCount(); i++) {
            names.add(plan.expanded().name(i));
        }
        this.lawNames = List.copyOf(names);
        this.quoted = String.join(", ", names.stream().map(l -> "'" + l + "'").toList());
        List<String> completed = new ArrayList<>();
        for (int o : plan.completed()) {
            completed.add(plan.laws().outputNames().get(o));
        }
        this.completedNames = String.join(", ", completed);
        this.tier = plan.tier();
        this.maxIterations = plan.maxIterations();
        this.limitNames = plan.limits() == null ? ""
                : String.join(", ", plan.limits().names().stream().map(l -> "'" + l + "'").toList());
    }

    /**
     * @param sample the sample's index in the batch
     * @param code   its {@link SampleStatus}, not OK
     * @return the exception to throw under {@link dev.lawful.enforce.OnBadSample#THROW}
     */
    public EnforcementException failure(int sample, byte code) {
        return new EnforcementException(sample, code, lawNames, "sample " + sample + ": " + why(code)
                + " (use OnBadSample.MASK to get NaN rows and a status mask instead)");
    }

    private String why(byte code) {
        switch (code) {
            case SampleStatus.NOT_FINITE:
                return "an input or free output is NaN or infinite";
            case SampleStatus.OUTSIDE_LIMITS:
                return "no outputs satisfy both the laws and the limits " + limitNames + " (the limits conflict, given"
                        + " the laws and this sample's inputs)";
            case SampleStatus.SINGULAR:
                return "the laws " + quoted + " are singular in the completed outputs " + completedNames
                        + " at this sample (their Jacobian block has no inverse)"
                        + (tier == Tier.NONLINEAR ? "; if this happens where Newton starts, give a 'guess' for the"
                        + " completed outputs away from that point" : "");
            default:
                return tier == Tier.NONLINEAR
                        ? "the residuals of " + quoted + " did not reach rounding level within " + maxIterations
                        + " Newton iterations; give a 'guess' for the completed outputs or check the inputs"
                        : "the residuals of " + quoted + " stay above rounding level after the solve and one"
                        + " refinement (the system is nearly singular at this sample)";
        }
    }
}
