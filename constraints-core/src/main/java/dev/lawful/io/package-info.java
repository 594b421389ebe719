/**
 * Plain-text input and output shared by the command line and the reports, with no dependencies: a streaming JSON
 * writer ({@link dev.lawful.io.JsonWriter}), a CSV reader and writer with line-numbered errors
 * ({@link dev.lawful.io.CsvReader}, {@link dev.lawful.io.CsvWriter}), and the shortest decimal form of a double
 * that parses back to the same value ({@link dev.lawful.io.ShortestDecimal}), so files never lose exactness.
 */
package dev.lawful.io;
