package dev.sluice.cli;

import static dev.sluice.cli.Runs.json;
import static dev.sluice.cli.Runs.run;
import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

import com.fasterxml.jackson.databind.JsonNode;
import dev.sluice.testing.Fixtures;
import dev.sluice.testing.SharedSpark;
import java.nio.file.Files;
import java.nio.file.Path;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.functions;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.TestInstance;
import org.junit.jupiter.api.extension.ExtendWith;
import org.junit.jupiter.api.io.TempDir;

/**
 * fit, then treat with the saved plan.json: the same treated rows as run with the same settings
 * (reference: run itself), no refitting, and clear refusals for a plan that does not fit the table.
 */
@ExtendWith(SharedSpark.class)
@TestInstance(TestInstance.Lifecycle.PER_CLASS)
class SavedPlanTest {
  private Path tmp;
  private Path plan;

  @BeforeAll
  void fit(@TempDir Path dir) {
    tmp = dir;
    Path out = tmp.resolve("fit");
    Runs.Result r = run("fit", "--input", "sample-parquet", "--output", out.toString(), "--config", "conf/sample.conf");
    assertThat(r.code()).as(r.err()).isZero();
    assertThat(out.resolve("treated")).doesNotExist();
    plan = out.resolve("plan.json");
    assertThat(plan).exists();
  }

  @Test
  void treatWithTheSavedPlanGivesWhatRunGives(SparkSession spark) {
    Path ran = tmp.resolve("run");
    Path treated = tmp.resolve("treat");
    assertThat(run("run", "--input", "sample-parquet", "--output", ran.toString(), "--config", "conf/sample.conf").code()).isZero();
    Runs.Result r = run("treat", "--plan", plan.toString(), "--input", "sample-parquet", "--output", treated.toString());
    assertThat(r.code()).as(r.err()).isZero();
    assertThat(r.err()).contains("with the saved plan (no refitting)").doesNotContain("pass 1");
    Dataset<Row> a = spark.read().parquet(treated.resolve("treated").toString());
    Dataset<Row> b = spark.read().parquet(ran.resolve("treated").toString());
    assertThat(a.count()).isEqualTo(b.count()).isEqualTo(20000);
    Fixtures.assertSameRows(a, b);
    assertThat(json(treated.resolve("plan.json"))).isEqualTo(json(plan));
    JsonNode record = json(treated.resolve("run.json"));
    assertThat(record.at("/rows/reconciled").asBoolean()).isTrue();
    assertThat(record.at("/plan_file").asText()).isEqualTo(plan.toString());
    assertThat(treated.resolve("_COMMITTED")).exists();
  }

  @Test
  void aColumnThePlanTreatsMustBeThereAndNewOnesPassThrough(SparkSession spark) {
    Dataset<Row> sample = spark.read().parquet("sample-parquet");
    Path lacking = tmp.resolve("lacking");
    sample.drop("energy_kwh").write().parquet(lacking.toString());
    Runs.Result missing = run("treat", "--plan", plan.toString(), "--input", lacking.toString(),
        "--output", tmp.resolve("out-lacking").toString());
    assertThat(missing.code()).isEqualTo(3);
    assertThat(missing.lastErrLine()).contains("The table lacks energy_kwh, which the plan").contains("treats");
    Path skippedOut = tmp.resolve("out-skipped");
    Runs.Result skipped = run("treat", "--plan", plan.toString(), "--input", lacking.toString(),
        "--output", skippedOut.toString(), "--skip-missing-columns");
    assertThat(skipped.code()).as(skipped.err()).isZero();
    assertThat(json(skippedOut.resolve("run.json")).at("/plan_columns_skipped/0").asText()).isEqualTo("energy_kwh");
    assertThat(json(skippedOut.resolve("run.json")).at("/rows/reconciled").asBoolean()).isTrue();

    Path wider = tmp.resolve("wider");
    sample.withColumn("shift code", functions.lit("night")).write().parquet(wider.toString());
    Path out = tmp.resolve("out-wider");
    Runs.Result r = run("treat", "--plan", plan.toString(), "--input", wider.toString(), "--output", out.toString());
    assertThat(r.code()).as(r.err()).isZero();
    assertThat(r.err()).contains("columns the plan does not know pass through untouched: shift code");
    assertThat(json(out.resolve("run.json")).at("/columns_not_in_plan/0").asText()).isEqualTo("shift code");
    Dataset<Row> t = spark.read().parquet(out.resolve("treated").toString());
    assertThat(t.filter(functions.col("`shift code`").equalTo("night")).count()).isEqualTo(20000);

    Path retyped = tmp.resolve("retyped");
    sample.withColumn("energy_kwh", functions.col("energy_kwh").cast("string")).write().parquet(retyped.toString());
    Runs.Result changed = run("treat", "--plan", plan.toString(), "--input", retyped.toString(),
        "--output", tmp.resolve("out-retyped").toString());
    assertThat(changed.code()).isEqualTo(3);
    assertThat(changed.lastErrLine()).contains("energy_kwh (double when fitted, string now)");
  }

  @Test
  void explainPrintsThePlanAndItsSqlGivesTheRowsTreatGives(SparkSession spark) {
    Runs.Result text = run("explain", "--plan", plan.toString());
    assertThat(text.code()).as(text.err()).isZero();
    assertThat(text.out()).contains("air_temp_c (double, treat)", "validity: from -40.0 to 40.0; values outside: set-missing",
        "outliers: iqr, both: flag below", "pallet_id (string, identifier)", "suggested to drop: gross_weight_lb");
    // A plan that quarantines rows: the SELECT's WHERE leaves out what treat quarantines.
    Path fitted = tmp.resolve("fit-quarantine");
    assertThat(run("fit", "--input", "sample-parquet", "--output", fitted.toString(), "--config", "conf/sample.conf",
        "--set", "columns.rel_humidity_pct.invalid-action=quarantine").code()).isZero();
    Path quarantinePlan = fitted.resolve("plan.json");
    Path treated = tmp.resolve("treat-quarantine");
    assertThat(run("treat", "--plan", quarantinePlan.toString(), "--input", "sample-parquet",
        "--output", treated.toString()).code()).isZero();
    // Drift is observed while writing; with rows held back too, it still covers every row read.
    for (JsonNode d : json(treated.resolve("run.json")).get("drift")) {
      assertThat(d.get("null_rate_now").asDouble()).as(d.toString()).isCloseTo(d.get("null_rate_fit").asDouble(), within(1e-11));
    }
    assertThat(json(treated.resolve("run.json")).at("/rows/read").asLong()).isEqualTo(20000);
    Runs.Result sql = run("explain", "--plan", quarantinePlan.toString(), "--sql", "--table", "pallet checks");
    assertThat(sql.code()).as(sql.err()).isZero();
    assertThat(sql.out()).startsWith("SELECT").contains("FROM `pallet checks`").contains("WHERE");
    spark.read().parquet("sample-parquet").createOrReplaceTempView("`pallet checks`");
    Dataset<Row> viaSql = spark.sql(sql.out());
    Dataset<Row> viaTreat = spark.read().parquet(treated.resolve("treated").toString()).select(
        java.util.Arrays.stream(viaSql.columns()).map(c -> functions.col("`" + c + "`")).toArray(org.apache.spark.sql.Column[]::new));
    assertThat(viaSql.count()).isEqualTo(viaTreat.count()).isEqualTo(20000 - 113);
    Fixtures.assertSameRows(viaSql, viaTreat);
    assertThat(run("explain", "--table", "t", "--plan", plan.toString()).lastErrLine()).contains("goes with --sql");
  }

  @Test
  void driftIsNilOnTheFittedTableAndShowsWhenTheDataMoves(SparkSession spark) {
    Path same = tmp.resolve("treat-same");
    assertThat(run("treat", "--plan", plan.toString(), "--input", "sample-parquet", "--output", same.toString()).code()).isZero();
    JsonNode drift = json(same.resolve("run.json")).get("drift");
    assertThat(drift).isNotEmpty();
    for (JsonNode d : drift) {
      assertThat(d.get("null_rate_now").asDouble()).as(d.toString()).isCloseTo(d.get("null_rate_fit").asDouble(), within(1e-11));
      if (d.hasNonNull("psi")) {
        assertThat(d.get("psi").asDouble()).as(d.toString()).isLessThan(1e-9);
      }
      if (d.hasNonNull("beyond_share_fit")) {
        assertThat(d.get("beyond_share_now").asDouble()).isCloseTo(d.get("beyond_share_fit").asDouble(), within(1e-11));
      }
    }
    assertThat(same.resolve("summary.csv")).exists();
    assertThat(spark.read().parquet(same.resolve("summary").toString()).count()).isEqualTo(drift.size());
    // The same table with dwell times doubled and a third of the energy readings lost.
    Path moved = tmp.resolve("moved");
    spark.read().parquet("sample-parquet")
        .withColumn("dwell_hours", functions.col("dwell_hours").multiply(2))
        .withColumn("energy_kwh", functions.when(functions.hash(functions.col("pallet_id")).mod(3).equalTo(0),
            functions.lit(null)).otherwise(functions.col("energy_kwh")))
        .write().parquet(moved.toString());
    Path out = tmp.resolve("treat-moved");
    // conf/sample.conf limits the drift index of every column to 0.25: dwell_hours passes it.
    Runs.Result r = run("treat", "--plan", plan.toString(), "--input", moved.toString(), "--output", out.toString());
    assertThat(r.code()).as(r.err()).isEqualTo(4);
    assertThat(r.lastErrLine()).contains("dwell_hours: psi");
    java.util.Map<String, JsonNode> byColumn = new java.util.HashMap<>();
    json(out.resolve("run.json")).get("drift").forEach(d -> byColumn.put(d.get("column").asText(), d));
    assertThat(byColumn.get("dwell_hours").get("psi").asDouble()).isGreaterThan(0.25);
    assertThat(byColumn.get("dwell_hours").get("beyond_share_now").asDouble())
        .isGreaterThan(byColumn.get("dwell_hours").get("beyond_share_fit").asDouble());
    assertThat(byColumn.get("energy_kwh").get("null_rate_now").asDouble()).isGreaterThan(0.3);
    assertThat(byColumn.get("air_temp_c").get("psi").asDouble()).isLessThan(1e-9);
  }

  @Test
  void aGroupWisePlanTreatsAsRunDoesAndExplainSaysSo(SparkSession spark) throws Exception {
    Path fitted = tmp.resolve("fit-groups");
    Runs.Result f = run("fit", "--input", "sample-parquet", "--output", fitted.toString(), "--config", "conf/sample.conf",
        "--set", "groups.by=[depot]");
    assertThat(f.code()).as(f.err()).isZero();
    assertThat(f.err()).contains("group-wise limits and fill values by depot");
    Path groupPlan = fitted.resolve("plan.json");
    JsonNode dwell = null;
    for (JsonNode c : json(groupPlan).get("columns")) {
      if (c.get("name").asText().equals("dwell_hours")) {
        dwell = c;
      }
    }
    assertThat(dwell.at("/groups/by/0").asText()).isEqualTo("depot");
    assertThat(dwell.at("/groups/groups")).hasSize(6);
    Path ran = tmp.resolve("run-groups");
    assertThat(run("run", "--input", "sample-parquet", "--output", ran.toString(), "--config", "conf/sample.conf",
        "--set", "groups.by=[depot]").code()).isZero();
    assertThat(Files.readString(ran.resolve("report.html"))).contains("6 of 6 groups have limits and fill values of their own");
    Path treated = tmp.resolve("treat-groups");
    Runs.Result r = run("treat", "--plan", groupPlan.toString(), "--input", "sample-parquet", "--output", treated.toString());
    assertThat(r.code()).as(r.err()).isZero();
    Fixtures.assertSameRows(spark.read().parquet(treated.resolve("treated").toString()),
        spark.read().parquet(ran.resolve("treated").toString()));
    // The group-wise treatment differs from the table-wide one of the plain fit.
    Path plain = tmp.resolve("treat-plain");
    assertThat(run("treat", "--plan", plan.toString(), "--input", "sample-parquet", "--output", plain.toString()).code()).isZero();
    assertThat(spark.read().parquet(treated.resolve("treated").toString())
        .exceptAll(spark.read().parquet(plain.resolve("treated").toString())).count()).isPositive();
    Runs.Result text = run("explain", "--plan", groupPlan.toString());
    assertThat(text.out()).contains("groups by depot: 6 of 6 groups with figures of their own");
  }

  @Test
  void aVersionTwoPlanFromBeforeTheGatesIsStillApplied(SparkSession spark) throws Exception {
    com.fasterxml.jackson.databind.node.ObjectNode tree = (com.fasterxml.jackson.databind.node.ObjectNode) json(plan);
    tree.remove("gates");
    tree.put("formatVersion", 2);
    Path two = tmp.resolve("plan-v2.json");
    Files.writeString(two, tree.toPrettyString());
    Path out = tmp.resolve("treat-v2");
    Runs.Result r = run("treat", "--plan", two.toString(), "--input", "sample-parquet", "--output", out.toString());
    assertThat(r.code()).as(r.err()).isZero();
    JsonNode used = json(out.resolve("plan.json"));
    assertThat(used.get("formatVersion").asInt()).isEqualTo(3);
    assertThat(used.at("/gates/columns")).isEmpty();
  }

  @Test
  void onlyAPlanOfThisFormatIsApplied() throws Exception {
    Path old = tmp.resolve("old-plan.json");
    Files.writeString(old, Files.readString(plan).replaceFirst("\"formatVersion\" : 3", "\"formatVersion\" : 99"));
    Runs.Result r = run("treat", "--plan", old.toString(), "--input", "sample-parquet", "--output", tmp.resolve("o1").toString());
    assertThat(r.code()).isEqualTo(2);
    assertThat(r.lastErrLine()).contains("format version 99; this Sluice applies versions 2 to 3");
    Path notJson = tmp.resolve("notes.txt");
    Files.writeString(notJson, "fences: 1.5 IQR");
    Runs.Result bad = run("treat", "--plan", notJson.toString(), "--input", "sample-parquet", "--output", tmp.resolve("o2").toString());
    assertThat(bad.code()).isEqualTo(2);
    assertThat(bad.lastErrLine()).contains("is not JSON");
    Path foreign = tmp.resolve("foreign.json");
    Files.writeString(foreign, Files.readString(plan).replaceFirst("\"rowsFitted\"", "\"rowsSeen\""));
    Runs.Result odd = run("treat", "--plan", foreign.toString(), "--input", "sample-parquet", "--output", tmp.resolve("o3").toString());
    assertThat(odd.code()).isEqualTo(2);
    assertThat(odd.lastErrLine()).contains("not a plan this Sluice can apply");
    assertThat(run("treat", "--plan", plan.toString(), "--config", "conf/sample.conf", "--input", "sample-parquet",
        "--output", tmp.resolve("o4").toString()).lastErrLine()).contains("takes its treatment from the plan")
        .contains("sluice.columns.air_temp_c.outliers.action");
    assertThat(run("run", "--plan", plan.toString(), "--input", "sample-parquet",
        "--output", tmp.resolve("o5").toString()).code()).isEqualTo(2);
  }
}
