/**
 * Plain-text input and output shared by the command line and the reports: a small streaming JSON writer
 * ({@link dev.lawful.io.JsonWriter}) with no dependencies.
 */
package dev.lawful.io;
