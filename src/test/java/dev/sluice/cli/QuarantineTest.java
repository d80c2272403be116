package dev.sluice.cli;

import static dev.sluice.cli.Runs.json;
import static dev.sluice.cli.Runs.run;
import static org.assertj.core.api.Assertions.assertThat;

import dev.sluice.testing.SharedSpark;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.ExtendWith;
import org.junit.jupiter.api.io.TempDir;

/** Every row read ends in treated/ or quarantine/, with its original values and its reasons. */
@ExtendWith(SharedSpark.class)
class QuarantineTest {
  @TempDir Path tmp;

  private Dataset<Row> read(SparkSession spark, Path dir) {
    return spark.read().parquet(dir.toString());
  }

  private void assertReconciles(SparkSession spark, Path out, long input) {
    long treated = read(spark, out.resolve("treated")).count();
    long held = Files.exists(out.resolve("quarantine")) ? read(spark, out.resolve("quarantine")).count() : 0;
    assertThat(treated + held).as("rows in = treated + quarantined").isEqualTo(input);
    assertThat(json(out.resolve("run.json")).at("/rows/read").asLong()).isEqualTo(input);
    assertThat(json(out.resolve("run.json")).at("/rows/reconciled").asBoolean()).isTrue();
  }

  @Test
  void malformedCsvLinesAreQuarantinedWithTheirRawText(SparkSession spark) throws Exception {
    Path csv = tmp.resolve("checks.csv");
    Files.writeString(csv, "pallet_id,air_temp_c,door_openings\n"
        + "PL-1,3.5,4\nPL-2,oops,7\nPL-3,4.1\nPL-4,3.9,2,extra\nPL-5,3.7,5\nPL-6,3.6,6\n");
    Path out = tmp.resolve("out");
    Runs.Result r = run("run", "--input", csv.toString(), "--output", out.toString(),
        "--set", "input.csv.schema=\"pallet_id STRING, air_temp_c DOUBLE, door_openings INT\"");
    assertThat(r.code()).as(r.err()).isZero();
    List<Row> q = read(spark, out.resolve("quarantine")).orderBy("pallet_id").collectAsList();
    assertThat(q).extracting(x -> x.getAs("quarantine_stage")).containsOnly("read");
    assertThat(q).extracting(x -> x.getAs("quarantine_rule")).containsOnly("malformed-row");
    assertThat(q).extracting(x -> x.getAs("quarantine_value"))
        .containsExactly("PL-2,oops,7", "PL-3,4.1", "PL-4,3.9,2,extra");
    assertReconciles(spark, out, 6);
  }

  @Test
  void invalidValuesCanSendTheRowToQuarantine(SparkSession spark) {
    Path in = tmp.resolve("humidity");
    spark.sql("SELECT id, CASE WHEN id IN (3, 8) THEN 130.0D ELSE 80.0D + id % 5 END AS rel_humidity_pct FROM range(20)")
        .write().parquet(in.toString());
    Path out = tmp.resolve("out");
    Runs.Result r = run("run", "--input", in.toString(), "--output", out.toString(),
        "--set", "columns.rel_humidity_pct.valid-max=100",
        "--set", "columns.rel_humidity_pct.invalid-action=quarantine");
    assertThat(r.code()).as(r.err()).isZero();
    List<Row> q = read(spark, out.resolve("quarantine")).orderBy("id").collectAsList();
    assertThat(q).extracting(x -> x.getAs("id")).containsExactly(3L, 8L);
    assertThat(q).extracting(x -> x.getAs("rel_humidity_pct")).as("original values").containsOnly(130.0);
    assertThat(q).extracting(x -> x.getAs("quarantine_stage")).containsOnly("validity");
    assertThat(q).extracting(x -> x.getAs("quarantine_rule")).containsOnly("valid-max");
    assertThat(q).extracting(x -> x.getAs("quarantine_value")).containsOnly("130.0");
    assertReconciles(spark, out, 20);
  }

  @Test
  void outliersCanSendTheRowToQuarantineAndRequiredGapsToo(SparkSession spark) {
    Path in = tmp.resolve("dwell");
    spark.sql("SELECT id, CASE WHEN id = 5 THEN 900.0D ELSE 20.0D + id % 10 END AS dwell_hours,"
            + " CASE WHEN id = 7 THEN NULL ELSE 'dairy' END AS product_class FROM range(40)")
        .write().parquet(in.toString());
    Path out = tmp.resolve("out");
    Runs.Result r = run("run", "--input", in.toString(), "--output", out.toString(),
        "--set", "columns.dwell_hours.outliers.action=quarantine",
        "--set", "columns.product_class.role=required");
    assertThat(r.code()).as(r.err()).isZero();
    List<Row> q = read(spark, out.resolve("quarantine")).orderBy("id").collectAsList();
    assertThat(q).extracting(x -> x.getAs("id")).containsExactly(5L, 7L);
    assertThat(q).extracting(x -> x.getAs("quarantine_stage")).containsExactly("outliers", "required");
    assertThat(q).extracting(x -> x.getAs("quarantine_column")).containsExactly("dwell_hours", "product_class");
    assertThat(q.get(0).<Double>getAs("dwell_hours")).isEqualTo(900.0);
    assertReconciles(spark, out, 40);
  }

  @Test
  void csvWhoseFirstLineIsDataIsRefusedUnlessHeaderIsOff(SparkSession spark) throws Exception {
    Path csv = tmp.resolve("noheader.csv");
    Files.writeString(csv, "1.5,2\n2.5,3\n3.5,4\n");
    Runs.Result r = run("survey", "--input", csv.toString(), "--output", tmp.resolve("o").toString());
    assertThat(r.code()).isEqualTo(3);
    assertThat(r.lastErrLine()).isEqualTo("sluice: CSV file " + csv + " seems to have no header row (its"
        + " first line is all numbers); set input.csv.header = false to read it without one");
    Path out = tmp.resolve("o2");
    assertThat(run("run", "--input", csv.toString(), "--output", out.toString(),
        "--set", "input.csv.header=false").code()).isZero();
    assertThat(read(spark, out.resolve("treated")).columns()).containsExactly("_c0", "_c1");
    assertReconciles(spark, out, 3);
  }
}
