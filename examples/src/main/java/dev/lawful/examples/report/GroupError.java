package dev.lawful.examples.report;

/**
 * One network's test error on one output group.
 *
 * @param group    the group's name
 * @param unit     the group's unit ({@code ""} for a pure number)
 * @param rmse     root-mean-square error over the group's columns, in {@code unit} ({@link Metrics#rmse})
 * @param rSquared R² pooled over the group's columns, each about its own mean ({@link Metrics#rSquared}); NaN when
 *                 the group's true values are constant
 */
public record GroupError(String group, String unit, double rmse, double rSquared) {
}
