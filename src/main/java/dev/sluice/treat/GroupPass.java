package dev.sluice.treat;

import static org.apache.spark.sql.functions.avg;
import static org.apache.spark.sql.functions.count;
import static org.apache.spark.sql.functions.lit;
import static org.apache.spark.sql.functions.percentile_approx;
import static org.apache.spark.sql.functions.stddev_samp;

import dev.sluice.SluiceException;
import dev.sluice.config.Settings;
import dev.sluice.io.Names;
import dev.sluice.plan.ColumnPlan;
import dev.sluice.plan.GroupFigures;
import dev.sluice.plan.GroupPlanner;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Comparator;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.functions;

/**
 * Group-wise limits and fill values: one grouped aggregate over every group-wise column gives each
 * group's count, quartiles, mean and standard deviation of the usable values; a second one, only
 * when a fill value does not follow from the first (a mean after capping, any figure after values
 * are removed), measures the values after the group's own outlier step. Quartiles and medians
 * come from Spark's {@code percentile_approx} at accuracy {@value #ACCURACY} (normalized rank
 * error at most 1 / accuracy; an actual value of the group, no interpolation).
 */
public final class GroupPass {
  /** Accuracy of percentile_approx for the group quartiles. */
  static final int ACCURACY = 10_000;
  static final String METHOD = "spark-percentile-approx";
  private static final String KEY = "_sluice_group_";

  private GroupPass() {}

  /** The plan's columns with their group-wise figures; unchanged when groups.by is empty. */
  public static List<ColumnPlan> fit(Dataset<Row> data, List<ColumnPlan> columns, Settings settings) {
    List<String> by = settings.groups().by();
    List<ColumnPlan> grouped = columns.stream().filter(GroupPass::grouped).toList();
    if (by.isEmpty() || grouped.isEmpty()) {
      return columns;
    }
    List<Column> aggs = new ArrayList<>();
    for (ColumnPlan cp : grouped) {
      Column v = Treatments.valid(cp.name(), cp.validMin(), cp.validMax());
      aggs.add(count(v));
      aggs.add(percentile_approx(v, functions.array(lit(0.25), lit(0.5), lit(0.75)), lit(ACCURACY)));
      aggs.add(avg(v));
      aggs.add(stddev_samp(v));
    }
    List<Row> first = grouped(data, by, aggs, settings.groups().maxGroups());
    Map<String, List<GroupFigures.Group>> figures = new HashMap<>();
    Map<String, List<GroupPlanner.Measured>> measured = new HashMap<>();
    List<ColumnPlan> second = new ArrayList<>();
    for (int j = 0; j < grouped.size(); j++) {
      ColumnPlan cp = grouped.get(j);
      List<GroupFigures.Group> groups = new ArrayList<>();
      List<GroupPlanner.Measured> ms = new ArrayList<>();
      boolean needsSecond = false;
      for (Row r : first) {
        GroupPlanner.Measured m = measured(r, by.size(), j);
        GroupFigures.Group g = GroupPlanner.limits(cp, settings.column(cp.name()).outliers(), m,
            settings.groups().minValues());
        if (g.fallback() == null && GroupPlanner.groupsFill(cp)) {
          double fill = GroupPlanner.fillFromFirst(cp, g, m);
          needsSecond |= Double.isNaN(fill);
          g = GroupPlanner.withFill(g, fill);
        }
        groups.add(g);
        ms.add(m);
      }
      figures.put(cp.name(), groups);
      measured.put(cp.name(), ms);
      if (needsSecond) {
        second.add(cp);
      }
    }
    if (!second.isEmpty()) {
      secondPass(data, by, second, figures, measured, settings.groups().maxGroups());
    }
    List<ColumnPlan> out = new ArrayList<>();
    for (ColumnPlan cp : columns) {
      List<GroupFigures.Group> groups = figures.get(cp.name());
      out.add(groups == null ? cp : cp.withGroups(new GroupFigures(by, METHOD, 1.0 / ACCURACY, groups)));
    }
    return out;
  }

  /** Whether a column is treated group by group: kept, numeric, with group-wise limits or fill. */
  public static boolean grouped(ColumnPlan cp) {
    return cp.treated() && cp.kept() && cp.kind().equals("numeric")
        && (GroupPlanner.groupsLimits(cp) || GroupPlanner.groupsFill(cp));
  }

  /** The fill values that needed the values after each group's own outlier step. */
  private static void secondPass(Dataset<Row> data, List<String> by, List<ColumnPlan> cols,
      Map<String, List<GroupFigures.Group>> figures, Map<String, List<GroupPlanner.Measured>> measured, int maxGroups) {
    List<Column> aggs = new ArrayList<>();
    GroupFigures any = new GroupFigures(by, METHOD, 0, figures.get(cols.get(0).name()));
    Dataset<Row> indexed = data.withColumn(Treatments.GROUP_INDEX, Treatments.groupIndex(any));
    for (ColumnPlan cp : cols) {
      Column after = Treatments.afterOutliers(cp.withGroups(new GroupFigures(by, METHOD, 0, figures.get(cp.name()))));
      aggs.add(cp.missing().strategy().equals("mean") ? avg(after)
          : percentile_approx(after, lit(0.5), lit(ACCURACY)));
    }
    Map<List<String>, Row> byKey = new HashMap<>();
    for (Row r : grouped(indexed, by, aggs, maxGroups)) {
      byKey.put(key(r, by.size()), r);
    }
    for (int j = 0; j < cols.size(); j++) {
      ColumnPlan cp = cols.get(j);
      List<GroupFigures.Group> groups = figures.get(cp.name());
      for (int i = 0; i < groups.size(); i++) {
        GroupFigures.Group g = groups.get(i);
        if (g.fallback() != null || g.fill() != null) {
          continue;
        }
        Row r = byKey.get(g.key());
        int at = by.size() + j;
        double fill = r == null || r.isNullAt(at) ? Double.NaN : ((Number) r.get(at)).doubleValue();
        groups.set(i, GroupPlanner.withFill(g, fill));
      }
    }
  }

  /**
   * One grouped aggregate: the rows of at most {@code maxGroups} groups, ordered by key (the key
   * columns first, as text), collected to the driver; more groups are refused.
   */
  private static List<Row> grouped(Dataset<Row> data, List<String> by, List<Column> aggs, int maxGroups) {
    Column[] keys = by.stream().map(b -> Names.col(b).cast("string").alias(KEY + by.indexOf(b))).toArray(Column[]::new);
    List<Row> rows = data.groupBy(keys).agg(aggs.get(0), aggs.subList(1, aggs.size()).toArray(new Column[0]))
        .limit(maxGroups + 1).collectAsList();
    if (rows.size() > maxGroups) {
      throw SluiceException.usage("The table has more than " + maxGroups + " groups of " + String.join(", ", by)
          + " (groups.max-groups); group by fewer or coarser columns, or raise the limit");
    }
    List<Row> sorted = new ArrayList<>(rows);
    sorted.sort(Comparator.comparing(r -> key(r, by.size()), GroupPass::compareKeys));
    return sorted;
  }

  private static GroupPlanner.Measured measured(Row r, int keys, int column) {
    int at = keys + 4 * column;
    long usable = r.getLong(at);
    double[] q = {Double.NaN, Double.NaN, Double.NaN};
    if (!r.isNullAt(at + 1)) {
      List<Object> qs = r.getList(at + 1);
      for (int k = 0; k < 3; k++) {
        q[k] = ((Number) qs.get(k)).doubleValue();
      }
    }
    double mean = r.isNullAt(at + 2) ? Double.NaN : r.getDouble(at + 2);
    double sd = r.isNullAt(at + 3) ? Double.NaN : r.getDouble(at + 3);
    return new GroupPlanner.Measured(key(r, keys), usable, q[0], q[1], q[2], mean, sd);
  }

  private static List<String> key(Row r, int keys) {
    String[] k = new String[keys];
    for (int i = 0; i < keys; i++) {
      k[i] = r.isNullAt(i) ? null : r.getString(i);
    }
    return Arrays.asList(k);
  }

  /** Keys in order, a null value first. */
  static int compareKeys(List<String> a, List<String> b) {
    for (int i = 0; i < a.size(); i++) {
      String x = a.get(i);
      String y = b.get(i);
      int c = x == null ? (y == null ? 0 : -1) : y == null ? 1 : x.compareTo(y);
      if (c != 0) {
        return c;
      }
    }
    return 0;
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
