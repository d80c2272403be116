package dev.sluice.config;

import java.util.Optional;

/**
 * @param format parquet, csv, orc or json; empty to decide from the path
 * @param csvDelimiter field delimiter of CSV input
 * @param csvSchema a Spark DDL schema for CSV input ("a INT, b DOUBLE"); empty to infer
 */
public record InputSettings(Optional<String> format, String csvDelimiter, Optional<String> csvSchema) {}
