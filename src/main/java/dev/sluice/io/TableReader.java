package dev.sluice.io;

import dev.sluice.SluiceException;
import dev.sluice.config.InputSettings;
import java.io.IOException;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.Optional;
import java.util.Set;
import org.apache.hadoop.conf.Configuration;
import org.apache.hadoop.fs.FileStatus;
import org.apache.hadoop.fs.FileSystem;
import org.apache.hadoop.fs.Path;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;

/**
 * Reads a table from a file or a directory of partitions on any Hadoop filesystem. The input is
 * only ever read: nothing here writes to, moves or deletes it.
 */
public final class TableReader {
  static final Set<String> FORMATS = Set.of("parquet", "csv", "orc", "json");

  private TableReader() {}

  public static InputTable read(SparkSession spark, String path, InputSettings settings) {
    FileStatus status = statusOf(spark, path);
    String format = formatOf(path, settings.format());
    try {
      if (format.equals("csv")) {
        return CsvInput.read(spark, path, settings);
      }
      Dataset<Row> data = spark.read().format(format).load(path);
      data.schema(); // resolve now, so a bad table fails here with its path
      if (format.equals("json") && data.schema().fields().length == 1
          && data.schema().fieldNames()[0].equals("_corrupt_record")) {
        throw SluiceException.input("Cannot read " + path + " as json: no line of it is a JSON record");
      }
      List<String> partitions = status.isDirectory() ? partitionColumns(spark, status) : List.of();
      return new InputTable(data, path, format, partitions);
    } catch (SluiceException e) {
      throw e;
    } catch (Exception e) {
      // Spark throws checked exceptions (SparkException) without declaring them.
      throw SluiceException.input(
          "Cannot read " + path + " as " + format + ": " + firstLine(e.getMessage()), e);
    }
  }

  /** The format: the configured one, else the file extension, else Parquet. */
  static String formatOf(String path, Optional<String> configured) {
    if (configured.isPresent() && !configured.get().isBlank()) {
      String f = configured.get().toLowerCase(Locale.ROOT);
      if (!FORMATS.contains(f)) {
        throw SluiceException.usage(
            "Cannot set format to " + configured.get() + ": expected one of csv, json, orc, parquet");
      }
      return f;
    }
    String lower = path.toLowerCase(Locale.ROOT).replaceAll("/+$", "");
    if (lower.endsWith(".csv") || lower.endsWith(".csv.gz")) {
      return "csv";
    }
    if (lower.endsWith(".json") || lower.endsWith(".jsonl") || lower.endsWith(".ndjson")) {
      return "json";
    }
    if (lower.endsWith(".orc")) {
      return "orc";
    }
    return "parquet";
  }

  private static FileStatus statusOf(SparkSession spark, String path) {
    try {
      Path p = new Path(path);
      FileSystem fs = p.getFileSystem(hadoopConf(spark));
      if (!fs.exists(p)) {
        throw SluiceException.input("Input path " + path + " does not exist");
      }
      return fs.getFileStatus(p);
    } catch (IOException | IllegalArgumentException e) {
      throw SluiceException.input("Cannot open input path " + path + ": " + firstLine(e.getMessage()), e);
    }
  }

  /**
   * Partition columns from a directory layout of name=value folders, outermost first. Only the
   * first branch is followed; Spark itself rejects layouts whose branches disagree.
   */
  static List<String> partitionColumns(SparkSession spark, FileStatus root) {
    List<String> names = new ArrayList<>();
    try {
      FileSystem fs = root.getPath().getFileSystem(hadoopConf(spark));
      Path dir = root.getPath();
      while (true) {
        Optional<FileStatus> next = firstPartitionDir(fs, dir);
        if (next.isEmpty()) {
          return names;
        }
        String folder = next.get().getPath().getName();
        names.add(unescape(folder.substring(0, folder.indexOf('='))));
        dir = next.get().getPath();
      }
    } catch (IOException e) {
      throw SluiceException.input("Cannot list input path " + root.getPath() + ": " + e.getMessage(), e);
    }
  }

  private static Optional<FileStatus> firstPartitionDir(FileSystem fs, Path dir) throws IOException {
    for (FileStatus s : fs.listStatus(dir)) {
      String n = s.getPath().getName();
      if (s.isDirectory() && n.indexOf('=') > 0 && !n.startsWith("_") && !n.startsWith(".")) {
        return Optional.of(s);
      }
    }
    return Optional.empty();
  }

  private static String unescape(String s) {
    // Spark percent-escapes special characters in partition folder names when it writes them.
    return org.apache.spark.sql.catalyst.catalog.ExternalCatalogUtils.unescapePathName(s);
  }

  static Configuration hadoopConf(SparkSession spark) {
    return spark.sparkContext().hadoopConfiguration();
  }

  /** The first line of an exception message, for one-line errors. */
  public static String firstLineOf(String message) {
    return firstLine(message);
  }

  /**
   * The first non-blank line: Spark's parse errors start with a line break, and their first line
   * alone would leave the message without a reason.
   */
  static String firstLine(String message) {
    if (message == null) {
      return "unknown error";
    }
    for (String line : message.split("\\R")) {
      if (!line.isBlank()) {
        return line.trim();
      }
    }
    return "unknown error";
  }
}
