package dev.sluice.io;

import static org.assertj.core.api.Assertions.assertThat;

import dev.sluice.testing.SharedSpark;
import java.nio.file.Files;
import java.nio.file.Path;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.ExtendWith;
import org.junit.jupiter.api.io.TempDir;

/**
 * The footer row count of a written directory against Spark's own count of the same files (the
 * reference), with what a write leaves beside them: markers, hidden staging, partition
 * directories, and a staging parent above the directory itself.
 */
@ExtendWith(SharedSpark.class)
class ParquetFootersTest {
  @TempDir Path tmp;

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

  private static Path firstParquet(Path dir) throws Exception {
    try (var files = Files.list(dir)) {
      return files.filter(p -> p.getFileName().toString().endsWith(".parquet")).findFirst().orElseThrow();
    }
  }
}
