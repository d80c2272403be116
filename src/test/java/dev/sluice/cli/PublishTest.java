package dev.sluice.cli;

import static dev.sluice.cli.Runs.json;
import static dev.sluice.cli.Runs.run;
import static org.assertj.core.api.Assertions.assertThat;

import com.fasterxml.jackson.databind.JsonNode;
import dev.sluice.testing.Fixtures;
import dev.sluice.testing.SharedSpark;
import java.nio.file.Files;
import java.nio.file.Path;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.ExtendWith;
import org.junit.jupiter.api.io.TempDir;

/** Staged publication, the completion marker, refusals, reruns and partition-wise replacement. */
@ExtendWith(SharedSpark.class)
class PublishTest {
  @TempDir Path tmp;

  /** A small partitioned table of the demo kind: two days, partitioned by check day. */
  private Path table(SparkSession spark) {
    Path in = tmp.resolve("checks");
    spark.sql("SELECT CAST(id % 2 AS INT) AS day, id AS pallet, CAST(id % 17 AS DOUBLE) + 0.5 AS dwell_hours,"
            + " CASE WHEN id % 11 = 0 THEN NULL ELSE CAST(id % 7 AS DOUBLE) END AS door_openings FROM range(200)")
        .write().partitionBy("day").parquet(in.toString());
    return in;
  }

  @Test
  void markerIsWrittenLastWithTheRunIdAndStagingIsGone(SparkSession spark) {
    Path in = table(spark);
    Path out = tmp.resolve("out");
    Runs.Result r = run("run", "--input", in.toString(), "--output", out.toString());
    assertThat(r.code()).as(r.err()).isZero();
    JsonNode marker = json(out.resolve("_COMMITTED"));
    JsonNode record = json(out.resolve("run.json"));
    assertThat(marker.get("run_id").asText()).isEqualTo(record.get("run_id").asText());
    assertThat(marker.at("/rows/read").asLong()).isEqualTo(200);
    assertThat(marker.at("/rows/treated").asLong()).isEqualTo(200);
    assertThat(out.resolve("_staging")).doesNotExist();
  }

  @Test
  void aRunThatFailsLeavesThePreviousOutputAndItsMarker(SparkSession spark) throws Exception {
    Path in = table(spark);
    Path out = tmp.resolve("out");
    assertThat(run("run", "--input", in.toString(), "--output", out.toString()).code()).isZero();
    String before = Files.readString(out.resolve("_COMMITTED"));
    // The predicate fails inside Spark once the run is under way: staging exists by then.
    Runs.Result failed = run("run", "--input", in.toString(), "--output", out.toString(),
        "--where", "assert_true(pallet < 0) IS NULL");
    assertThat(failed.code()).isNotZero();
    assertThat(Files.readString(out.resolve("_COMMITTED"))).isEqualTo(before);
    assertThat(spark.read().parquet(out.resolve("treated").toString()).count()).isEqualTo(200);
  }

  @Test
  void foreignNonEmptyOutputIsRefusedUnlessReplaceIsGiven(SparkSession spark) throws Exception {
    Path in = table(spark);
    Path out = tmp.resolve("someone-elses");
    Files.createDirectories(out);
    Files.writeString(out.resolve("notes.txt"), "keep me");
    Runs.Result r = run("survey", "--input", in.toString(), "--output", out.toString());
    assertThat(r.code()).isEqualTo(2);
    assertThat(r.lastErrLine()).isEqualTo("sluice: Output " + out + " is not empty and was not written"
        + " by Sluice (it holds notes.txt); choose an empty directory or pass --replace");
    assertThat(run("survey", "--input", in.toString(), "--output", out.toString(), "--replace").code()).isZero();
    assertThat(out.resolve("notes.txt")).as("--replace does not delete what is not ours").exists();
  }

  @Test
  void outputThatIsAFileIsRefused(SparkSession spark) throws Exception {
    Path in = table(spark);
    Path file = tmp.resolve("out.parquet");
    Files.writeString(file, "x");
    Runs.Result r = run("run", "--input", in.toString(), "--output", file.toString());
    assertThat(r.code()).isEqualTo(2);
    assertThat(r.lastErrLine()).isEqualTo("sluice: Output " + file + " is a file, not a directory");
  }

  @Test
  void rerunningTheSameCommandGivesTheSameResult(SparkSession spark) {
    Path in = table(spark);
    Path out = tmp.resolve("out");
    String[] cmd = {"run", "--input", in.toString(), "--output", out.toString()};
    assertThat(run(cmd).code()).isZero();
    Dataset<Row> first = spark.read().parquet(out.resolve("treated").toString()).localCheckpoint();
    String plan = json(out.resolve("plan.json")).toString();
    assertThat(run(cmd).code()).isZero();
    Dataset<Row> second = spark.read().parquet(out.resolve("treated").toString());
    assertThat(second.count()).isEqualTo(200);
    Fixtures.assertSameRows(first, second);
    assertThat(json(out.resolve("plan.json")).toString()).isEqualTo(plan);
  }

  @Test
  void whereOnAPartitionedTableReplacesOnlyThePartitionsItWrites(SparkSession spark) {
    Path in = table(spark);
    Path out = tmp.resolve("out");
    assertThat(run("run", "--input", in.toString(), "--output", out.toString()).code()).isZero();
    String[] day1 = {"run", "--input", in.toString(), "--output", out.toString(), "--where", "day = 1",
        "--set", "defaults.outliers.action=keep"};
    Runs.Result r = run(day1);
    assertThat(r.code()).as(r.err()).isZero();
    assertThat(json(out.resolve("run.json")).at("/rows/read").asLong()).isEqualTo(100);
    Dataset<Row> all = spark.read().parquet(out.resolve("treated").toString());
    assertThat(all.count()).as("day 0 kept, day 1 replaced").isEqualTo(200);
    assertThat(all.filter("day = 0").count()).isEqualTo(100);
    assertThat(run(day1).code()).isZero();
    assertThat(spark.read().parquet(out.resolve("treated").toString()).count()).as("idempotent").isEqualTo(200);
  }
}
