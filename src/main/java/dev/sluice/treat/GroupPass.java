package dev.sluice.treat;

import static org.apache.spark.sql.functions.avg;
import static org.apache.spark.sql.functions.count;
import static org.apache.spark.sql.functions.lit;
import static org.apache.spark.sql.functions.stddev_samp;
import static org.apache.spark.sql.functions.sum;
import static org.apache.spark.sql.functions.when;

import dev.sluice.SluiceException;
import dev.sluice.config.Settings;
import dev.sluice.io.Names;
import dev.sluice.plan.ColumnPlan;
import dev.sluice.plan.GroupFigures;
import dev.sluice.plan.GroupPlanner;
import dev.sluice.plan.OutlierPlan;
import dev.sluice.profile.GroupMeasures;
import dev.sluice.stats.NumericSteps;
import dev.sluice.stats.Quantiles;
import dev.sluice.stats.RankSearch;
import dev.sluice.stats.ScaledMoments;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Comparator;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.apache.datasketches.kll.KllSketch;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.functions;

/**
 * Group-wise limits and fill values, with exact type 7 quartiles and medians in every group.
 *
 * <p>Each search takes three grouped aggregates over every group-wise column at once. The first
 * counts each group's usable values, their mean and standard deviation, and sketches them with
 * Spark's KLL sketch (k = {@value #K}) to bracket each wanted rank within {@value #MARGIN} times
 * the sketch's rank error. The second counts the values below each bracket; the third collects
 * those inside it (from the few rows that have any), from which the quantile is read off exactly. The sketch only aims the brackets: the
 * result does not depend on its random choices, and a bracket that misses (far beyond the
 * sketch's stated error) is searched again, wider. The values held on the driver are about
 * 2 x {@value #MARGIN} x the sketch's rank error of each group's values per quantile; the sketch is
 * made finer (k up to {@value #MAX_K}) so that they stay within {@code quantiles.max-held-values}
 * where it can.
 *
 * <p>The limits come from the quartiles (or the mean and standard deviation) of the valid values;
 * the fill value from the values after the group's own outlier step: read off the same search
 * when the step moves no value across the median, else from a second search over those values.
 */
public final class GroupPass {
  /** The KLL sketch's smallest size parameter: normalized rank error about 0.0007. */
  static final int K = 4096;
  /** The largest size parameter Spark's KLL sketch takes. */
  static final int MAX_K = 65535;
  /** Brackets span this many times the sketch's rank error either side of the wanted rank. */
  static final double MARGIN = 4;
  static final String METHOD = "exact-type7";
  private static final String KEY = "_sluice_group_";
  private static final double[] QUARTILES = {0.25, 0.5, 0.75};

  private GroupPass() {}

  /** What one search measured of one value expression in one group. */
  record Stats(long usable, double mean, double stddev, double[] quantiles) {}

  /** The plan's columns with their group-wise figures; unchanged when groups.by is empty. */
  public static List<ColumnPlan> fit(Dataset<Row> data, List<ColumnPlan> columns, Settings settings, long rows) {
    return fit(data, columns, settings, rows, null);
  }

  /**
   * As {@link #fit(Dataset, List, Settings, long)}, taking each column's group figures from
   * {@code passOne} (what pass 1 measured; null: nothing) where it has them and searching the rest.
   */
  public static List<ColumnPlan> fit(Dataset<Row> data, List<ColumnPlan> columns, Settings settings, long rows,
      GroupMeasures passOne) {
    List<String> by = settings.groups().by();
    // A key column is the same in the whole of each group: it gets no group-wise figures.
    List<ColumnPlan> grouped = columns.stream().filter(cp -> grouped(cp) && !by.contains(cp.name())).toList();
    List<ColumnPlan> modes = columns.stream().filter(cp -> groupedMode(cp) && !by.contains(cp.name())).toList();
    if (by.isEmpty() || grouped.isEmpty() && modes.isEmpty()) {
      return columns;
    }
    int maxGroups = settings.groups().maxGroups();
    int minValues = settings.groups().minValues();
    Map<String, List<GroupFigures.Group>> figures = new HashMap<>();
    List<ColumnPlan> modesSearched = new ArrayList<>();
    for (ColumnPlan cp : modes) {
      Map<List<String>, GroupMeasures.Mode> counted = passOne == null ? null : passOne.modes().get(cp.name());
      if (counted == null) {
        modesSearched.add(cp);
        continue;
      }
      List<GroupFigures.Group> groups = new ArrayList<>();
      counted.forEach((key, m) -> groups.add(modeGroup(key, m.values(), m.mode(), minValues)));
      figures.put(cp.name(), groups);
    }
    if (!modesSearched.isEmpty()) {
      figures.putAll(modes(data, by, modesSearched, minValues, maxGroups));
    }
    if (grouped.isEmpty()) {
      return withFigures(columns, figures, by);
    }
    Map<String, Map<List<String>, Stats>> measured = new HashMap<>();
    List<ColumnPlan> searched = new ArrayList<>();
    for (ColumnPlan cp : grouped) {
      Map<List<String>, GroupMeasures.Measure> settled = passOne == null ? null : passOne.columns().get(cp.name());
      if (settled == null) {
        searched.add(cp);
        continue;
      }
      Map<List<String>, Stats> stats = new LinkedHashMap<>();
      settled.forEach((key, m) -> stats.put(key, new Stats(m.usable(), m.mean(), m.stddev(), m.quartiles())));
      measured.put(cp.name(), stats);
    }
    int maxHeld = settings.quantiles().maxHeldValues();
    if (!searched.isEmpty()) {
      List<Column> valid = searched.stream().map(cp -> Treatments.valid(cp.name(), cp.validMin(), cp.validMax())).toList();
      Map<List<String>, Stats[]> found = search(data, by, valid, QUARTILES, maxGroups, MARGIN,
          sketchSize(rows, valid.size() * QUARTILES.length, maxHeld));
      for (int j = 0; j < searched.size(); j++) {
        Map<List<String>, Stats> stats = new LinkedHashMap<>();
        for (Map.Entry<List<String>, Stats[]> e : found.entrySet()) {
          stats.put(e.getKey(), e.getValue()[j]);
        }
        measured.put(searched.get(j).name(), stats);
      }
    }
    // Each group's MAD: found beside the table-wide MAD in the profile, or searched now.
    Map<String, Map<List<String>, Double>> mads = new HashMap<>();
    List<ColumnPlan> madColumns = new ArrayList<>();
    for (ColumnPlan cp : grouped) {
      if (!GroupPlanner.needsMad(cp)) {
        continue;
      }
      Map<List<String>, GroupMeasures.Measure> found = passOne == null ? null : passOne.columns().get(cp.name());
      boolean complete = found != null && found.values().stream()
          .allMatch(m -> m.usable() < minValues || Double.isNaN(m.quartiles()[1]) || !Double.isNaN(m.mad()));
      if (complete) {
        Map<List<String>, Double> byKey = new HashMap<>();
        found.forEach((key, m) -> byKey.put(key, m.mad()));
        mads.put(cp.name(), byKey);
      } else {
        madColumns.add(cp);
      }
    }
    if (!madColumns.isEmpty()) {
      mads.putAll(mads(data, by, madColumns, measured, maxGroups, sketchSize(rows, madColumns.size(), maxHeld)));
    }
    List<ColumnPlan> second = new ArrayList<>();
    for (ColumnPlan cp : grouped) {
      List<GroupFigures.Group> groups = new ArrayList<>();
      boolean needsSecond = false;
      for (Map.Entry<List<String>, Stats> e : measured.get(cp.name()).entrySet()) {
        Stats s = e.getValue();
        GroupPlanner.Measured m = new GroupPlanner.Measured(e.getKey(), s.usable(), s.quantiles()[0],
            s.quantiles()[1], s.quantiles()[2], s.mean(), s.stddev(),
            mads.getOrDefault(cp.name(), Map.of()).getOrDefault(e.getKey(), Double.NaN));
        GroupFigures.Group g = GroupPlanner.limits(cp, settings.column(cp.name()).outliers(), m,
            settings.groups().minValues());
        if (g.fallback() == null && GroupPlanner.groupsFill(cp)) {
          double fill = GroupPlanner.fillFromFirst(cp, g, m);
          if (Double.isNaN(fill) && passOne != null && passOne.columns().containsKey(cp.name())) {
            fill = fillFromPassOne(cp, g, passOne.columns().get(cp.name()).get(e.getKey()));
          }
          needsSecond |= Double.isNaN(fill);
          g = GroupPlanner.withFill(g, fill);
        }
        groups.add(g);
      }
      figures.put(cp.name(), groups);
      if (needsSecond) {
        second.add(cp);
      }
    }
    if (!second.isEmpty()) {
      fillsAfterOutliers(data, by, second, figures, maxGroups, sketchSize(rows, second.size(), maxHeld));
    }
    return withFigures(columns, figures, by);
  }

  /**
   * A group's median or mean fill after its own outlier step, read off pass 1's windows and region
   * moments of the group (as {@link PassOneFinish} does table-wide): exact when each of the group's
   * limits lies in a window whose values pass 1 kept, else NaN (the search after the plan
   * measures it).
   */
  public static double fillFromPassOne(ColumnPlan cp, GroupFigures.Group g, GroupMeasures.Measure m) {
    String strategy = cp.missing().strategy();
    if (m == null) {
      return Double.NaN;
    }
    OutlierPlan table = cp.outliers();
    OutlierPlan own = new OutlierPlan(table.method(), table.direction(), table.action(), g.lower(), g.upper(),
        null, null, null, null, table.reason());
    NumericSteps steps = own.steps(cp.validMin(), cp.validMax());
    if (strategy.equals("mode")) {
      return m.values() == null ? Double.NaN : modeAfter(m.values(), steps);
    }
    if (m.windows() == null || !(strategy.equals("mean") || strategy.equals("median"))) {
      return Double.NaN;
    }
    ScaledMoments after = PassOneFinish.treatedMoments(m.windows(), m.regions(), steps, own);
    if (after == null || after.count() == 0) {
      return Double.NaN;
    }
    if (strategy.equals("mean")) {
      return after.mean();
    }
    RankSearch search = new RankSearch(QUARTILES, 1);
    if (!search.absorb(m.windows())) {
      return Double.NaN;
    }
    if (!steps.removes()) {
      return search.quantiles(steps::afterOutliers)[1];
    }
    long removedBelow = own.lower() == null ? 0 : m.windows().countBelow(own.lower(), false);
    if (removedBelow < 0) {
      return Double.NaN;
    }
    return PassOneFinish.afterRemoval(m.windows(), search, removedBelow, after.count(), new double[] {0.5})
        .map(q -> q[0]).orElse(Double.NaN);
  }

  /**
   * The most frequent value after the outlier step, from each usable value's count: capped values
   * count at their limit, removed ones not at all; ties to the lowest value (as the table-wide
   * mode and Spark's deterministic mode); NaN when no value is left.
   */
  static double modeAfter(dev.sluice.stats.HashedCounts<Double> counts, NumericSteps steps) {
    List<Map.Entry<Double, Long>> before = counts.mostCommon(Integer.MAX_VALUE);
    dev.sluice.stats.Frequencies<Double> after = new dev.sluice.stats.Frequencies<>(Math.max(1, before.size()));
    for (Map.Entry<Double, Long> e : before) {
      double t = steps.afterOutliers(e.getKey());
      if (!Double.isNaN(t)) {
        after.add(t + 0.0, e.getValue());
      }
    }
    Double top = after.top();
    return top == null ? Double.NaN : top;
  }

  /** The names of the plan's group-wise columns that {@code passOne} left to the search, with the reasons. */
  public static Map<String, String> searchedAfterPlan(List<ColumnPlan> columns, List<String> by,
      GroupMeasures passOne) {
    Map<String, String> out = new LinkedHashMap<>();
    for (ColumnPlan cp : columns) {
      if (by.contains(cp.name())) {
        continue;
      }
      boolean searched = grouped(cp) && (passOne == null || !passOne.columns().containsKey(cp.name()))
          || groupedMode(cp) && (passOne == null || !passOne.modes().containsKey(cp.name()));
      if (searched) {
        out.put(cp.name(), passOne == null || !passOne.unsettled().containsKey(cp.name())
            ? "not measured in pass 1" : passOne.unsettled().get(cp.name()));
      }
    }
    return out;
  }

  private static List<ColumnPlan> withFigures(List<ColumnPlan> columns, Map<String, List<GroupFigures.Group>> figures,
      List<String> by) {
    List<ColumnPlan> out = new ArrayList<>();
    for (ColumnPlan cp : columns) {
      List<GroupFigures.Group> groups = figures.get(cp.name());
      out.add(groups == null ? cp : cp.withGroups(new GroupFigures(by, METHOD, 0.0, groups)));
    }
    return out;
  }

  /** Whether a categorical column is filled group by group: kept and filled with its mode. */
  public static boolean groupedMode(ColumnPlan cp) {
    return cp.treated() && cp.kept() && !cp.kind().equals("numeric") && cp.missing().strategy().equals("mode")
        && cp.missing().fillText() != null;
  }

  /**
   * Each group's most frequent value of each categorical column, ties to the lowest (Spark's
   * deterministic {@code mode}, one grouped aggregate). The table-wide mode exists only for a
   * column with few enough distinct values, so each group's counts stay small too.
   */
  private static Map<String, List<GroupFigures.Group>> modes(Dataset<Row> data, List<String> by, List<ColumnPlan> cols,
      int minValues, int maxGroups) {
    List<Column> aggs = new ArrayList<>();
    for (ColumnPlan cp : cols) {
      aggs.add(count(Names.col(cp.name())));
      aggs.add(functions.call_function("mode", Names.col(cp.name()), lit(true)).cast("string"));
    }
    Map<String, List<GroupFigures.Group>> out = new HashMap<>();
    for (Row r : grouped(data, by, aggs, maxGroups)) {
      List<String> key = key(r, by.size());
      for (int j = 0; j < cols.size(); j++) {
        int at = by.size() + 2 * j;
        long n = r.getLong(at);
        GroupFigures.Group g = modeGroup(key, n, r.isNullAt(at + 1) ? null : r.getString(at + 1), minValues);
        out.computeIfAbsent(cols.get(j).name(), c -> new ArrayList<>()).add(g);
      }
    }
    return out;
  }

  /** A group's mode fill, or its fallback to the table-wide mode when it has too few values. */
  private static GroupFigures.Group modeGroup(List<String> key, long n, String mode, int minValues) {
    return n < minValues
        ? new GroupFigures.Group(key, n, null, null, null, null, n + " values, fewer than groups.min-values = "
            + minValues + ": the table-wide figures apply")
        : new GroupFigures.Group(key, n, null, null, null, mode, null);
  }

  /** Whether a column is treated group by group: kept, numeric, with group-wise limits or fill. */
  public static boolean grouped(ColumnPlan cp) {
    return cp.treated() && cp.kept() && cp.kind().equals("numeric")
        && (GroupPlanner.groupsLimits(cp) || GroupPlanner.groupsFill(cp));
  }

  /**
   * Each group's median absolute deviation from its own median, for columns with MAD limits: one
   * search over the distances |x - the row's group median| (a group without a median has none),
   * as the table-wide MAD costs one more pass.
   */
  private static Map<String, Map<List<String>, Double>> mads(Dataset<Row> data, List<String> by, List<ColumnPlan> cols,
      Map<String, Map<List<String>, Stats>> measured, int maxGroups, int k) {
    List<List<String>> keys = new ArrayList<>(measured.get(cols.get(0).name()).keySet());
    GroupFigures index = new GroupFigures(by, METHOD, 0,
        keys.stream().map(key -> new GroupFigures.Group(key, 0, null, null, null, null)).toList());
    Dataset<Row> indexed = Treatments.withGroupIndex(data, index);
    List<Column> distances = new ArrayList<>();
    for (ColumnPlan cp : cols) {
      List<Column> medians = new ArrayList<>(List.of(lit(null).cast("double")));
      for (List<String> key : keys) {
        double median = measured.get(cp.name()).get(key).quantiles()[1];
        medians.add(Double.isFinite(median) ? lit(median) : lit(null).cast("double"));
      }
      Column median = functions.element_at(functions.array(medians.toArray(new Column[0])),
          functions.col(Treatments.GROUP_INDEX).plus(1));
      distances.add(functions.abs(Treatments.valid(cp.name(), cp.validMin(), cp.validMax()).minus(median)));
    }
    Map<List<String>, Stats[]> found = search(indexed, by, distances, new double[] {0.5}, maxGroups, MARGIN, k);
    Map<String, Map<List<String>, Double>> out = new HashMap<>();
    for (int j = 0; j < cols.size(); j++) {
      Map<List<String>, Double> byKey = new HashMap<>();
      for (Map.Entry<List<String>, Stats[]> e : found.entrySet()) {
        byKey.put(e.getKey(), e.getValue()[j].quantiles()[0]);
      }
      out.put(cols.get(j).name(), byKey);
    }
    return out;
  }

  /**
   * The fill values that need the values after each group's own outlier step: their mean or
   * median (one search), or their mode (one grouped aggregate, Spark's deterministic mode: ties to
   * the lowest value, as the table-wide mode).
   */
  private static void fillsAfterOutliers(Dataset<Row> data, List<String> by, List<ColumnPlan> cols,
      Map<String, List<GroupFigures.Group>> figures, int maxGroups, int k) {
    GroupFigures any = new GroupFigures(by, METHOD, 0, figures.get(cols.get(0).name()));
    Dataset<Row> indexed = Treatments.withGroupIndex(data, any);
    List<ColumnPlan> searched = cols.stream().filter(cp -> !cp.missing().strategy().equals("mode")).toList();
    List<ColumnPlan> modes = cols.stream().filter(cp -> cp.missing().strategy().equals("mode")).toList();
    Map<List<String>, Stats[]> measured = searched.isEmpty() ? Map.of()
        : search(indexed, by, afterOutliers(searched, figures, by), new double[] {0.5}, maxGroups, MARGIN, k);
    Map<List<String>, Row> modeRows = new HashMap<>();
    if (!modes.isEmpty()) {
      List<Column> aggs = afterOutliers(modes, figures, by).stream()
          .map(v -> functions.call_function("mode", v, lit(true)).cast("double")).toList();
      for (Row r : grouped(indexed, by, aggs, maxGroups)) {
        modeRows.put(key(r, by.size()), r);
      }
    }
    for (ColumnPlan cp : cols) {
      boolean mode = cp.missing().strategy().equals("mode");
      int j = mode ? modes.indexOf(cp) : searched.indexOf(cp);
      List<GroupFigures.Group> groups = figures.get(cp.name());
      for (int i = 0; i < groups.size(); i++) {
        GroupFigures.Group g = groups.get(i);
        if (g.fallback() != null || g.fill() != null) {
          continue;
        }
        double fill;
        if (mode) {
          Row r = modeRows.get(g.key());
          fill = r == null || r.isNullAt(by.size() + j) ? Double.NaN : r.getDouble(by.size() + j);
        } else {
          Stats s = measured.containsKey(g.key()) ? measured.get(g.key())[j] : null;
          fill = s == null ? Double.NaN : cp.missing().strategy().equals("mean") ? s.mean() : s.quantiles()[0];
        }
        groups.set(i, GroupPlanner.withFill(g, fill));
      }
    }
  }

  /** Each column's values after its group's own outlier step (rows need the group index). */
  private static List<Column> afterOutliers(List<ColumnPlan> cols, Map<String, List<GroupFigures.Group>> figures,
      List<String> by) {
    return cols.stream()
        .map(cp -> Treatments.afterOutliers(cp.withGroups(new GroupFigures(by, METHOD, 0, figures.get(cp.name())))))
        .toList();
  }

  /**
   * Count, mean, standard deviation and the exact type 7 quantiles {@code ps} of each value
   * expression (nulls left out) in every group, ordered by group key.
   */
  static Map<List<String>, Stats[]> search(Dataset<Row> data, List<String> by, List<Column> values, double[] ps,
      int maxGroups) {
    return search(data, by, values, ps, maxGroups, MARGIN, K);
  }

  /**
   * The smallest sketch size from {@value #K} up whose windows are expected to hold at most
   * {@code maxHeld} values for {@code quantiles} quantiles of {@code rows} rows ({@value #MAX_K} at
   * most).
   */
  static int sketchSize(long rows, int quantiles, int maxHeld) {
    int k = K;
    while (k < MAX_K && 2 * MARGIN * KllSketch.getNormalizedRankError(k, false) * rows * quantiles > maxHeld) {
      k = Math.min(MAX_K, 2 * k);
    }
    return k;
  }

  /**
   * {@link #search} with brackets of {@code margin} times the rank error of a sketch of size
   * {@code k} (tests: margin 0).
   */
  static Map<List<String>, Stats[]> search(Dataset<Row> data, List<String> by, List<Column> values, double[] ps,
      int maxGroups, double margin, int sketch) {
    double eps = margin * KllSketch.getNormalizedRankError(sketch, false);
    double[] ranks = new double[2 * ps.length];
    for (int k = 0; k < ps.length; k++) {
      ranks[2 * k] = Math.max(0, ps[k] - eps);
      ranks[2 * k + 1] = Math.min(1, ps[k] + eps);
    }
    Column rankArray = functions.array(Arrays.stream(ranks).mapToObj(functions::lit).toArray(Column[]::new));
    List<Column> aggs = new ArrayList<>();
    for (Column v : values) {
      aggs.add(count(v));
      aggs.add(avg(v));
      aggs.add(stddev_samp(v));
      aggs.add(when(count(v).gt(0),
          functions.call_function("kll_sketch_get_quantile_double", functions.call_function("kll_sketch_agg_double", v, lit(sketch)), rankArray)));
    }
    int keys = by.size();
    Map<List<String>, long[]> counts = new LinkedHashMap<>();
    Map<List<String>, double[][]> brackets = new LinkedHashMap<>();
    Map<List<String>, Stats[]> out = new LinkedHashMap<>();
    for (Row r : grouped(data, by, aggs, maxGroups)) {
      List<String> key = key(r, keys);
      long[] n = new long[values.size()];
      double[][] b = new double[values.size()][];
      Stats[] stats = new Stats[values.size()];
      for (int j = 0; j < values.size(); j++) {
        int at = keys + 4 * j;
        n[j] = r.getLong(at);
        b[j] = r.isNullAt(at + 3) ? null : r.getList(at + 3).stream().mapToDouble(x -> ((Number) x).doubleValue()).toArray();
        stats[j] = new Stats(n[j], r.isNullAt(at + 1) ? Double.NaN : r.getDouble(at + 1),
            r.isNullAt(at + 2) ? Double.NaN : r.getDouble(at + 2), new double[ps.length]);
        Arrays.fill(stats[j].quantiles(), Double.NaN);
      }
      counts.put(key, n);
      brackets.put(key, b);
      out.put(key, stats);
    }
    // Each pending (group, value, quantile) is read off a window; a missed one is searched again, wider.
    for (int attempt = 0; attempt < 3; attempt++) {
      boolean pending = windows(data, by, values, ps, counts, brackets, out, maxGroups);
      if (!pending) {
        return out;
      }
      for (double[][] b : brackets.values()) {
        for (int j = 0; j < b.length; j++) {
          if (b[j] != null) {
            for (int k = 0; k < ps.length; k++) {
              // Wider each time; the last time, every value.
              double width = attempt == 1 ? Double.POSITIVE_INFINITY : 8 * (b[j][2 * k + 1] - b[j][2 * k]) + 1;
              b[j][2 * k] = b[j][2 * k] - width;
              b[j][2 * k + 1] = b[j][2 * k + 1] + width;
            }
          }
        }
      }
    }
    throw new SluiceException(SluiceException.Kind.INTERNAL, "The exact search for group quartiles did not converge");
  }

  /**
   * Per group, value and quantile, the count of values below the bracket and the values inside it
   * (two grouped aggregates); fills in every quantile its window holds. True when some are left.
   */
  private static boolean windows(Dataset<Row> data, List<String> by, List<Column> values, double[] ps,
      Map<List<String>, long[]> counts, Map<List<String>, double[][]> brackets, Map<List<String>, Stats[]> out,
      int maxGroups) {
    List<List<String>> keys = new ArrayList<>(out.keySet());
    List<GroupFigures.Group> groups = keys.stream().map(k -> new GroupFigures.Group(k, 0, null, null, null, null)).toList();
    Column index = Treatments.groupIndex(new GroupFigures(by, METHOD, 0, groups));
    Dataset<Row> indexed = data.withColumn(KEY + "index", index);
    List<Column> belowAggs = new ArrayList<>();
    List<Column> windowAggs = new ArrayList<>();
    Column anyInside = lit(false);
    List<int[]> asked = new ArrayList<>();
    for (int j = 0; j < values.size(); j++) {
      for (int k = 0; k < ps.length; k++) {
        List<Column> lows = new ArrayList<>(List.of(lit(Double.POSITIVE_INFINITY)));
        List<Column> highs = new ArrayList<>(List.of(lit(Double.NEGATIVE_INFINITY)));
        boolean any = false;
        for (List<String> key : keys) {
          double[] b = brackets.get(key)[j];
          boolean open = b != null && Double.isNaN(out.get(key)[j].quantiles()[k]);
          any |= open;
          lows.add(lit(open ? b[2 * k] : Double.POSITIVE_INFINITY));
          highs.add(lit(open ? b[2 * k + 1] : Double.NEGATIVE_INFINITY));
        }
        if (!any) {
          continue;
        }
        Column at = functions.col(KEY + "index").plus(1);
        Column lo = functions.element_at(functions.array(lows.toArray(new Column[0])), at);
        Column hi = functions.element_at(functions.array(highs.toArray(new Column[0])), at);
        Column v = values.get(j);
        Column inside = v.geq(lo).and(v.leq(hi));
        belowAggs.add(sum(when(v.lt(lo), 1L).otherwise(0L)));
        windowAggs.add(functions.collect_list(when(inside, v)));
        anyInside = anyInside.or(functions.coalesce(inside, lit(false)));
        asked.add(new int[] {j, k});
      }
    }
    if (asked.isEmpty()) {
      return false;
    }
    // The counts below are one code-generated aggregate over every row; the values inside the
    // windows, a slower collecting aggregate, only see the few rows that have one.
    Map<List<String>, Row> below = new HashMap<>();
    for (Row r : grouped(indexed, by, belowAggs, maxGroups)) {
      below.put(key(r, by.size()), r);
    }
    Map<List<String>, Row> inside = new HashMap<>();
    for (Row r : grouped(indexed.filter(anyInside), by, windowAggs, maxGroups)) {
      inside.put(key(r, by.size()), r);
    }
    boolean left = false;
    for (List<String> key : keys) {
      for (int a = 0; a < asked.size(); a++) {
        int j = asked.get(a)[0];
        int k = asked.get(a)[1];
        Stats s = out.get(key)[j];
        if (brackets.get(key)[j] == null || !Double.isNaN(s.quantiles()[k])) {
          continue;
        }
        Row b = below.get(key);
        Row w = inside.get(key);
        long n = b == null || b.isNullAt(by.size() + a) ? 0 : b.getLong(by.size() + a);
        double[] window = w == null ? new double[0]
            : w.getList(by.size() + a).stream().mapToDouble(x -> ((Number) x).doubleValue()).sorted().toArray();
        s.quantiles()[k] = Quantiles.type7InWindow(counts.get(key)[j], ps[k], n, window);
        left |= Double.isNaN(s.quantiles()[k]);
      }
    }
    return left;
  }

  /**
   * One grouped aggregate: the rows of at most {@code maxGroups} groups, ordered by key (the key
   * columns first, as text), collected to the driver; more groups are refused.
   */
  private static List<Row> grouped(Dataset<Row> data, List<String> by, List<Column> aggs, int maxGroups) {
    Column[] keys = new Column[by.size()];
    for (int i = 0; i < keys.length; i++) {
      keys[i] = Names.col(by.get(i)).cast("string").alias(KEY + i);
    }
    List<Row> rows = data.groupBy(keys).agg(aggs.get(0), aggs.subList(1, aggs.size()).toArray(new Column[0]))
        .limit(maxGroups + 1).collectAsList();
    if (rows.size() > maxGroups) {
      throw SluiceException.usage("The table has more than " + maxGroups + " groups of " + String.join(", ", by)
          + " (groups.max-groups); group by fewer or coarser columns, or raise the limit");
    }
    List<Row> sorted = new ArrayList<>(rows);
    sorted.sort(Comparator.comparing(r -> key(r, by.size()), GroupMeasures::compareKeys));
    return sorted;
  }

  private static List<String> key(Row r, int keys) {
    String[] k = new String[keys];
    for (int i = 0; i < keys; i++) {
      k[i] = r.isNullAt(i) ? null : r.getString(i);
    }
    return Arrays.asList(k);
  }

  /** True where the row belongs to the group with this key (a null key value matches a null). */
  static Column inGroup(List<String> by, List<String> key) {
    Column c = null;
    for (int i = 0; i < by.size(); i++) {
      Column eq = Names.col(by.get(i)).cast("string").eqNullSafe(lit(key.get(i)).cast("string"));
      c = c == null ? eq : c.and(eq);
    }
    return c;
  }
}
