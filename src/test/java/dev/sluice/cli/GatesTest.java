package dev.sluice.cli;

import static dev.sluice.cli.Runs.json;
import static dev.sluice.cli.Runs.run;
import static org.assertj.core.api.Assertions.assertThat;

import com.fasterxml.jackson.databind.JsonNode;
import dev.sluice.testing.SharedSpark;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.functions;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.ExtendWith;
import org.junit.jupiter.api.io.TempDir;

/**
 * Gates on the sample: a passed limit exits 4, names the limit, publishes the summary and run
 * record, and holds the treated rows back under held/ unless configured to publish them. The
 * figures a limit is checked against are the run's own (cross-checked with its summary table).
 */
@ExtendWith(SharedSpark.class)
class GatesTest {
  @TempDir Path tmp;

  @Test
  void aPassedColumnLimitHoldsTheTreatedRowsBack(SparkSession spark) {
    Path out = tmp.resolve("held-run");
    Runs.Result r = run("run", "--input", "sample-parquet", "--output", out.toString(), "--config", "conf/sample.conf",
        "--set", "columns.energy_kwh.limits.null-rate=0.001", "--set", "defaults.limits.null-rate=0.5");
    assertThat(r.code()).as(r.err()).isEqualTo(4);
    assertThat(r.lastErrLine()).startsWith("sluice: 1 gate limit(s) passed: energy_kwh: null-rate ")
        .contains("is above its limit 0.001").contains("held back under " + out + "/held");
    assertThat(out.resolve("treated")).doesNotExist();
    assertThat(out.resolve("held/treated")).isDirectory();
    assertThat(json(out.resolve("_COMMITTED")).get("status").asText()).isEqualTo("gate limits passed");
    assertThat(out.resolve("summary.csv")).exists();
    assertThat(out.resolve("report.html")).exists();
    JsonNode record = json(out.resolve("run.json"));
    assertThat(record.get("status").asText()).isEqualTo("gate limits passed");
    JsonNode passed = record.at("/gates/passed");
    assertThat(passed).hasSize(1);
    assertThat(passed.at("/0/column").asText()).isEqualTo("energy_kwh");
    assertThat(passed.at("/0/limit").asText()).isEqualTo("null-rate");
    // The figure checked is the null rate the summary reports for the column.
    Row summary = spark.read().parquet(out.resolve("summary").toString())
        .filter(functions.col("column").equalTo("energy_kwh")).first();
    assertThat(passed.at("/0/measured").asDouble()).isEqualTo(summary.<Double>getAs("null_rate"));
    assertThat(spark.read().parquet(out.resolve("held/treated").toString()).count())
        .isEqualTo(record.at("/rows/treated").asLong()).isEqualTo(20000);
    assertThat(Files.exists(out.resolve("report.html"))).isTrue();
    assertThat(readString(out.resolve("report.html"))).contains("1 limit(s) passed").contains("energy_kwh: null-rate");

    // The next run into the same directory keeps its limits: held/ goes, treated/ is back.
    Runs.Result ok = run("run", "--input", "sample-parquet", "--output", out.toString(), "--config", "conf/sample.conf",
        "--set", "defaults.limits.null-rate=0.5");
    assertThat(ok.code()).as(ok.err()).isZero();
    assertThat(out.resolve("held")).doesNotExist();
    assertThat(out.resolve("treated")).isDirectory();
    assertThat(json(out.resolve("run.json")).at("/gates/outcome").asText()).isEqualTo("kept");
  }

  @Test
  void onBreachPublishStillExitsFourAndTheQuarantinedShareIsATableLimit() {
    Path out = tmp.resolve("published");
    // Humidity above 100 % quarantines 113 of the 20000 rows (0.565 %), over a limit of 0.5 %.
    Runs.Result r = run("run", "--input", "sample-parquet", "--output", out.toString(), "--config", "conf/sample.conf",
        "--set", "columns.rel_humidity_pct.invalid-action=quarantine", "--set", "gates.quarantined-share=0.005",
        "--set", "gates.on-breach=publish");
    assertThat(r.code()).as(r.err()).isEqualTo(4);
    assertThat(r.lastErrLine()).contains("table: quarantined-share 0.00565 is above its limit 0.005")
        .contains("the treated output is published");
    assertThat(out.resolve("treated")).isDirectory();
    assertThat(out.resolve("quarantine")).isDirectory();
    assertThat(out.resolve("held")).doesNotExist();
  }

  @Test
  void aFitThatPassesALimitPublishesItsPlanAndExitsFour() {
    Path out = tmp.resolve("fit");
    Runs.Result r = run("fit", "--input", "sample-parquet", "--output", out.toString(), "--config", "conf/sample.conf",
        "--set", "defaults.limits.null-rate=0.001");
    assertThat(r.code()).isEqualTo(4);
    assertThat(r.lastErrLine()).contains("the outputs are published");
    assertThat(out.resolve("plan.json")).exists();
    assertThat(json(out.resolve("plan.json")).at("/gates/columns/energy_kwh/nullRate").asDouble()).isEqualTo(0.001);
  }

  @Test
  void treatChecksDriftAgainstThePlansLimitsOrTheOnesItIsGiven(SparkSession spark) {
    Path fit = tmp.resolve("fit-psi");
    Runs.Result f = run("fit", "--input", "sample-parquet", "--output", fit.toString(), "--config", "conf/sample.conf",
        "--set", "defaults.limits.psi=0.25");
    assertThat(f.code()).as("no drift index at fit time: nothing to pass; " + f.err()).isZero();
    Path plan = fit.resolve("plan.json");
    Path moved = tmp.resolve("moved");
    spark.read().parquet("sample-parquet").withColumn("dwell_hours", functions.col("dwell_hours").multiply(2))
        .write().parquet(moved.toString());

    Path out = tmp.resolve("treat-moved");
    Runs.Result r = run("treat", "--plan", plan.toString(), "--input", moved.toString(), "--output", out.toString());
    assertThat(r.code()).as(r.err()).isEqualTo(4);
    assertThat(r.lastErrLine()).contains("dwell_hours: psi ").doesNotContain("air_temp_c");
    assertThat(out.resolve("held/treated")).isDirectory();
    List<Row> summary = spark.read().parquet(out.resolve("summary").toString())
        .filter(functions.col("limits_passed").notEqual("")).collectAsList();
    assertThat(summary).extracting(row -> row.<String>getAs("column")).containsExactly("dwell_hours");
    assertThat(summary.get(0).<String>getAs("limits_passed")).isEqualTo("psi");

    // A looser limit given to treat replaces the plan's.
    Path loose = tmp.resolve("treat-loose");
    Runs.Result ok = run("treat", "--plan", plan.toString(), "--input", moved.toString(), "--output", loose.toString(),
        "--set", "columns.dwell_hours.limits.psi=100");
    assertThat(ok.code()).as(ok.err()).isZero();
    assertThat(json(loose.resolve("plan.json")).at("/gates/columns/dwell_hours/psi").asDouble()).isEqualTo(100.0);
    assertThat(json(loose.resolve("plan.json")).at("/gates/columns/air_temp_c/psi").asDouble()).isEqualTo(0.25);
    assertThat(loose.resolve("treated")).isDirectory();

    Runs.Result refused = run("treat", "--plan", plan.toString(), "--input", moved.toString(),
        "--output", tmp.resolve("refused").toString(), "--set", "columns.dwell_hours.outliers.iqr-k=3");
    assertThat(refused.code()).isEqualTo(2);
    assertThat(refused.lastErrLine()).contains("not sluice.columns.dwell_hours.outliers.iqr-k");
  }

  private static String readString(Path p) {
    try {
      return Files.readString(p);
    } catch (java.io.IOException e) {
      throw new java.io.UncheckedIOException(e);
    }
  }
}
