package dev.sluice.demo;

import static org.apache.spark.sql.functions.col;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.Paths;
import java.util.Arrays;
import java.util.stream.Stream;
import org.apache.spark.sql.DataFrameWriter;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SaveMode;
import org.apache.spark.sql.SparkSession;

/**
 * Writes the {@link ColdStorageTable} demo table as Parquet.
 *
 * <pre>
 * GenerateSample --output DIR [--rows N] [--seed S] [--partitions-by COLUMN|none]
 * </pre>
 *
 * Defaults: 20,000 rows, seed {@value #DEFAULT_SEED}, partitioned by {@code depot}. The output is
 * overwritten, holds one file per partition value (or a single file with {@code none}) with rows
 * sorted by {@code pallet_id}, so the same arguments give the same files, and on a local file
 * system the checksum side files are removed to keep the sample tidy.
 */
public final class GenerateSample {
  public static final long DEFAULT_ROWS = 20_000;
  public static final long DEFAULT_SEED = 20261201L;

  /** The parsed command line. */
  record Options(String output, long rows, long seed, String partitionBy) {
    /** Parses the arguments, rejecting unknown options with a message that names them. */
    static Options parse(String... args) {
      String output = null;
      long rows = DEFAULT_ROWS;
      long seed = DEFAULT_SEED;
      String partitionBy = "depot";
      for (int i = 0; i < args.length; i += 2) {
        String value = i + 1 < args.length ? args[i + 1] : null;
        if (value == null) {
          throw new IllegalArgumentException("missing value after " + args[i]);
        }
        switch (args[i]) {
          case "--output" -> output = value;
          case "--rows" -> rows = Long.parseLong(value);
          case "--seed" -> seed = Long.parseLong(value);
          case "--partitions-by" -> partitionBy = value;
          default -> throw new IllegalArgumentException("unknown option " + args[i]);
        }
      }
      if (output == null || rows < 0) {
        throw new IllegalArgumentException(
            "usage: --output DIR [--rows N>=0] [--seed S] [--partitions-by COLUMN|none]");
      }
      return new Options(output, rows, seed, partitionBy);
    }
  }

  private GenerateSample() {}

  /** Runs with its own local session; see the class comment for the arguments. */
  public static void main(String[] args) {
    Options options = Options.parse(args);
    SparkSession spark =
        SparkSession.builder()
            .master("local[2]")
            .appName("sluice-generate-sample")
            .config("spark.ui.enabled", "false")
            .config("spark.sql.session.timeZone", "UTC")
            .config("spark.sql.shuffle.partitions", "6")
            .getOrCreate();
    try {
      write(spark, options);
    } finally {
      spark.stop();
    }
  }

  /** Generates and writes the table as {@code options} say, in the given session. */
  static void write(SparkSession spark, Options options) {
    Dataset<Row> table = ColdStorageTable.generate(spark, options.rows(), options.seed());
    String by = options.partitionBy();
    boolean flat = "none".equals(by);
    // Hash-partitioning on the column sends each of its values to one task: one file per value.
    Dataset<Row> arranged = flat ? table.coalesce(1) : table.repartition(col(by));
    // Leading with the partition column satisfies the writer's own ordering, so it adds no sort.
    String[] order = flat ? new String[] {"pallet_id"} : new String[] {by, "pallet_id"};
    DataFrameWriter<Row> writer =
        arranged.sortWithinPartitions(order[0], Arrays.copyOfRange(order, 1, order.length))
            .write()
            .mode(SaveMode.Overwrite);
    (flat ? writer : writer.partitionBy(by)).parquet(options.output());
    removeChecksums(options.output());
  }

  /** Deletes the ".name.crc" side files the local Hadoop file system writes next to each file. */
  static void removeChecksums(String output) {
    if (output.contains("://") && !output.startsWith("file:")) {
      return;
    }
    Path root = Paths.get(output.replaceFirst("^file:(//)?", ""));
    try (Stream<Path> files = Files.walk(root)) {
      for (Path file : (Iterable<Path>) files::iterator) {
        String name = file.getFileName().toString();
        if (name.startsWith(".") && name.endsWith(".crc")) {
          Files.delete(file);
        }
      }
    } catch (IOException e) {
      throw new UncheckedIOException("cannot tidy " + root, e);
    }
  }
}
