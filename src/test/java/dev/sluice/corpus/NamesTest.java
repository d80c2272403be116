package dev.sluice.corpus;

import static dev.sluice.corpus.Corpus.assertReconciled;
import static dev.sluice.corpus.Corpus.assertRefused;
import static dev.sluice.corpus.Corpus.palletChecks;
import static dev.sluice.corpus.Corpus.planOf;
import static dev.sluice.corpus.Corpus.run;
import static dev.sluice.corpus.Corpus.summaryRow;
import static dev.sluice.corpus.Corpus.treated;
import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

import com.fasterxml.jackson.databind.JsonNode;
import dev.sluice.testing.SharedSpark;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Set;
import java.util.stream.Collectors;
import java.util.stream.Stream;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.functions;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.TestInstance;
import org.junit.jupiter.api.extension.ExtendWith;
import org.junit.jupiter.api.io.TempDir;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.Arguments;
import org.junit.jupiter.params.provider.MethodSource;

/**
 * Column names that break naive code: dots, spaces, quotes of every kind, non-Latin letters,
 * leading digits, markup, SQL, punctuation that CSV or HOCON treat specially, and names that
 * differ only in case. Each awkward column is treated like any other and addressed in config by
 * a quoted HOCON key on the command line.
 *
 * <p>One table holds every awkward name (one run, read by one case per name). Column k (from 0)
 * has base b = 100 (k + 1) and values b + 0 ... b + 17 for check_no 0 to 17, b + 60 for check_no
 * 18 and b + 1000 for check_no 19; each gets {@code valid-max = b + 100} through its own key.
 * Worked by hand, type 7 quantiles on the 19 valid values: Q1 = b + 4.5, Q3 = b + 13.5, IQR 9,
 * upper fence b + 27, so check_no 18 is capped to b + 27; check_no 19 is invalid, hence missing,
 * and filled with the median after capping, b + 9. A key that missed its column would leave
 * b + 1000 among the quartiles and give other numbers.
 */
@ExtendWith(SharedSpark.class)
@TestInstance(TestInstance.Lifecycle.PER_CLASS)
class NamesTest {
  @TempDir Path tmp;
  @TempDir static Path shared;

  private static final int ROWS = 20;

  /** An awkward name and the --set key that addresses it, written as a user would. */
  private record Awkward(String name, String key) {}

  private static final List<Awkward> NAMES = List.of(
      new Awkward("a.b", "columns.\"a.b\""),
      new Awkward("gross weight", "columns.\"gross weight\""),
      new Awkward("back`tick", "columns.\"back`tick\""),
      new Awkward("it's", "columns.\"it's\""),
      new Awkward("say \"hi\"", "columns.\"say \\\"hi\\\"\""),
      new Awkward("température_°C", "columns.température_°C"),
      new Awkward("温度", "columns.温度"),
      new Awkward("1st_reading", "columns.1st_reading"),
      new Awkward("<b>x</b>", "columns.\"<b>x</b>\""),
      new Awkward("x; DROP TABLE t", "columns.\"x; DROP TABLE t\""),
      new Awkward("a--b", "columns.\"a--b\""),
      new Awkward(" padded ", "columns.\" padded \""),
      new Awkward("eq=sign", "columns.\"eq=sign\""),
      new Awkward("comma,name", "columns.\"comma,name\""),
      new Awkward("brace{}", "columns.\"brace{}\""),
      new Awkward("new\nline", "columns.\"new\\nline\""));

  /** The awkward run read back once: its outputs and the names in summary.csv. */
  private record AwkwardRun(Corpus.Finished run, Set<String> csvNames) {}

  private AwkwardRun awkward;

  /** Written and run on first use, so that a failure shows in the cases rather than in a setup. */
  private AwkwardRun awkwardRun(SparkSession spark) {
    if (awkward == null) {
      Dataset<Row> table = spark.sql("SELECT id AS check_no FROM range(" + ROWS + ")");
      List<String> args = new ArrayList<>(List.of("--set", "columns.check_no.role=identifier"));
      for (int k = 0; k < NAMES.size(); k++) {
        int base = 100 * (k + 1);
        table = table.withColumn(NAMES.get(k).name(), functions.expr(
            "CAST(CASE WHEN check_no = 18 THEN " + (base + 60) + " WHEN check_no = 19 THEN " + (base + 1000)
                + " ELSE " + base + " + check_no END AS DOUBLE)"));
        args.add("--set");
        args.add(NAMES.get(k).key() + ".valid-max=" + (base + 100));
      }
      Path in = Corpus.parquet(table, shared.resolve("awkward"));
      Path out = shared.resolve("awkward-out");
      Corpus.Result r = run("run", in, out, args.toArray(new String[0]));
      Corpus.Finished finished = Corpus.finish(spark, r, out, "check_no");
      awkward = new AwkwardRun(finished, r.code() == 0 ? summaryCsvColumns(spark, out) : Set.of());
    }
    return awkward;
  }

  static Stream<Arguments> names() {
    List<Arguments> cases = new ArrayList<>();
    for (int k = 0; k < NAMES.size(); k++) {
      // Shown with visible escapes so that the report lists " padded " and "new\nline" readably.
      String shown = "[" + NAMES.get(k).name().replace("\n", "\\n") + "]";
      cases.add(Arguments.of(shown, k));
    }
    return cases.stream();
  }

  @ParameterizedTest(name = "{0}")
  @MethodSource("names")
  void awkwardNameIsTreatedAndReachedByItsQuotedKey(String shown, int k, SparkSession spark) {
    AwkwardRun a = awkwardRun(spark);
    a.run().assertReconciled(ROWS);
    String name = NAMES.get(k).name();
    double base = 100.0 * (k + 1);
    assertThat(a.run().treatedSchema().fieldNames()).as("exact name in treated/").containsOnlyOnce(name);
    for (Row r : a.run().treatedRows()) {
      long id = r.<Long>getAs("check_no");
      double expected = id == 18 ? base + 27 : id == 19 ? base + 9 : base + id;
      assertThat(r.<Double>getAs(name)).as("%s at check_no %d", shown, id).isEqualTo(expected);
    }
    Row s = a.run().summaryRow(name);
    assertThat(s.<Double>getAs("valid_max")).as("the quoted key reached the column").isEqualTo(base + 100);
    assertThat(s.<Long>getAs("invalid")).isEqualTo(1);
    assertThat(s.<Long>getAs("values_capped")).isEqualTo(1);
    assertThat(s.<Double>getAs("action_upper")).isEqualTo(base + 27);
    JsonNode plan = planOf(a.run().out(), name);
    assertThat(plan.get("validMax").asDouble()).isEqualTo(base + 100);
    assertThat(a.csvNames()).as("summary.csv keeps the exact name").contains(name);
  }

  private static Set<String> summaryCsvColumns(SparkSession spark, Path out) {
    // RFC 4180 as Outputs.csv writes it: quotes doubled, fields with line breaks quoted.
    return spark.read().option("header", "true").option("multiLine", "true").option("escape", "\"")
        .csv(out.resolve("summary.csv").toString()).select("column").collectAsList().stream()
        .map(r -> r.getString(0)).collect(Collectors.toSet());
  }

  @Test
  void awkwardNamesKeepTheirOrderAndNothingIsQuarantined(SparkSession spark) {
    AwkwardRun a = awkwardRun(spark);
    a.run().assertReconciled(ROWS);
    List<String> expected = new ArrayList<>(List.of("check_no"));
    NAMES.forEach(n -> expected.add(n.name()));
    assertThat(a.run().treatedSchema().fieldNames()).containsExactlyElementsOf(expected);
    assertThat(a.run().heldCount()).as("set-missing quarantines nothing").isZero();
  }

  @Test
  void namesDifferingOnlyInCaseAreTwoColumnsEachWithItsOwnSettings(SparkSession spark) throws Exception {
    // The job resolves names case-sensitively: Probe_C and probe_c are separate columns, and a
    // key for one must not reach the other.
    SparkSession exact = spark.newSession();
    exact.conf().set("spark.sql.caseSensitive", "true");
    Path table = Corpus.parquet(exact.sql(
        "SELECT id AS check_no, CAST(id AS DOUBLE) AS Probe_C, CAST(10 * id AS DOUBLE) AS probe_c"
            + " FROM range(12)"), tmp.resolve("pair"));
    Path conf = Corpus.text(tmp.resolve("pair.conf"),
        "sluice.columns {\n  check_no { role = identifier }\n  Probe_C { valid-max = 5 }\n"
            + "  probe_c { scaling = min-max }\n}\n");
    Path o = tmp.resolve("pair-out");
    Corpus.Result r = run("run", table, o, "--config", conf.toString());
    assertReconciled(exact, r, o, 12);
    List<Row> rows = treated(exact, o).orderBy("check_no").collectAsList();
    for (Row row : rows) {
      long id = row.<Long>getAs("check_no");
      // Probe_C: 6 to 11 are above valid-max, so missing, filled with the median of 0..5 = 2.5.
      assertThat(row.<Double>getAs("Probe_C")).as("Probe_C at %d", id).isEqualTo(id <= 5 ? id : 2.5);
      // probe_c: 0 to 110 scaled by min-max to id / 11; its values are all valid.
      assertThat(row.<Double>getAs("probe_c")).as("probe_c at %d", id)
          .isCloseTo(id / 11.0, within(1e-12));
    }
    assertThat(summaryRow(exact, o, "Probe_C").<Double>getAs("valid_max")).isEqualTo(5.0);
    assertThat(summaryRow(exact, o, "probe_c").<Double>getAs("valid_max")).isNull();
    assertThat(summaryRow(exact, o, "Probe_C").<String>getAs("scaling")).isEqualTo("none");
    assertThat(summaryRow(exact, o, "probe_c").<String>getAs("scaling")).isEqualTo("min-max");
  }

  @Test
  void configNameInAnotherCaseThanTheTableIsRefusedAndTheTableColumnsListed(SparkSession spark) {
    Path table = palletChecks(spark, tmp.resolve("checks"), 10);
    Path o = tmp.resolve("out");
    Corpus.Result r = run("run", table, o, "--set", "columns.Air_Temp_C.valid-max=9");
    assertRefused(r, 2, "Column Air_Temp_C in config (sluice.columns) is not in the table; its"
        + " columns are: pallet_id, depot, air_temp_c, door_openings", o);
  }

  @Test
  void configNameWithALineBreakIsShownEscapedOnOneLine(SparkSession spark) {
    Path table = palletChecks(spark, tmp.resolve("checks"), 10);
    Path o = tmp.resolve("out");
    Corpus.Result r = run("run", table, o, "--set", "columns.\"air\\ntemp\".valid-max=9");
    assertRefused(r, 2, "Column \"air\\ntemp\" in config (sluice.columns) is not in the table; its"
        + " columns are: pallet_id, depot, air_temp_c, door_openings", o);
    assertThat(r.errLines()).as(r.shown()).hasSize(1);
  }

  @Test
  void tableColumnNamedLikeAMissingIndicatorIsRefused(SparkSession spark) {
    Path table = Corpus.parquet(spark.sql("SELECT CASE WHEN id = 2 THEN NULL ELSE CAST(id AS DOUBLE) END"
        + " AS dwell_hours, id % 2 = 0 AS dwell_hours__missing FROM range(10)"), tmp.resolve("clash"));
    Path o = tmp.resolve("out");
    Corpus.Result r = run("run", table, o, "--set", "defaults.missing.indicator=true");
    assertRefused(r, 2, "The table already has column(s) dwell_hours__missing that the treatment would"
        + " add; rename them or turn off the flag that adds them", o);
  }

  @Test
  void tableColumnNamedLikeAQuarantineColumnIsRefused(SparkSession spark) {
    Path table = Corpus.parquet(spark.sql("SELECT CAST(id AS DOUBLE) AS air_temp_c, 'manual' AS quarantine_rule"
        + " FROM range(10)"), tmp.resolve("clash"));
    Path o = tmp.resolve("out");
    Corpus.Result r = run("run", table, o);
    assertRefused(r, 2, "The table already has column(s) quarantine_rule that the treatment would add;"
        + " rename them or turn off the flag that adds them", o);
  }
}
