package dev.sluice.cli;

import static dev.sluice.cli.Runs.run;
import static org.assertj.core.api.Assertions.assertThat;

import dev.sluice.Sluice;
import dev.sluice.config.SettingsLoader;
import dev.sluice.io.ParquetEncoding;
import dev.sluice.testing.SharedSpark;
import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.List;
import java.util.Map;
import java.util.Optional;
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
 * page holds, or mostly distinct values in no order, without trying a dictionary; other columns
 * keep Parquet's defaults, and so does `treat`, which has no pilot. Invented data; the encodings are read back from the files' footers
 * with Parquet's own reader, under Parquet's default page sizes.
 */
@ExtendWith(SharedSpark.class)
class TreatedEncodingTest {
  @TempDir Path tmp;

  @Test
  void runSkipsTheDictionaryWhereThePilotShowsItCannotHold(SparkSession spark) throws IOException {
    Path input = tmp.resolve("in");
    // Four files of 70,000 rows in id order: readings come in pairs, levels cycle through 5
    // values. The pilot reads the first 70,000 rows of each file: 140,000 distinct readings,
    // 1,120,000 bytes, more than a dictionary page holds (Parquet's default, 1 MiB). With
    // Parquet's other defaults a data page holds 20,000 rows, so a file of pairs keeps its
    // dictionary (35,000 distinct values, well within a page): the control below.
    spark.range(0, 280_000, 1, 4).selectExpr("CAST(FLOOR(id / 2) AS DOUBLE) * 0.001 AS reading",
        "CAST(id % 5 AS DOUBLE) AS level").write().parquet(input.toString());
    Path ran = tmp.resolve("ran");
    assertThat(run("run", "--input", input.toString(), "--output", ran.toString(),
        "--set", "quantiles.max-held-values=1000", "--set", "quantiles.pilot-rows=280000").code()).isZero();
    assertThat(encodings(ran.resolve("treated"), "reading")).doesNotContain(Encoding.PLAIN_DICTIONARY);
    assertThat(encodings(ran.resolve("treated"), "level")).contains(Encoding.PLAIN_DICTIONARY);

    Path treated = tmp.resolve("treated");
    assertThat(run("treat", "--plan", ran.resolve("plan.json").toString(), "--input", input.toString(),
        "--output", treated.toString()).code()).isZero();
    assertThat(encodings(treated.resolve("treated"), "reading")).contains(Encoding.PLAIN_DICTIONARY);
  }

  @Test
  void runSkipsTheDictionaryOfAMostlyDistinctColumnWhereParquetWouldDropIt(SparkSession spark)
      throws IOException {
    Path input = tmp.resolve("in");
    // Four files of 25,000 rows: "noise" distinct and in no order, "level" 5 values. A pilot of
    // 20,000 rows holds 160,000 bytes of noise, well within a dictionary page: only its share of
    // distinct values and their order tell the dictionary is wasted.
    spark.range(0, 100_000, 1, 4).selectExpr("rand(20261203) AS noise", "CAST(id % 5 AS DOUBLE) AS level")
        .write().parquet(input.toString());
    Path ran = tmp.resolve("ran");
    assertThat(run("run", "--input", input.toString(), "--output", ran.toString(),
        "--set", "quantiles.max-held-values=1000", "--set", "quantiles.pilot-rows=20000").code()).isZero();
    assertThat(encodings(ran.resolve("treated"), "noise")).doesNotContain(Encoding.PLAIN_DICTIONARY);
    assertThat(encodings(ran.resolve("treated"), "level")).contains(Encoding.PLAIN_DICTIONARY);

    // Parquet would give the dictionary up itself, so the files cannot show the rule acted: the fit
    // under the same settings does.
    Sluice.Fit fit = Sluice.fit(spark.read().parquet(input.toString()), SettingsLoader.load(Optional.empty(),
        List.of("quantiles.max-held-values=1000", "quantiles.pilot-rows=20000")), List.of());
    assertThat(ParquetEncoding.options(fit.profile().pilotDistinct(), fit.profile().pilot(),
        spark.read().parquet(input.toString()).schema(), ParquetEncoding.DEFAULT_DICTIONARY_PAGE))
        .containsOnly(Map.entry("parquet.enable.dictionary#noise", "false"));

    // The control: `treat` keeps Parquet's defaults, and Parquet drops the dictionary itself at the
    // end of the first page. The column comes out the same: same encodings, same bytes.
    Path treated = tmp.resolve("treated");
    assertThat(run("treat", "--plan", ran.resolve("plan.json").toString(), "--input", input.toString(),
        "--output", treated.toString()).code()).isZero();
    assertThat(encodings(treated.resolve("treated"), "noise"))
        .isEqualTo(encodings(ran.resolve("treated"), "noise"));
    assertThat(bytes(treated.resolve("treated"), "noise")).isEqualTo(bytes(ran.resolve("treated"), "noise"));
  }

  /** The stored bytes of a column over every row group of every Parquet file under {@code dir}. */
  private static long bytes(Path dir, String column) throws IOException {
    long total = 0;
    for (ColumnChunkMetaData c : chunks(dir, column)) {
      total += c.getTotalSize();
    }
    return total;
  }

  /** The encodings of a column over every row group of every Parquet file under {@code dir}. */
  private static Set<Encoding> encodings(Path dir, String column) throws IOException {
    Set<Encoding> found = new HashSet<>();
    for (ColumnChunkMetaData c : chunks(dir, column)) {
      found.addAll(c.getEncodings());
    }
    assertThat(found).as("encodings of %s under %s", column, dir).isNotEmpty();
    return found;
  }

  private static List<ColumnChunkMetaData> chunks(Path dir, String column) throws IOException {
    List<ColumnChunkMetaData> found = new ArrayList<>();
    try (Stream<Path> files = Files.list(dir)) {
      for (Path f : files.filter(p -> p.toString().endsWith(".parquet")).sorted().toList()) {
        try (ParquetFileReader r = ParquetFileReader.open(HadoopInputFile.fromPath(
            new org.apache.hadoop.fs.Path(f.toUri()), new Configuration()))) {
          for (BlockMetaData b : r.getFooter().getBlocks()) {
            for (ColumnChunkMetaData c : b.getColumns()) {
              if (c.getPath().toDotString().equals(column)) {
                found.add(c);
              }
            }
          }
        }
      }
    }
    return found;
  }
}
