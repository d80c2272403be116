package dev.sluice.io;

import static org.assertj.core.api.Assertions.assertThat;

import dev.sluice.testing.SharedSpark;
import java.nio.file.Files;
import java.nio.file.Path;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.ExtendWith;
import org.junit.jupiter.api.io.TempDir;

/**
 * The footer row count of a written directory against Spark's own count of the same files (the
 * reference), with what a write leaves beside them: markers, hidden staging, partition
 * directories, and a staging parent above the directory itself; and the footer count of a table
 * read, against Spark's count of it, only where nothing in the read drops or adds rows.
 */
@ExtendWith(SharedSpark.class)
class ParquetFootersTest {
  @TempDir Path tmp;

  /** The rows {@link ParquetFooters#read} counts in the read's footers; empty when it does not read them. */
  private static java.util.OptionalLong rowsRead(Dataset<Row> data) {
    return ParquetFooters.read(data).map(f -> java.util.OptionalLong.of(f.rows()))
        .orElse(java.util.OptionalLong.empty());
  }

  @Test
  void countsTheRowsOfEveryPartitionFileAndSkipsHiddenOnes(SparkSession spark) throws Exception {
    Path dir = tmp.resolve("_staging").resolve("run-1").resolve("treated");
    spark.sql("SELECT id, CAST(id % 3 AS STRING) AS part FROM range(1234)").repartition(5)
        .write().partitionBy("part").parquet(dir.toString());
    // Not rows of the table: a hidden directory and a hidden file, which readers skip too.
    Path hidden = Files.createDirectories(dir.resolve("_temporary"));
    Files.copy(firstParquet(dir.resolve("part=1")), hidden.resolve("part-99.parquet"));
    Files.copy(firstParquet(dir.resolve("part=2")), dir.resolve("part=2").resolve(".part-98.parquet"));
    long reference = spark.read().parquet(dir.toString()).count();
    assertThat(reference).isEqualTo(1234);
    assertThat(ParquetFooters.rows(spark.sessionState().newHadoopConf(), dir.toString())).isEqualTo(reference);
  }

  @Test
  void aMissingOrEmptyDirectoryHoldsNoRows(SparkSession spark) throws Exception {
    assertThat(ParquetFooters.rows(spark.sessionState().newHadoopConf(), tmp.resolve("none").toString())).isZero();
    Path empty = tmp.resolve("empty");
    spark.sql("SELECT id FROM range(0)").write().parquet(empty.toString());
    assertThat(ParquetFooters.rows(spark.sessionState().newHadoopConf(), empty.toString())).isZero();
  }

  @Test
  void aPlainParquetReadIsCountedFromItsFootersAsSparkCountsIt(SparkSession spark) throws Exception {
    Path dir = tmp.resolve("table");
    spark.sql("SELECT id, id * 2 AS `a.b c`, CAST(id % 3 AS STRING) AS part FROM range(2345)").repartition(4)
        .write().partitionBy("part").parquet(dir.toString());
    Dataset<Row> data = spark.read().parquet(dir.toString());
    // Reference: Spark's own count of the same read.
    assertThat(rowsRead(data)).hasValue(data.count());
    assertThat(rowsRead(data.select("`a.b c`", "part"))).hasValue(2345);
    // The pilot reads the files' columns only where the read's columns are theirs, by name.
    assertThat(ParquetFooters.read(data.select("`a.b c`", "part")).orElseThrow().asStored()).isTrue();
    assertThat(ParquetFooters.read(data.select(data.col("id").as("`a.b c`"))).orElseThrow().asStored()).isFalse();
  }

  @Test
  void aReadThatDropsOrAddsRowsIsLeftToSpark(SparkSession spark) throws Exception {
    Path dir = tmp.resolve("table");
    spark.sql("SELECT id FROM range(100)").write().parquet(dir.toString());
    Dataset<Row> data = spark.read().parquet(dir.toString());
    assertThat(rowsRead(data.filter("id > 5"))).isEmpty();
    assertThat(rowsRead(data.limit(10))).isEmpty();
    assertThat(rowsRead(data.union(data))).isEmpty();
    Dataset<Row> skipping = spark.read().option("ignoreCorruptFiles", "true").parquet(dir.toString());
    assertThat(rowsRead(skipping)).isEmpty();
    spark.conf().set("spark.sql.files.ignoreMissingFiles", "true");
    try {
      assertThat(rowsRead(spark.read().parquet(dir.toString()))).isEmpty();
    } finally {
      spark.conf().unset("spark.sql.files.ignoreMissingFiles");
    }
    Path csv = tmp.resolve("t.csv");
    Files.writeString(csv, "a\n1\n2\n");
    assertThat(rowsRead(spark.read().option("header", "true").csv(csv.toString()))).isEmpty();
  }

  @Test
  void aFooterThatCannotBeReadLeavesTheCountToSpark(SparkSession spark) throws Exception {
    Path dir = tmp.resolve("table");
    spark.sql("SELECT id FROM range(100)").repartition(2).write().parquet(dir.toString());
    Dataset<Row> data = spark.read().parquet(dir.toString());
    Files.writeString(firstParquet(dir), "not parquet");
    assertThat(rowsRead(data)).isEmpty();
  }

  private static Path firstParquet(Path dir) throws Exception {
    try (var files = Files.list(dir)) {
      return files.filter(p -> p.getFileName().toString().endsWith(".parquet")).findFirst().orElseThrow();
    }
  }
}
