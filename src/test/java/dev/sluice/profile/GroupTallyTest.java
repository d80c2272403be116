package dev.sluice.profile;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

import dev.sluice.Sluice;
import dev.sluice.config.Role;
import dev.sluice.config.Settings;
import dev.sluice.config.SettingsLoader;
import dev.sluice.plan.ColumnPlan;
import dev.sluice.plan.GroupFigures;
import dev.sluice.stats.NumericSteps;
import dev.sluice.testing.SharedSpark;
import dev.sluice.treat.GroupPass;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import org.apache.commons.math3.stat.descriptive.DescriptiveStatistics;
import org.apache.commons.math3.stat.descriptive.rank.Percentile;
import org.apache.commons.math3.stat.ranking.NaNStrategy;
import org.apache.commons.math3.util.KthSelector;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.RowFactory;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.StructType;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.ExtendWith;

/**
 * Group-wise figures measured in pass 1, on tables large enough (against lowered memory settings)
 * that the pilot places each group's quartile windows. References: Apache Commons Math's
 * Percentile with estimation type R_7 (Hyndman and Fan type 7) and DescriptiveStatistics (mean,
 * sample standard deviation), applied to each group's values; and the group search after the plan
 * (itself checked against Commons Math in treat/GroupWiseTest), which must give the same plan.
 */
@ExtendWith(SharedSpark.class)
class GroupTallyTest {
  /**
   * Small enough that a pilot is taken: 60,000 / (3 quartiles x 2 columns) = 10,000 values per
   * window, fewer than the table's 20,030 rows; large enough for the groups' windows.
   */
  private static final String[] SMALL_MEMORY = {"quantiles.max-held-values=60000", "quantiles.pilot-rows=2000"};

  /**
   * Dock dwell hours of our own scenario. A: 12,000 values spread over 0..1000 h, B: 8,000
   * values over 500..2500 h, C: 30 values (fewer than groups.min-values); rows of the three
   * interleaved. {@code late}: a depot D of 60 values in the last rows only, where the pilot (the
   * first rows of the partitions) never looks.
   */
  private static Map<String, double[]> values(boolean late) {
    Map<String, double[]> out = new LinkedHashMap<>();
    out.put("A", planted(spread(12_000, 10_007, 0.1, 0), 9_000));
    out.put("B", planted(spread(8_000, 8_009, 0.25, 500), -3_000));
    out.put("C", spread(30, 31, 3, 40));
    if (late) {
      out.put("D", spread(60, 61, 2, 5_000));
    }
    return out;
  }

  /** The values with every 1,000th replaced by an extreme: at + (i / 1000). */
  private static double[] planted(double[] v, double at) {
    for (int i = 500; i < v.length; i += 1_000) {
      v[i] = at + i / 1_000;
    }
    return v;
  }

  /** n values ((i * 7919) mod m) * step + from: a deterministic scatter with ties where n > m. */
  private static double[] spread(int n, int m, double step, double from) {
    double[] v = new double[n];
    for (int i = 0; i < n; i++) {
      v[i] = (i * 7919L % m) * step + from;
    }
    return v;
  }

  private static Dataset<Row> table(SparkSession spark, Map<String, double[]> values) {
    List<Row> rows = new ArrayList<>();
    int longest = values.values().stream().mapToInt(v -> v.length).max().orElse(0);
    for (int i = 0; i < longest; i++) {
      for (Map.Entry<String, double[]> e : values.entrySet()) {
        if (!e.getKey().equals("D") && i < e.getValue().length) {
          rows.add(RowFactory.create(e.getKey(), e.getValue()[i], i % 17 == 0 ? null : (double) (i % 5),
              crew(e.getKey(), i)));
        }
      }
    }
    int d = 0;
    for (double v : values.getOrDefault("D", new double[0])) {
      rows.add(RowFactory.create("D", v, 1.0, crew("D", d++)));
    }
    StructType schema = new StructType().add("depot", DataTypes.StringType)
        .add("dwell hours", DataTypes.DoubleType).add("doors", DataTypes.DoubleType)
        .add("crew", DataTypes.StringType);
    return spark.createDataFrame(rows, schema).coalesce(2);
  }

  /**
   * The crew on duty: every eleventh missing; A mostly "south" (two in three), B mostly "west"
   * (three in four), C and D alternate "x" and "y" (a tie, which goes to the smaller, "x").
   */
  private static String crew(String depot, int i) {
    if (i % 11 == 0) {
      return null;
    }
    return switch (depot) {
      case "A" -> i % 3 == 0 ? "north" : "south";
      case "B" -> i % 4 == 0 ? "east" : "west";
      default -> i % 2 == 0 ? "x" : "y";
    };
  }

  private static Settings settings(String... more) {
    List<String> all = new ArrayList<>(List.of("groups.by=[depot]", "columns.depot.role=keep",
        "collinearity.enabled=false"));
    all.addAll(Arrays.asList(SMALL_MEMORY));
    all.addAll(Arrays.asList(more));
    return SettingsLoader.load(Optional.empty(), all);
  }

  private static double r7(double[] values, double p) {
    return new Percentile().withEstimationType(Percentile.EstimationType.R_7)
        .withNaNStrategy(NaNStrategy.FIXED).withKthSelector(new KthSelector()).evaluate(values, p * 100);
  }

  @Test
  void passOneGivesEachGroupItsExactType7QuartilesMeanAndStandardDeviation(SparkSession spark) {
    Map<String, double[]> values = values(false);
    Sluice.Fit fit = Sluice.fit(table(spark, values), settings(), List.of());
    // The pilot path: the table holds more values than one window may.
    assertThat(fit.profile().pilotOf("dwell hours")).isNotEmpty();
    GroupMeasures g = fit.profile().groups();
    assertThat(g.unsettled()).isEmpty();
    Map<List<String>, GroupMeasures.Measure> dwell = g.columns().get("dwell hours");
    assertThat(dwell.keySet()).containsExactly(List.of("A"), List.of("B"), List.of("C"));
    for (String depot : List.of("A", "B")) {
      GroupMeasures.Measure m = dwell.get(List.of(depot));
      double[] v = values.get(depot);
      DescriptiveStatistics ref = new DescriptiveStatistics(v);
      assertThat(m.usable()).isEqualTo(v.length);
      assertThat(m.quartiles()).containsExactly(r7(v, 0.25), r7(v, 0.5), r7(v, 0.75));
      assertThat(m.mean()).isCloseTo(ref.getMean(), within(1e-9 * ref.getMean()));
      assertThat(m.stddev()).isCloseTo(ref.getStandardDeviation(), within(1e-9 * ref.getStandardDeviation()));
    }
    // C has too few values for its own quartiles: counted, none searched.
    GroupMeasures.Measure c = dwell.get(List.of("C"));
    assertThat(c.usable()).isEqualTo(30);
    assertThat(c.quartiles()).containsOnly(Double.NaN);
    // The doors column (a median fill) is settled too; its nulls are not values.
    assertThat(g.columns().get("doors").get(List.of("A")).usable()).isEqualTo(12_000 - (12_000 + 16) / 17);
  }

  @Test
  void thePlanFromPassOneIsThePlanOfTheSearchAfterIt(SparkSession spark) {
    Dataset<Row> data = table(spark, values(false));
    Settings settings = settings();
    Sluice.Fit fit = Sluice.fit(data, settings, List.of());
    assertThat(GroupPass.searchedAfterPlan(fit.plan().columns(), List.of("depot"), fit.profile().groups())).isEmpty();
    List<ColumnPlan> tableWide = fit.plan().columns().stream().map(cp -> cp.withGroups(null)).toList();
    List<ColumnPlan> searched = GroupPass.fit(data, tableWide, settings, fit.profile().rows(), null);
    for (String col : List.of("dwell hours", "doors")) {
      assertThat(figures(fit.plan().columns(), col)).isEqualTo(figures(searched, col));
    }
    // A's own Tukey fences (k = 1.5, common practice) from its Commons Math quartiles.
    double[] a = values(false).get("A");
    double iqr = r7(a, 0.75) - r7(a, 0.25);
    GroupFigures.Group ga = figures(fit.plan().columns(), "dwell hours").stream()
        .filter(x -> x.key().equals(List.of("A"))).findFirst().orElseThrow();
    assertThat(ga.lower()).isCloseTo(r7(a, 0.25) - 1.5 * iqr, within(1e-9));
    assertThat(ga.upper()).isCloseTo(r7(a, 0.75) + 1.5 * iqr, within(1e-9));
  }

  @Test
  void fillsAfterEachGroupsCappingOrRemovalAreReadOffPassOnesWindows(SparkSession spark) {
    Dataset<Row> data = table(spark, values(false));
    for (String action : List.of("cap", "set-missing")) {
      for (String strategy : List.of("mean", "median")) {
        Settings settings = settings("defaults.outliers.action=" + action, "defaults.missing.strategy=" + strategy);
        Sluice.Fit fit = Sluice.fit(data, settings, List.of());
        ColumnPlan dwell = fit.plan().column("dwell hours").orElseThrow();
        for (String depot : List.of("A", "B")) {
          GroupFigures.Group g = figures(fit.plan().columns(), "dwell hours").stream()
              .filter(x -> x.key().equals(List.of(depot))).findFirst().orElseThrow();
          double[] v = values(false).get(depot);
          // Exactly the planted extremes lie beyond the group's fences.
          assertThat(Arrays.stream(v).filter(x -> x < g.lower() || x > g.upper()).count()).isEqualTo(v.length / 1_000);
          checkFill(fit, dwell, g, v, action, strategy, action + " " + strategy + " " + depot);
        }
      }
    }
  }

  /**
   * The group's fill equals the mean or median (Commons Math) of its values after its own step,
   * capped at or removed beyond its limits, both as pass 1 alone gives it (no search after the
   * plan needed) and as the plan holds it (12 significant digits).
   */
  private static void checkFill(Sluice.Fit fit, ColumnPlan column, GroupFigures.Group g, double[] v, String action,
      String strategy, String what) {
    double[] after = action.equals("cap")
        ? Arrays.stream(v).map(x -> Math.max(g.lower(), Math.min(g.upper(), x))).toArray()
        : Arrays.stream(v).filter(x -> x >= g.lower() && x <= g.upper()).toArray();
    double expected = strategy.equals("mean") ? new DescriptiveStatistics(after).getMean() : r7(after, 0.5);
    double fromPassOne = GroupPass.fillFromPassOne(column, g,
        fit.profile().groups().columns().get(column.name()).get(g.key()));
    assertThat(fromPassOne).as(what).isCloseTo(expected, within(1e-9 * Math.abs(expected)));
    assertThat(g.fill()).as(what).isCloseTo(expected, within(1e-9 * Math.abs(expected)));
  }

  @Test
  void aNumericModeFillAfterEachGroupsCappingOrRemovalComesFromPassOnesCounts(SparkSession spark) {
    Dataset<Row> data = table(spark, values(false));
    for (String action : List.of("cap", "set-missing")) {
      Settings settings = settings("defaults.outliers.action=" + action, "defaults.missing.strategy=mode");
      Sluice.Fit fit = Sluice.fit(data, settings, List.of());
      ColumnPlan dwell = fit.plan().column("dwell hours").orElseThrow();
      GroupFigures.Group a = figures(fit.plan().columns(), "dwell hours").stream()
          .filter(x -> x.key().equals(List.of("A"))).findFirst().orElseThrow();
      // A's twelve planted extremes are capped to its upper fence, where they outnumber every
      // value (at most two copies each); removed, the lowest value seen twice is the mode.
      double expected = action.equals("cap") ? a.upper() : 0.0;
      double fromPassOne = GroupPass.fillFromPassOne(dwell, a,
          fit.profile().groups().columns().get("dwell hours").get(List.of("A")));
      assertThat(fromPassOne).as(action).isEqualTo(expected);
      assertThat(a.fill()).as(action).isEqualTo(expected);
      // Reference: Spark's mode(values after the outlier step, true) per group, the aggregate
      // used when pass 1 could not count the values.
      List<ColumnPlan> tableWide = fit.plan().columns().stream().map(cp -> cp.withGroups(null)).toList();
      List<ColumnPlan> searched = GroupPass.fit(data, tableWide, settings, fit.profile().rows(), null);
      assertThat(figures(fit.plan().columns(), "dwell hours")).as(action).isEqualTo(figures(searched, "dwell hours"));
    }
  }

  /**
   * Near-normal values of our own scenario (load per pallet, two depots on different scales): the
   * sum of twelve scattered uniforms minus six, about N(0, 1), so that z-score and MAD limits
   * fall inside the values' natural tails.
   */
  private static double[] nearNormal(int n, double mean, double sd) {
    long[] primes = {7919, 104729, 1299709, 15485863, 179424673, 2038074743, 49979687, 86028121, 32452843,
        67867967, 961748927, 1000000007};
    double[] v = new double[n];
    for (int i = 0; i < n; i++) {
      double sum = 0;
      for (long p : primes) {
        sum += ((i + 1) * p % 100_003) / 100_003.0;
      }
      v[i] = mean + sd * (sum - 6);
    }
    return v;
  }

  @Test
  void fillsAfterEachGroupsZScoreOrMadLimitsAreReadOffPassOnesWindows(SparkSession spark) {
    Map<String, double[]> values = new LinkedHashMap<>();
    values.put("A", nearNormal(10_000, 40, 6));
    values.put("B", nearNormal(6_000, 900, 120));
    Dataset<Row> data = table(spark, values);
    for (String method : List.of("zscore", "mad")) {
      for (String[] step : new String[][] {{"cap", "mean"}, {"set-missing", "mean"}, {"set-missing", "median"}}) {
        // z = 2.5 and a modified z of 2.5 (common practice is 3 and 3.5) put more values beyond.
        Settings settings = settings("defaults.outliers.method=" + method, "defaults.outliers.z-limit=2.5",
            "defaults.outliers.mad-limit=2.5", "defaults.outliers.action=" + step[0],
            "defaults.missing.strategy=" + step[1]);
        Sluice.Fit fit = Sluice.fit(data, settings, List.of());
        ColumnPlan dwell = fit.plan().column("dwell hours").orElseThrow();
        for (String depot : List.of("A", "B")) {
          GroupFigures.Group g = figures(fit.plan().columns(), "dwell hours").stream()
              .filter(x -> x.key().equals(List.of(depot))).findFirst().orElseThrow();
          double[] v = values.get(depot);
          String what = method + " " + step[0] + " " + step[1] + " " + depot;
          assertThat(Arrays.stream(v).filter(x -> x < g.lower() || x > g.upper()).count()).as(what + ": beyond")
              .isPositive();
          checkFill(fit, dwell, g, v, step[0], step[1], what);
        }
      }
    }
  }

  @Test
  void eachGroupsMadIsFoundInThePassOfTheTableWideMad(SparkSession spark) {
    Map<String, double[]> values = values(false);
    Sluice.Fit fit = Sluice.fit(table(spark, values), settings("defaults.outliers.method=mad"), List.of());
    Map<List<String>, GroupMeasures.Measure> dwell = fit.profile().groups().columns().get("dwell hours");
    for (String depot : List.of("A", "B")) {
      double[] v = values.get(depot);
      double median = r7(v, 0.5);
      // The MAD: the median of the distances from the median (Commons Math R_7 on both).
      double mad = r7(Arrays.stream(v).map(x -> Math.abs(x - median)).toArray(), 0.5);
      assertThat(dwell.get(List.of(depot)).mad()).as(depot).isEqualTo(mad);
      GroupFigures.Group g = figures(fit.plan().columns(), "dwell hours").stream()
          .filter(x -> x.key().equals(List.of(depot))).findFirst().orElseThrow();
      // Iglewicz and Hoaglin's modified z-score limit 3.5 (the default): median -/+ 3.5 MAD / 0.6745.
      assertThat(g.upper()).as(depot).isCloseTo(median + 3.5 * mad / 0.6745, within(1e-7));
    }
    // C is too small for figures of its own: no MAD searched.
    assertThat(dwell.get(List.of("C")).mad()).isNaN();
  }

  @Test
  void passOneCountsEachGroupsModeAsSparksDeterministicModeDoes(SparkSession spark) {
    Dataset<Row> data = table(spark, values(true));
    // The key column treated too: filled by its mode, but never group by group.
    Settings settings = settings("columns.depot.role=treat");
    Sluice.Fit fit = Sluice.fit(data, settings, List.of());
    Map<List<String>, GroupMeasures.Mode> crew = fit.profile().groups().modes().get("crew");
    // Counted by hand from crew(): A 12,000 rows less every eleventh (1,091), mode "south".
    assertThat(crew.get(List.of("A"))).isEqualTo(new GroupMeasures.Mode(12_000 - 1_091, "south"));
    assertThat(crew.get(List.of("B")).mode()).isEqualTo("west");
    assertThat(crew.get(List.of("D"))).isEqualTo(new GroupMeasures.Mode(60 - 6, "x"));
    // Reference: Spark's mode(crew, true) per group, the aggregate used when pass 1 could not count.
    List<ColumnPlan> tableWide = fit.plan().columns().stream().map(cp -> cp.withGroups(null)).toList();
    List<ColumnPlan> searched = GroupPass.fit(data, tableWide, settings, fit.profile().rows(), null);
    assertThat(figures(fit.plan().columns(), "crew")).isEqualTo(figures(searched, "crew"));
    // The key column itself gets no group-wise figures.
    assertThat(fit.plan().columns().stream().filter(cp -> cp.name().equals("depot")).findFirst().orElseThrow()
        .groups()).isNull();
  }

  @Test
  void aGroupThePilotNeverSawIsFoundByASearchPassInTheProfile(SparkSession spark) {
    Map<String, double[]> values = values(true);
    Dataset<Row> data = table(spark, values);
    Sluice.Fit fit = Sluice.fit(data, settings(), List.of());
    GroupMeasures g = fit.profile().groups();
    // D's rows come last, where the pilot never looks: pass 1 counts them without windows, and a
    // search pass over the numeric columns (D's rows only) finds D's quartiles before the plan.
    assertThat(g.unsettled()).isEmpty();
    assertThat(GroupPass.searchedAfterPlan(fit.plan().columns(), List.of("depot"), g)).isEmpty();
    double[] d = values.get("D");
    assertThat(g.columns().get("dwell hours").get(List.of("D")).quartiles())
        .containsExactly(r7(d, 0.25), r7(d, 0.5), r7(d, 0.75));
    double iqr = r7(d, 0.75) - r7(d, 0.25);
    GroupFigures.Group gd = figures(fit.plan().columns(), "dwell hours").stream()
        .filter(x -> x.key().equals(List.of("D"))).findFirst().orElseThrow();
    assertThat(gd.fallback()).isNull();
    assertThat(gd.lower()).isCloseTo(r7(d, 0.25) - 1.5 * iqr, within(1e-9));
    assertThat(gd.upper()).isCloseTo(r7(d, 0.75) + 1.5 * iqr, within(1e-9));
  }

  @Test
  void moreGroupsThanTheLimitStopTheTallyAndLeaveEveryColumnToTheSearch(SparkSession spark) {
    Map<String, Role> roles = Map.of("depot", Role.KEEP, "dwell hours", Role.TREAT, "doors", Role.TREAT,
        "crew", Role.TREAT);
    // The pilot sees A, B and C, within the limit; the late depot D is the fourth group.
    TableProfile p = Profiler.profile(table(spark, values(true)), settings("groups.max-groups=3"), roles);
    assertThat(p.groups().columns()).isEmpty();
    assertThat(p.groups().unsettled()).containsOnlyKeys("dwell hours", "doors", "crew")
        .containsValue("more than groups.max-groups = 3 groups");
    // Room in pass 1 for the group windows of one column only: the first in table order gets
    // them; the other's group quartiles are found by the search pass that follows.
    Map<String, double[]> values = values(false);
    TableProfile r = Profiler.profile(table(spark, values), settings("quantiles.max-held-values=12000"), roles);
    assertThat(r.groups().unsettled()).isEmpty();
    for (String depot : List.of("A", "B")) {
      double[] doors = new double[values.get(depot).length];
      int n = 0;
      for (int i = 0; i < doors.length; i++) {
        if (i % 17 != 0) {
          doors[n++] = i % 5;
        }
      }
      double[] v = Arrays.copyOf(doors, n);
      assertThat(r.groups().columns().get("doors").get(List.of(depot)).quartiles()).as(depot)
          .containsExactly(r7(v, 0.25), r7(v, 0.5), r7(v, 0.75));
    }
    // More groups in the pilot than the limit: no tally at all.
    TableProfile q = Profiler.profile(table(spark, values(false)), settings("groups.max-groups=2"), roles);
    assertThat(q.groups().columns()).isEmpty();
    assertThat(q.groups().unsettled()).containsOnlyKeys("dwell hours", "doors", "crew");
  }

  @Test
  void windowsThatMissAGroupsQuartilesLeaveItsColumnToTheSearch() {
    StructType schema = new StructType().add("depot", DataTypes.StringType).add("dwell hours", DataTypes.DoubleType);
    ProfileLayout layout = ProfileLayout.of(schema, Map.of("depot", Role.KEEP, "dwell hours", Role.TREAT),
        List.of("depot"));
    // The pilot saw depot 7 (hash 7) with values 0 .. 1999, in a table of a million rows.
    double[] pilot = new double[2_000];
    long[] keys = new long[2_000];
    for (int i = 0; i < pilot.length; i++) {
      pilot[i] = i;
      keys[i] = 7;
    }
    NumericSteps[] valid = {NumericSteps.validity(null, null)};
    GroupTally tally = GroupTally.plan(layout, new int[] {0}, valid, new dev.sluice.config.OutlierSettings[1], new boolean[1], new int[0], new RowScan.Pilot(new double[][] {pilot}, keys),
        1_000_000, 10, 8_000_000).orElseThrow();
    // The pass then finds depot 7's values far above its windows; depot 8, unseen, has 10 values.
    GroupTally part1 = tally.emptyCopy();
    GroupTally part2 = tally.emptyCopy();
    for (int i = 0; i < 1_000; i++) {
      (i % 2 == 0 ? part1 : part2).add(row(layout, 7, "seven", 5_000.0 + i));
    }
    for (int i = 0; i < 10; i++) {
      part2.add(row(layout, 8, "eight", i));
    }
    GroupMeasures g = part1.merge(part2).finish(List.of("depot"), new String[] {"dwell hours"}, new String[0], 50);
    assertThat(g.columns()).isEmpty();
    assertThat(g.unsettled()).containsEntry("dwell hours", "a group's windows missed its quartiles");
    // Without depot 7's values beyond the windows: the small unseen group needs no quartiles.
    GroupTally fits = tally.emptyCopy();
    for (int i = 0; i < 1_000; i++) {
      fits.add(row(layout, 7, "seven", 2.0 * i));
    }
    for (int i = 0; i < 10; i++) {
      fits.add(row(layout, 8, "eight", i));
    }
    GroupMeasures ok = fits.finish(List.of("depot"), new String[] {"dwell hours"}, new String[0], 50);
    double[] seven = new double[1_000];
    Arrays.setAll(seven, i -> 2.0 * i);
    assertThat(ok.columns().get("dwell hours").get(List.of("seven")).quartiles())
        .containsExactly(r7(seven, 0.25), r7(seven, 0.5), r7(seven, 0.75));
    assertThat(ok.columns().get("dwell hours").get(List.of("eight")).usable()).isEqualTo(10);
  }

  /** A row of the layout's full projection: the value, the key's hash and its text. */
  private static org.apache.spark.sql.catalyst.InternalRow row(ProfileLayout layout, long hash, String key,
      double value) {
    Object[] cells = new Object[layout.keyTextAt + 1];
    cells[0] = value;
    cells[layout.keyAt] = hash;
    cells[layout.keyTextAt] = org.apache.spark.sql.catalyst.util.ArrayData.toArrayData(
        new Object[] {org.apache.spark.unsafe.types.UTF8String.fromString(key)});
    return new org.apache.spark.sql.catalyst.expressions.GenericInternalRow(cells);
  }

  private static List<GroupFigures.Group> figures(List<ColumnPlan> columns, String name) {
    return columns.stream().filter(cp -> cp.name().equals(name)).findFirst().orElseThrow().groups().groups();
  }
}
