package dev.sluice.treat;

import static dev.sluice.testing.Fixtures.settings;
import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

import dev.sluice.Sluice;
import dev.sluice.config.Role;
import dev.sluice.config.Settings;
import dev.sluice.plan.CollinearityFindings;
import dev.sluice.plan.OutlierPlan;
import dev.sluice.plan.Plan;
import dev.sluice.plan.Planner;
import dev.sluice.plan.TreatedStats;
import dev.sluice.profile.Profiler;
import dev.sluice.profile.TableProfile;
import dev.sluice.stats.NumericSteps;
import dev.sluice.testing.SharedSpark;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.Random;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.RowFactory;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.StructField;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.ExtendWith;
import org.junit.jupiter.api.io.TempDir;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

/**
 * Pass 1 gathers what pass 2 would, so that a run on a large table can skip pass 2: the figures it
 * finishes must be the ones pass 2 computes on the same table, counts and quartiles to the bit,
 * moments and correlations to rounding. The reference here is the project's own pass 2
 * ({@link TreatedStatsPass#run}), itself checked against Commons Math and NIST StRD elsewhere;
 * these tests check that the two routes agree on every action, direction and validity setting.
 */
@ExtendWith(SharedSpark.class)
class PassOneFinishTest {
  /** Tables larger than the held-value budget take the searched path, with a pilot. */
  private static final String[] LARGE = {"quantiles.max-held-values=240000", "quantiles.pilot-rows=30000"};

  private static final List<String> NAMES = List.of("inlet_bar", "outlet.bar", "dwell min");

  /**
   * Invented scenario: pressures at a pump's inlet and outlet (the outlet follows the inlet) and a
   * skewed dwell time, with gaps, a few far readings and the odd impossible negative dwell.
   */
  static Dataset<Row> readings(SparkSession spark, int n, long seed) {
    Random random = new Random(seed);
    List<Row> rows = new ArrayList<>();
    for (int i = 0; i < n; i++) {
      double inlet = 2.0 + 0.3 * random.nextGaussian();
      double outlet = 1.8 * inlet + 0.2 * random.nextGaussian();
      double dwell = Math.exp(1.0 + 0.6 * random.nextGaussian());
      if (i % 211 == 0) {
        inlet += 5.0;
      }
      if (i % 307 == 0) {
        outlet -= 4.0;
      }
      if (i % 401 == 0) {
        dwell = -dwell;
      }
      rows.add(RowFactory.create(i % 29 == 0 ? null : inlet, i % 31 == 0 ? null : outlet,
          i % 37 == 0 ? null : i % 1009 == 0 ? Double.NaN : dwell));
    }
    List<StructField> fields = new ArrayList<>();
    NAMES.forEach(name -> fields.add(DataTypes.createStructField(name, DataTypes.DoubleType, true)));
    return spark.createDataFrame(rows, DataTypes.createStructType(fields)).repartition(3);
  }

  @ParameterizedTest
  @CsvSource({
    "cap, both, median",
    "cap, high, mean",
    "cap, low, median",
    "set-missing, both, median",
    "set-missing, high, mean",
    "quarantine, both, median",
    "flag, both, median",
  })
  void passOneGivesWhatPassTwoGives(String action, String direction, String fill, SparkSession spark) {
    Settings s = settings(LARGE[0], LARGE[1], "defaults.outliers.action=" + action,
        "defaults.outliers.direction=" + direction, "defaults.missing.strategy=" + fill,
        "columns.\"dwell min\".valid-min=0", "defaults.scaling=robust");
    compare(readings(spark, 60_000, 11), s);
  }

  @Test
  void columnarScansAgreeToo(SparkSession spark, @TempDir Path dir) {
    readings(spark, 60_000, 12).write().parquet(dir.resolve("t").toString());
    compare(spark.read().parquet(dir.resolve("t").toString()), settings(LARGE[0], LARGE[1]));
  }

  @Test
  void theSinglePassGivesTheSamePlanForAnyPartitioning(SparkSession spark) {
    // The pilot, and so the bands and the rows kept aside, differ with the partitioning; the plan
    // must not (counts and quartiles are exact, other figures published at 12 digits).
    Dataset<Row> data = readings(spark, 60_000, 16);
    List<Plan> plans = new ArrayList<>();
    for (int parts : new int[] {1, 5}) {
      List<String> lines = new ArrayList<>();
      plans.add(Sluice.fit(data.repartition(parts), settings(LARGE[0], LARGE[1]), List.of(),
          lines::add).plan());
      assertThat(lines).contains(
          "pass 2 of 3 not needed: pass 1 also gave the statistics of the treated values");
    }
    assertThat(plans.get(1)).isEqualTo(plans.get(0));
  }

  @Test
  void outlierMethodsThatNeedTheMeanOrMadStillRunPassTwo(SparkSession spark) {
    List<String> lines = new ArrayList<>();
    Sluice.fit(readings(spark, 20_000, 13),
        settings(LARGE[0], LARGE[1], "defaults.outliers.method=zscore"), List.of(), lines::add);
    assertThat(lines).anyMatch(l -> l.startsWith("pass 2 of 3: statistics of the treated values"));
  }

  @Test
  void aLargeTableWithDefaultsSkipsPassTwo(SparkSession spark) {
    List<String> lines = new ArrayList<>();
    int persisted = spark.sparkContext().getPersistentRDDs().size();
    Sluice.fit(readings(spark, 60_000, 14), settings(LARGE[0], LARGE[1]), List.of(), lines::add);
    assertThat(lines).contains(
        "pass 2 of 3 not needed: pass 1 also gave the statistics of the treated values");
    // The rows pass 1 kept aside in the block store are freed once the plan is fitted.
    assertThat(spark.sparkContext().getPersistentRDDs().size()).isEqualTo(persisted);
  }

  @Test
  void wideTablesWhereMostRowsHaveAValueNearAFenceRunPassTwo(SparkSession spark) {
    // Invented: 40 sensors of one rig, independent readings.
    Random random = new Random(15);
    List<String> names = new ArrayList<>();
    for (int c = 0; c < 40; c++) {
      names.add("sensor_" + c);
    }
    double[][] rows = new double[60_000][40];
    for (double[] row : rows) {
      for (int c = 0; c < 40; c++) {
        row[c] = 20.0 + random.nextGaussian();
      }
    }
    Dataset<Row> data = dev.sluice.testing.Fixtures.doubleTable(spark, names, rows);
    Map<String, Role> roles = new LinkedHashMap<>();
    names.forEach(n -> roles.put(n, Role.TREAT));
    assertThat(Profiler.profile(data, settings(LARGE[0], LARGE[1]), roles).share()).isNull();
    List<String> lines = new ArrayList<>();
    Sluice.fit(data, settings(LARGE[0], LARGE[1]), List.of(), lines::add);
    assertThat(lines).anyMatch(l -> l.startsWith("pass 2 of 3: statistics of the treated values"));
  }

  @Test
  void thePlanMustAgreeWithWhatPassOneAssumed() {
    double[] band = {-3.0, -2.0, 2.0, 3.0};
    OutlierPlan capAt = new OutlierPlan("iqr", "both", "cap", -2.5, 2.5, -2.5, 2.5, -5.0, 5.0, "");
    assertThat(PassOneFinish.agrees(NumericSteps.Action.CAP, band, capAt)).isTrue();
    assertThat(PassOneFinish.agrees(NumericSteps.Action.REMOVE, band, capAt)).isFalse();
    OutlierPlan outside = new OutlierPlan("iqr", "both", "cap", -3.5, 2.5, -3.5, 2.5, -5.0, 5.0, "");
    assertThat(PassOneFinish.agrees(NumericSteps.Action.CAP, band, outside)).isFalse();
    OutlierPlan highOnly = new OutlierPlan("iqr", "high", "cap", null, 2.5, -2.5, 2.5, -5.0, 5.0, "");
    assertThat(PassOneFinish.agrees(NumericSteps.Action.CAP, band, highOnly)).isFalse();
    double[] highBand = {Double.NEGATIVE_INFINITY, Double.NEGATIVE_INFINITY, 2.0, 3.0};
    assertThat(PassOneFinish.agrees(NumericSteps.Action.CAP, highBand, highOnly)).isTrue();
    OutlierPlan none = OutlierPlan.none("dropped");
    assertThat(PassOneFinish.agrees(NumericSteps.Action.LEAVE, band, none)).isTrue();
    assertThat(PassOneFinish.agrees(NumericSteps.Action.CAP, band, none)).isFalse();
    OutlierPlan flag = new OutlierPlan("iqr", "both", "flag", -2.5, 2.5, -2.5, 2.5, -5.0, 5.0, "");
    assertThat(PassOneFinish.agrees(NumericSteps.Action.LEAVE, band, flag)).isTrue();
  }

  /** Both routes on the same profile and outlier limits; fails unless pass 1 could finish. */
  private static void compare(Dataset<Row> data, Settings s) {
    Map<String, Role> roles = new LinkedHashMap<>();
    for (String name : data.columns()) {
      roles.put(name, Role.TREAT);
    }
    TableProfile profile = Profiler.profile(data, s, roles);
    Map<String, OutlierPlan> outliers = Planner.outliers(profile, s);
    assertThat(profile.share()).as("pass 1 attempted the share").isNotNull();
    Optional<TreatedStats> early = PassOneFinish.of(profile, outliers, s);
    profile.share().release();
    assertThat(early).as("pass 1 finished the treated statistics").isPresent();
    TreatedStats full = TreatedStatsPass.run(data, profile, outliers, s);
    for (String name : NAMES) {
      TreatedStats.ColumnStats a = early.get().columns().get(name);
      TreatedStats.ColumnStats b = full.columns().get(name);
      assertThat(a.present()).as(name).isEqualTo(b.present());
      assertThat(new long[] {a.belowInner(), a.aboveInner(), a.belowOuter(), a.aboveOuter(),
          a.belowLimit(), a.aboveLimit()}).as(name).containsExactly(b.belowInner(), b.aboveInner(),
          b.belowOuter(), b.aboveOuter(), b.belowLimit(), b.aboveLimit());
      assertThat(new double[] {a.q1(), a.median(), a.q3(), a.min(), a.max()}).as(name)
          .containsExactly(b.q1(), b.median(), b.q3(), b.min(), b.max());
      assertThat(a.mean()).as(name).isCloseTo(b.mean(), within(1e-12 * Math.abs(b.mean())));
      assertThat(a.stddev()).as(name).isCloseTo(b.stddev(), within(1e-10 * b.stddev()));
    }
    assertThat(early.get().comomentColumns()).isEqualTo(full.comomentColumns());
    Plan one = Planner.finish(profile, s, outliers, early.get());
    Plan two = Planner.finish(profile, s, outliers, full);
    CollinearityFindings c1 = one.collinearity();
    CollinearityFindings c2 = two.collinearity();
    assertThat(c1.status()).isEqualTo("computed");
    for (int i = 0; i < c2.pearson().size(); i++) {
      for (int j = 0; j < c2.pearson().size(); j++) {
        assertThat(c1.pearson().get(i).get(j)).isCloseTo(c2.pearson().get(i).get(j), within(1e-10));
      }
      assertThat(c1.vif().get(i)).isCloseTo(c2.vif().get(i), within(1e-9 * c2.vif().get(i)));
    }
    for (String name : NAMES) {
      Double f1 = one.column(name).orElseThrow().missing().fillNumber();
      Double f2 = two.column(name).orElseThrow().missing().fillNumber();
      assertThat(f1).as(name).isNotNull();
      assertThat(f1).as(name).isCloseTo(f2, within(1e-11 * Math.abs(f2)));
    }
  }
}
