package dev.sluice.cli;

import static dev.sluice.cli.Runs.run;
import static org.assertj.core.api.Assertions.assertThat;

import dev.sluice.testing.SharedSpark;
import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.HashSet;
import java.util.Set;
import java.util.stream.Stream;
import org.apache.hadoop.conf.Configuration;
import org.apache.parquet.column.Encoding;
import org.apache.parquet.hadoop.ParquetFileReader;
import org.apache.parquet.hadoop.metadata.BlockMetaData;
import org.apache.parquet.hadoop.metadata.ColumnChunkMetaData;
import org.apache.parquet.hadoop.util.HadoopInputFile;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.ExtendWith;
import org.junit.jupiter.api.io.TempDir;

/**
 * `run` writes a treated column whose pilot shows more distinct values than a Parquet dictionary
 * page holds without trying a dictionary; other columns keep Parquet's defaults, and so does
 * `treat`, which has no pilot. Invented data; the encodings are read back from the files' footers
 * with Parquet's own reader. Small dictionary and data pages make a dictionary attempt visible:
 * the pages written before the dictionary overflows stay dictionary-encoded.
 */
@ExtendWith(SharedSpark.class)
class TreatedEncodingTest {
  @TempDir Path tmp;

  @Test
  void runSkipsTheDictionaryWhereThePilotShowsItCannotHold(SparkSession spark) throws IOException {
    Path input = tmp.resolve("in");
    // Four files of 5,000 rows in id order: readings come in pairs (10,000 distinct), levels cycle
    // through 5 values. The pilot reads the first 1,000 rows of each file: 2,000 distinct
    // readings, 16,000 bytes, more than the 8,192-byte dictionary page set below holds.
    spark.range(0, 20000, 1, 4).selectExpr("CAST(FLOOR(id / 2) AS DOUBLE) * 0.001 AS reading",
        "CAST(id % 5 AS DOUBLE) AS level").write().parquet(input.toString());
    String[] large = {"--set", "quantiles.max-held-values=1000", "--set", "quantiles.pilot-rows=4000"};
    // Data pages of about 100 values: with pairs, a page compresses well enough for Parquet to
    // keep its dictionary until the dictionary outgrows its page (at 1,024 distinct values), so the
    // pages written before that stay dictionary-encoded.
    // The job runs in a session of its own: set them where every session of the context reads them.
    org.apache.hadoop.conf.Configuration hadoop = spark.sparkContext().hadoopConfiguration();
    hadoop.set("parquet.dictionary.page.size", "8192");
    hadoop.set("parquet.page.size", "256");
    try {
      Path ran = tmp.resolve("ran");
      assertThat(run(concat(new String[] {"run", "--input", input.toString(), "--output", ran.toString()}, large))
          .code()).isZero();
      assertThat(encodings(ran.resolve("treated"), "reading")).doesNotContain(Encoding.PLAIN_DICTIONARY);
      assertThat(encodings(ran.resolve("treated"), "level")).contains(Encoding.PLAIN_DICTIONARY);

      Path treated = tmp.resolve("treated");
      assertThat(run("treat", "--plan", ran.resolve("plan.json").toString(), "--input", input.toString(),
          "--output", treated.toString()).code()).isZero();
      assertThat(encodings(treated.resolve("treated"), "reading")).contains(Encoding.PLAIN_DICTIONARY);
    } finally {
      hadoop.unset("parquet.dictionary.page.size");
      hadoop.unset("parquet.page.size");
    }
  }

  /** The encodings of a column over every row group of every Parquet file under {@code dir}. */
  private static Set<Encoding> encodings(Path dir, String column) throws IOException {
    Set<Encoding> found = new HashSet<>();
    try (Stream<Path> files = Files.list(dir)) {
      for (Path f : files.filter(p -> p.toString().endsWith(".parquet")).toList()) {
        try (ParquetFileReader r = ParquetFileReader.open(HadoopInputFile.fromPath(
            new org.apache.hadoop.fs.Path(f.toUri()), new Configuration()))) {
          for (BlockMetaData b : r.getFooter().getBlocks()) {
            for (ColumnChunkMetaData c : b.getColumns()) {
              if (c.getPath().toDotString().equals(column)) {
                found.addAll(c.getEncodings());
              }
            }
          }
        }
      }
    }
    assertThat(found).as("encodings of %s under %s", column, dir).isNotEmpty();
    return found;
  }

  private static String[] concat(String[] a, String[] b) {
    String[] out = new String[a.length + b.length];
    System.arraycopy(a, 0, out, 0, a.length);
    System.arraycopy(b, 0, out, a.length, b.length);
    return out;
  }
}
