/**
 * Reports of the worked scenarios: a scenario's training code gathers the test rows' truth and each network's
 * predictions, law residuals and training record into a {@link dev.lawful.examples.report.ScenarioResult};
 * {@link dev.lawful.examples.report.ReportWriter} computes the metrics ({@link dev.lawful.examples.report.Metrics})
 * and writes the comparison table, JSON, CSV and PNG figures.
 */
package dev.lawful.examples.report;
