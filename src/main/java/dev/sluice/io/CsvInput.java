package dev.sluice.io;

import dev.sluice.SluiceException;
import dev.sluice.config.InputSettings;
import java.util.Arrays;
import java.util.List;
import java.util.Optional;
import java.util.OptionalLong;
import org.apache.hadoop.fs.FileStatus;
import org.apache.hadoop.fs.Path;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.DataFrameReader;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.functions;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.StructType;
import org.apache.spark.storage.StorageLevel;

/**
 * CSV input that loses no line. Types come from the configured schema or are inferred first;
 * the table is then read in PERMISSIVE mode with a column that keeps the raw text of every line
 * Spark could not parse (a value that does not fit its type, too few or too many fields), so that
 * line can go to quarantine instead of silently becoming nulls.
 *
 * <p>The parsed table is persisted (memory, then disk): the job reads it up to three times, and
 * Spark refuses queries on the malformed-line column of an unpersisted CSV scan.
 */
final class CsvInput {
  private CsvInput() {}

  static InputTable read(SparkSession spark, String path, InputSettings s) {
    StructType schema = s.csvSchema().isPresent()
        ? configuredSchema(s.csvSchema().get())
        : options(spark, s).option("inferSchema", "true").load(path).schema();
    if (schema.fields().length == 0) {
      throw SluiceException.input("CSV input " + path + " has no columns: it is empty or holds only blank lines");
    }
    if (s.csvHeader()) {
      checkHeader(path, schema, s.csvSchema().isPresent());
      checkRepeatedNames(spark, path, s);
    }
    StructType withRaw = schema.add(InputTable.MALFORMED_COLUMN, DataTypes.StringType, true);
    Dataset<Row> data = options(spark, s)
        .option("mode", "PERMISSIVE")
        .option("columnNameOfCorruptRecord", InputTable.MALFORMED_COLUMN)
        .schema(withRaw)
        .load(path)
        .persist(StorageLevel.MEMORY_AND_DISK());
    long rows = checkParses(data, path);
    List<String> partitions = directory(spark, path)
        .map(st -> TableReader.partitionColumns(spark, st)).orElse(List.of());
    return new InputTable(data, path, "csv", partitions, Optional.of(InputTable.MALFORMED_COLUMN),
        OptionalLong.of(rows));
  }

  private static StructType configuredSchema(String ddl) {
    try {
      return StructType.fromDDL(ddl);
    } catch (Exception e) {
      // A DDL syntax error is a ParseException: checked in Java terms, thrown undeclared by Scala.
      throw SluiceException.usage("Cannot set sluice.input.csv.schema to \"" + ddl + "\": "
          + TableReader.firstLine(e.getMessage()));
    }
  }

  private static DataFrameReader options(SparkSession spark, InputSettings s) {
    return spark.read().format("csv")
        .option("header", String.valueOf(s.csvHeader()))
        .option("sep", s.csvDelimiter())
        .option("nullValue", "")
        .option("multiLine", "true")
        // Header names are checked against a configured schema, by position and name.
        .option("enforceSchema", "false");
  }

  /**
   * A header whose every name is a number is most likely the first data line: the file has no
   * header, and reading on would lose that line and name the columns after its values.
   */
  private static void checkHeader(String path, StructType schema, boolean configured) {
    if (configured || schema.fields().length == 0) {
      return;
    }
    boolean allNumbers = Arrays.stream(schema.fieldNames()).allMatch(CsvInput::isNumber);
    if (allNumbers) {
      throw SluiceException.input("CSV file " + path + " seems to have no header row (its first"
          + " line is all numbers); set input.csv.header = false to read it without one");
    }
  }

  /** Spark would rename a repeated header name (reading0, reading1); refuse it instead. */
  private static void checkRepeatedNames(SparkSession spark, String path, InputSettings s) {
    // One line, the header, read as plain fields.
    List<Row> first = options(spark, s).option("header", "false").load(path).limit(1).collectAsList();
    if (first.isEmpty()) {
      return;
    }
    java.util.Set<String> seen = new java.util.HashSet<>();
    Row header = first.get(0);
    for (int i = 0; i < header.length(); i++) {
      String name = header.isNullAt(i) ? "" : header.getString(i);
      if (!seen.add(name)) {
        throw SluiceException.input("CSV input " + path + " repeats the column name \"" + name
            + "\" in its header; give every column its own name");
      }
    }
  }

  /**
   * Reads the table once into its cache and returns its row count, well-formed or not, so that a
   * header that disagrees with the configured schema fails here with the path. Refuses a malformed
   * record that spans several lines: a quote that is never closed swallows the lines after it, and
   * those rows could not be told apart any more. One aggregate gives both answers.
   */
  private static long checkParses(Dataset<Row> data, String path) {
    Row r;
    try {
      Column raw = functions.col(InputTable.MALFORMED_COLUMN);
      r = data.agg(functions.count(functions.lit(1)),
          functions.first(functions.when(raw.rlike("[\\r\\n]"), raw), true)).first();
    } catch (Exception e) {
      data.unpersist();
      throw SluiceException.input(
          "Cannot read " + path + " as csv: " + TableReader.firstLine(e.getMessage()), e);
    }
    if (!r.isNullAt(1)) {
      data.unpersist();
      String text = r.getString(1);
      String start = text.substring(0, Math.min(40, text.length())).replaceAll("[\\r\\n]+", " | ");
      throw SluiceException.input("CSV input " + path + " has a malformed record that spans several"
          + " lines, most likely a quote that is never closed; it begins \"" + start + "\"");
    }
    return r.getLong(0);
  }

  private static boolean isNumber(String text) {
    try {
      Double.parseDouble(text.trim());
      return true;
    } catch (NumberFormatException e) {
      return false;
    }
  }

  private static Optional<FileStatus> directory(SparkSession spark, String path) {
    try {
      Path p = new Path(path);
      FileStatus st = p.getFileSystem(TableReader.hadoopConf(spark)).getFileStatus(p);
      return st.isDirectory() ? Optional.of(st) : Optional.empty();
    } catch (java.io.IOException e) {
      return Optional.empty();
    }
  }
}
