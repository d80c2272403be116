package dev.sluice.config;

import java.util.Optional;

/**
 * @param format parquet, csv, orc or json; empty to decide from the path
 * @param csvDelimiter field delimiter of CSV input
 * @param csvSchema a Spark DDL schema for CSV input ("a INT, b DOUBLE"); empty to infer
 * @param csvHeader the first line of a CSV file holds the column names
 */
public record InputSettings(
    Optional<String> format, String csvDelimiter, Optional<String> csvSchema, boolean csvHeader) {

  /** CSV input with a header row. */
  public InputSettings(Optional<String> format, String csvDelimiter, Optional<String> csvSchema) {
    this(format, csvDelimiter, csvSchema, true);
  }

  public InputSettings withFormat(Optional<String> other) {
    return new InputSettings(other, csvDelimiter, csvSchema, csvHeader);
  }
}
