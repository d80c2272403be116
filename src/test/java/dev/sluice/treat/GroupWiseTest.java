package dev.sluice.treat;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;
import static org.assertj.core.api.Assertions.within;

import dev.sluice.Sluice;
import dev.sluice.SluiceException;
import dev.sluice.config.SettingsLoader;
import dev.sluice.plan.ColumnPlan;
import dev.sluice.plan.GroupFigures;
import dev.sluice.plan.Plan;
import dev.sluice.testing.Fixtures;
import dev.sluice.testing.SharedSpark;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import org.apache.commons.math3.stat.descriptive.rank.Percentile;
import org.apache.commons.math3.stat.ranking.NaNStrategy;
import org.apache.commons.math3.util.KthSelector;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.RowFactory;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.functions;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.StructType;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.ExtendWith;

/**
 * Group-wise limits and fill values on a tiny table of our own: two depots on very different
 * scales, each with one planted extreme, and a third too small for its own quartiles. Reference:
 * Apache Commons Math's Percentile with estimation type R_7 (Hyndman and Fan type 7, the exact
 * quantiles the plan states), applied to each group's values.
 */
@ExtendWith(SharedSpark.class)
class GroupWiseTest {
  /** D1: 1..99 and an extreme 400; D2: 1010..1600 by 10 and an extreme 5000; D3: 10 values. */
  private static final Map<String, double[]> VALUES = new HashMap<>();

  static {
    double[] d1 = new double[100];
    for (int i = 0; i < 99; i++) {
      d1[i] = i + 1;
    }
    d1[99] = 400;
    double[] d2 = new double[61];
    for (int i = 0; i < 60; i++) {
      d2[i] = 1010 + 10 * i;
    }
    d2[60] = 5000;
    double[] d3 = {500, 510, 520, 530, 540, 550, 560, 570, 580, 590};
    VALUES.put("D1", d1);
    VALUES.put("D2", d2);
    VALUES.put("D3", d3);
  }

  private static Dataset<Row> table(SparkSession spark, String... extraDepots) {
    List<Row> rows = new ArrayList<>();
    int id = 0;
    for (String depot : List.of("D1", "D2", "D3")) {
      int i = 0;
      for (double v : VALUES.get(depot)) {
        rows.add(RowFactory.create("p" + id++, depot, v, shift(depot, i++)));
      }
      for (int k = 0; k < 3; k++) {
        rows.add(RowFactory.create("p" + id++, depot, null, shift(depot, i++)));
      }
    }
    for (String depot : extraDepots) {
      rows.add(RowFactory.create("p" + id++, depot, 100000.0, "early"));
      rows.add(RowFactory.create("p" + id++, depot, null, null));
    }
    StructType schema = new StructType().add("pallet", DataTypes.StringType).add("depot", DataTypes.StringType)
        .add("dwell hours", DataTypes.DoubleType).add("shift", DataTypes.StringType);
    return spark.createDataFrame(rows, schema);
  }

  /**
   * The shift of a check: every tenth missing; otherwise D1 mostly early, D2 mostly late (two in
   * three), D3 evenly.
   */
  private static String shift(String depot, int i) {
    if (i % 10 == 0) {
      return null;
    }
    boolean usual = i % 3 != 0;
    return switch (depot) {
      case "D1" -> usual ? "early" : "late";
      case "D2" -> usual ? "late" : "early";
      default -> i % 2 == 0 ? "early" : "late";
    };
  }

  private static Plan fit(Dataset<Row> data, String... sets) {
    List<String> all = new ArrayList<>(List.of("groups.by=[depot]", "columns.pallet.role=identifier",
        "columns.depot.role=keep", "collinearity.enabled=false"));
    all.addAll(List.of(sets));
    return Sluice.fit(data, SettingsLoader.load(Optional.empty(), all), List.of()).plan();
  }

  private static double r7(double[] values, double p) {
    return new Percentile().withEstimationType(Percentile.EstimationType.R_7)
        .withNaNStrategy(NaNStrategy.FIXED).withKthSelector(new KthSelector()).evaluate(values, p * 100);
  }

  private static GroupFigures.Group group(ColumnPlan cp, String depot) {
    return cp.groups().groups().stream().filter(g -> g.key().equals(List.of(depot))).findFirst().orElseThrow();
  }

  @Test
  void eachGroupGetsTukeyFencesFromItsOwnQuartilesAndItsOwnMedianFill(SparkSession spark) {
    Dataset<Row> data = table(spark);
    Plan plan = fit(data);
    ColumnPlan dwell = plan.column("dwell hours").orElseThrow();
    assertThat(dwell.groups().by()).containsExactly("depot");
    assertThat(dwell.groups().quantileMethod()).isEqualTo("exact-type7");
    assertThat(group(dwell, "D1").lower()).isEqualTo(-48.5);
    for (String depot : List.of("D1", "D2")) {
      double[] v = VALUES.get(depot);
      double q1 = r7(v, 0.25);
      double q3 = r7(v, 0.75);
      GroupFigures.Group g = group(dwell, depot);
      assertThat(g.fallback()).isNull();
      assertThat(g.usable()).isEqualTo(v.length);
      // Tukey's inner fences, k = 1.5 (the default), on the group's own quartiles.
      assertThat(g.lower()).as(depot).isCloseTo(q1 - 1.5 * (q3 - q1), within(1e-9));
      assertThat(g.upper()).as(depot).isCloseTo(q3 + 1.5 * (q3 - q1), within(1e-9));
      // Capping keeps the median in place: the fill is the group's median.
      assertThat(g.fill()).as(depot).isCloseTo(r7(v, 0.5), within(1e-9));
    }
    GroupFigures.Group small = group(dwell, "D3");
    assertThat(small.fallback()).isEqualTo("10 usable values, fewer than groups.min-values = 50: the table-wide figures apply");
    assertThat(small.lower()).isNull();
    assertThat(small.fill()).isNull();

    Map<String, List<Double>> treated = new HashMap<>();
    for (Row r : Sluice.treat(data, plan).collectAsList()) {
      treated.computeIfAbsent(r.getString(1), k -> new ArrayList<>()).add(r.getDouble(2));
    }
    // D1's 400 lies inside the table-wide fences but far beyond D1's own: capped at D1's upper fence.
    assertThat(treated.get("D1")).contains(group(dwell, "D1").upper()).doesNotContain(400.0);
    assertThat(treated.get("D2")).contains(group(dwell, "D2").upper()).doesNotContain(5000.0);
    assertThat(treated.get("D1").stream().filter(x -> x.equals(group(dwell, "D1").fill())).count()).isGreaterThanOrEqualTo(3);
    // D3 takes the table-wide fill value.
    assertThat(treated.get("D3").stream().filter(x -> x.equals(dwell.missing().fillNumber())).count()).isEqualTo(3);
  }

  @Test
  void madLimitsComeFromEachGroupsOwnMedianAndMad(SparkSession spark) {
    ColumnPlan dwell = fit(table(spark), "defaults.outliers.method=mad").column("dwell hours").orElseThrow();
    for (String depot : List.of("D1", "D2")) {
      double[] v = VALUES.get(depot);
      double median = r7(v, 0.5);
      double mad = r7(Arrays.stream(v).map(x -> Math.abs(x - median)).toArray(), 0.5);
      GroupFigures.Group g = group(dwell, depot);
      // Iglewicz and Hoaglin's modified z-score 0.6745 (x - median) / MAD, limit 3.5 (the default):
      // the limits are median -/+ 3.5 MAD / 0.6745 (the plan keeps 12 significant digits).
      assertThat(g.fallback()).isNull();
      assertThat(g.lower()).as(depot).isCloseTo(median - 3.5 * mad / 0.6745, within(1e-7));
      assertThat(g.upper()).as(depot).isCloseTo(median + 3.5 * mad / 0.6745, within(1e-7));
    }
    assertThat(group(dwell, "D1").upper()).isLessThan(400.0);
    assertThat(group(dwell, "D3").fallback()).startsWith("10 usable values");
  }

  @Test
  void aNumericModeFillIsEachGroupsOwnModeAfterItsOutlierStep(SparkSession spark) {
    // Doors open per hour, our own scenario: E has 5 x 20, 7 x 25, 9 x 15 (mode 7); F has 2 x 30
    // and 3 x 30 (a tie: the lowest, 2, as the table-wide mode); each with four missing.
    List<Row> rows = new ArrayList<>();
    int[][] e = {{5, 20}, {7, 25}, {9, 15}};
    int[][] f = {{2, 30}, {3, 30}};
    for (Object[] depot : new Object[][] {{"E", e}, {"F", f}}) {
      for (int[] vc : (int[][]) depot[1]) {
        for (int i = 0; i < vc[1]; i++) {
          rows.add(RowFactory.create(depot[0], (double) vc[0]));
        }
      }
      for (int i = 0; i < 4; i++) {
        rows.add(RowFactory.create(depot[0], null));
      }
    }
    StructType schema = new StructType().add("depot", DataTypes.StringType).add("doors", DataTypes.DoubleType);
    Plan plan = Sluice.fit(spark.createDataFrame(rows, schema), SettingsLoader.load(Optional.empty(),
        List.of("groups.by=[depot]", "columns.depot.role=keep", "collinearity.enabled=false",
            "defaults.missing.strategy=mode", "defaults.outliers.method=none")), List.of()).plan();
    ColumnPlan doors = plan.column("doors").orElseThrow();
    assertThat(group(doors, "E").fill()).isEqualTo(7.0);
    assertThat(group(doors, "F").fill()).isEqualTo(2.0);
    // Table-wide: 2 x 30, 3 x 30, 5 x 20, 7 x 25, 9 x 15: a tie of 2 and 3, the lowest.
    assertThat(doors.missing().fillNumber()).isEqualTo(2.0);
  }

  @Test
  void aCategoricalColumnIsFilledWithItsGroupsOwnMode(SparkSession spark) {
    Dataset<Row> data = table(spark);
    Plan plan = fit(data);
    ColumnPlan shift = plan.column("shift").orElseThrow();
    // Counted by hand from the fixture: table-wide, early is the more frequent shift.
    assertThat(shift.missing().fillText()).isEqualTo("early");
    assertThat(group(shift, "D1").fillText()).isEqualTo("early");
    assertThat(group(shift, "D2").fillText()).isEqualTo("late");
    assertThat(group(shift, "D3").fallback()).startsWith("11 values, fewer than groups.min-values = 50");
    Map<String, List<String>> filled = new HashMap<>();
    Dataset<Row> treated = Sluice.treat(data, plan);
    Dataset<Row> wasNull = data.filter(functions.col("shift").isNull()).select("pallet");
    for (Row r : treated.join(wasNull, "pallet").collectAsList()) {
      filled.computeIfAbsent(r.<String>getAs("depot"), k -> new ArrayList<>()).add(r.getAs("shift"));
    }
    assertThat(filled.get("D1")).containsOnly("early");
    assertThat(filled.get("D2")).containsOnly("late");
    assertThat(filled.get("D3")).containsOnly("early");
    data.createOrReplaceTempView("checks_shift");
    Fixtures.assertSameRows(spark.sql(PlanSql.select(spark, plan, "checks_shift")), treated);
  }

  @Test
  void aMeanFillAfterCappingIsMeasuredOnTheCappedValues(SparkSession spark) {
    Plan plan = fit(table(spark), "defaults.missing.strategy=mean");
    ColumnPlan dwell = plan.column("dwell hours").orElseThrow();
    for (String depot : List.of("D1", "D2")) {
      GroupFigures.Group g = group(dwell, depot);
      // By hand: each value capped at the group's fences, then the plain mean.
      double expected = Arrays.stream(VALUES.get(depot)).map(x -> Math.max(g.lower(), Math.min(g.upper(), x)))
          .average().orElseThrow();
      // The plan publishes 12 significant digits.
      assertThat(g.fill()).as(depot).isCloseTo(expected, within(1e-8));
    }
  }

  @Test
  void theSqlOfExplainAndASavedPlanTreatGroupsAlike(SparkSession spark) {
    Dataset<Row> data = table(spark);
    Plan plan = fit(data);
    // A depot the fit never saw takes the table-wide limits and fill.
    Dataset<Row> later = table(spark, "D9");
    Dataset<Row> treated = Sluice.treat(later, plan);
    ColumnPlan dwell = plan.column("dwell hours").orElseThrow();
    List<Double> d9 = treated.filter(functions.col("depot").equalTo("D9")).select("`dwell hours`").as(
        org.apache.spark.sql.Encoders.DOUBLE()).collectAsList();
    assertThat(d9).containsExactlyInAnyOrder(dwell.outliers().upper(), dwell.missing().fillNumber());
    DriftPass.NewGroups fresh = DriftPass.measure(later, plan).newGroups().orElseThrow();
    assertThat(fresh.rows()).isEqualTo(2);
    assertThat(fresh.groups()).isEqualTo(1);
    assertThat(DriftPass.measure(data, plan).newGroups().orElseThrow().rows()).isZero();
    assertThatThrownBy(() -> dev.sluice.io.PlanFile.check(plan, later.drop("depot").schema(), "plan.json", false))
        .isInstanceOf(SluiceException.class).hasMessage("The table lacks depot, which the plan plan.json groups by");
    later.createOrReplaceTempView("later_checks");
    Dataset<Row> viaSql = spark.sql(PlanSql.select(spark, plan, "later_checks"));
    Fixtures.assertSameRows(viaSql, treated);
  }

  @Test
  void quarantineByGroupLimitsHoldsBackTheRowsBeyondTheirOwnGroupsFences(SparkSession spark) {
    Dataset<Row> data = table(spark);
    Plan plan = fit(data, "defaults.outliers.action=quarantine");
    // By hand from the type 7 quartiles: D1 (Q1 25.75, Q3 75.25) fences [-48.5, 149.5] hold back
    // 400; D2 (1160, 1460) [710, 1910] hold back 5000; D3 takes the table-wide fences, which its
    // values 500..590 lie within.
    List<Row> held = Sluice.quarantine(data, plan).collectAsList();
    assertThat(held).extracting(r -> r.<String>getAs("quarantine_value")).containsExactlyInAnyOrder("400.0", "5000.0");
    assertThat(held).extracting(r -> r.<String>getAs("quarantine_rule")).containsOnly("upper-limit");
    assertThat(Sluice.treat(data, plan).count()).isEqualTo(data.count() - 2);
    data.createOrReplaceTempView("checks_quarantine");
    Fixtures.assertSameRows(spark.sql(PlanSql.select(spark, plan, "checks_quarantine")), Sluice.treat(data, plan));
  }

  @Test
  void theExactSearchWidensABracketThatMissesAndStillFindsTheType7Quantiles(SparkSession spark) {
    // Brackets of zero width around the sketch's guesses miss whenever type 7 interpolates between
    // two values: the search widens them and must still land on the exact quantiles.
    double[] ps = {0.1, 0.25, 0.5, 0.75, 0.9};
    for (double margin : new double[] {0, GroupPass.MARGIN}) {
      Map<List<String>, GroupPass.Stats[]> found = GroupPass.search(table(spark), List.of("depot"),
          List.of(functions.col("`dwell hours`")), ps, 10, margin, GroupPass.K);
      assertThat(found.keySet()).containsExactly(List.of("D1"), List.of("D2"), List.of("D3"));
      for (String depot : List.of("D1", "D2", "D3")) {
        GroupPass.Stats s = found.get(List.of(depot))[0];
        double[] v = VALUES.get(depot);
        assertThat(s.usable()).isEqualTo(v.length);
        assertThat(s.mean()).isCloseTo(Arrays.stream(v).average().orElseThrow(), within(1e-9));
        for (int k = 0; k < ps.length; k++) {
          assertThat(s.quantiles()[k]).as("%s p %s margin %s", depot, ps[k], margin).isCloseTo(r7(v, ps[k]), within(1e-9));
        }
      }
    }
  }

  @Test
  void theSketchGrowsWithTheTableSoThatTheWindowsStayWithinTheHeldValues() {
    // Normalized rank errors of the KLL sketch as Apache DataSketches states them (KllSketch).
    assertThat(GroupPass.sketchSize(10_000_000, 30, 8_000_000)).isEqualTo(4096);
    assertThat(GroupPass.sketchSize(100_000_000, 30, 8_000_000)).isEqualTo(16384);
    assertThat(GroupPass.sketchSize(10_000_000_000L, 30, 8_000_000)).isEqualTo(GroupPass.MAX_K);
  }

  @Test
  void tooManyGroupsAndScaledGroupWiseColumnsAreRefused(SparkSession spark) {
    Dataset<Row> data = table(spark);
    assertThatThrownBy(() -> fit(data, "groups.max-groups=2"))
        .isInstanceOf(SluiceException.class)
        .hasMessage("The table has more than 2 groups of depot (groups.max-groups); group by fewer or coarser"
            + " columns, or raise the limit");
    assertThatThrownBy(() -> fit(data, "defaults.scaling=standard"))
        .isInstanceOf(SluiceException.class)
        .hasMessageContaining("with sluice.groups.by set, dwell hours would get group-wise limits or fill values");
    assertThatThrownBy(() -> fit(data.withColumn(Treatments.GROUP_INDEX, functions.lit(1))))
        .isInstanceOf(SluiceException.class).hasMessageContaining("already has column(s) _sluice_group_index");
    assertThatThrownBy(() -> fit(data, "groups.by=[site]"))
        .isInstanceOf(SluiceException.class)
        .hasMessageStartingWith("sluice.groups.by names site, which the table lacks");
  }
}
