package dev.sluice.cli;

import static org.assertj.core.api.Assertions.assertThat;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import dev.sluice.testing.SharedSpark;
import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.TestInstance;
import org.junit.jupiter.api.extension.ExtendWith;
import org.junit.jupiter.api.io.TempDir;

/**
 * The README's sample command end to end: the planted problems of the demo table are found, and
 * every row read is written. The sample is our own invented scenario (dev.sluice.demo).
 */
@ExtendWith(SharedSpark.class)
@TestInstance(TestInstance.Lifecycle.PER_CLASS)
class SampleRunTest {
  @TempDir static Path tmp;
  Path out;
  int exit;
  String stdout;
  Map<String, JsonNode> summary = new HashMap<>();
  JsonNode plan;
  JsonNode run;

  @BeforeAll
  void runSample(SparkSession spark) throws IOException {
    out = tmp.resolve("sample-out");
    ByteArrayOutputStream o = new ByteArrayOutputStream();
    exit = Main.run(new String[] {"run", "--input", "sample-parquet", "--output", out.toString(),
        "--config", "conf/sample.conf"}, new PrintStream(o, true, StandardCharsets.UTF_8), System.err);
    stdout = o.toString(StandardCharsets.UTF_8);
    ObjectMapper json = new ObjectMapper();
    plan = json.readTree(out.resolve("plan.json").toFile());
    run = json.readTree(out.resolve("run.json").toFile());
    Dataset<Row> s = spark.read().parquet(out.resolve("summary").toString());
    for (String line : s.toJSON().collectAsList()) {
      JsonNode n = json.readTree(line);
      summary.put(n.get("column").asText(), n);
    }
  }

  @Test
  void succeedsAndSaysWhereTheOutputsAre() {
    assertThat(exit).isZero();
    assertThat(stdout).contains(out.toString());
    for (String f : List.of("treated", "summary", "summary.csv", "correlations", "correlations.csv",
        "plan.json", "run.json", "report.html")) {
      assertThat(out.resolve(f)).as(f).exists();
    }
  }

  @Test
  void everyRowReadIsWritten(SparkSession spark) {
    long input = spark.read().parquet("sample-parquet").count();
    long treated = spark.read().parquet(out.resolve("treated").toString()).count();
    assertThat(run.at("/rows/read").asLong()).isEqualTo(input);
    assertThat(run.at("/rows/treated").asLong()).isEqualTo(treated).isEqualTo(input);
    assertThat(run.at("/rows/reconciled").asBoolean()).isTrue();
  }

  @Test
  void partitionsAreKept() {
    assertThat(out.resolve("treated")).isDirectoryContaining(p -> p.getFileName().toString().startsWith("depot="));
  }

  @Test
  void glitchCodesAndImpossibleHumidityAreInvalidNotOutliers() {
    assertThat(summary.get("air_temp_c").get("invalid").asLong()).isPositive();
    assertThat(summary.get("rel_humidity_pct").get("invalid").asLong()).isPositive();
    // Fences come from valid values only, so the glitch codes cannot widen them to +-999.
    assertThat(summary.get("air_temp_c").get("upper_fence").asDouble()).isLessThan(40);
  }

  @Test
  void temperatureExcursionsAreFlaggedNotCapped(SparkSession spark) {
    assertThat(summary.get("air_temp_c").get("outlier_action").asText()).isEqualTo("flag");
    assertThat(summary.get("air_temp_c").get("values_capped").asLong()).isZero();
    Dataset<Row> t = spark.read().parquet(out.resolve("treated").toString());
    assertThat(t.columns()).contains("air_temp_c__outlier");
    assertThat(t.filter("air_temp_c__outlier").count()).isPositive();
  }

  @Test
  void higherIsBetterScoreKeepsItsHighValues() {
    assertThat(summary.get("inspection_score").get("outlier_direction").asText()).isEqualTo("low");
    assertThat(summary.get("inspection_score").path("action_upper").isMissingNode()).as("no upper limit").isTrue();
  }

  @Test
  void weightInTwoUnitsIsFlaggedAsCollinear() {
    JsonNode c = plan.get("collinearity");
    String pairs = c.get("pairs").toString();
    assertThat(pairs).contains("gross_weight_kg").contains("gross_weight_lb");
    assertThat(c.get("suggestedDrops").toString()).containsAnyOf("gross_weight_kg", "gross_weight_lb");
  }

  @Test
  void loadAndEnergyPairIsReported() {
    String pairs = plan.get("collinearity").get("pairs").toString();
    assertThat(pairs).contains("compressor_load_pct").contains("energy_kwh");
  }

  @Test
  void identifierIsNotProfiledAsAMeasurement() {
    assertThat(summary.get("pallet_id").get("role").asText()).isEqualTo("identifier");
    assertThat(summary.get("pallet_id").has("median")).isFalse();
  }

  @Test
  void correlationsCsvHasTheDocumentedHeader() throws IOException {
    String header = Files.readAllLines(out.resolve("correlations.csv")).get(0);
    assertThat(header).startsWith("column_a,column_b,pearson,spearman");
  }
}
