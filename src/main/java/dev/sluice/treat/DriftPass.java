package dev.sluice.treat;

import static org.apache.spark.sql.functions.count;
import static org.apache.spark.sql.functions.lit;
import static org.apache.spark.sql.functions.sum;
import static org.apache.spark.sql.functions.when;

import dev.sluice.io.Names;
import dev.sluice.plan.ColumnPlan;
import dev.sluice.plan.FitFigures;
import dev.sluice.plan.GateCheck;
import dev.sluice.plan.Plan;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.functions;

/**
 * How far a table has moved from the one a saved plan was fitted on, per column, in one aggregate
 * pass: the null rate, the share of usable values beyond the plan's limits, and the population
 * stability index over the four bins between the plan's quartiles,
 *
 * <pre>PSI = sum over bins of (now - fit) * ln(now / fit)</pre>
 *
 * with each share floored at 0.0001 so that an empty bin does not give an infinite index (common
 * practice). Rule of thumb (common practice): under 0.1 little change, 0.1 to 0.25 some, over
 * 0.25 a marked shift.
 */
public final class DriftPass {
  /** The floor of a bin's share in the index. */
  static final double FLOOR = 1e-4;

  private DriftPass() {}

  /**
   * One column's drift; a figure is NaN where it cannot be told (no values now, or no fit-time
   * figure to compare with).
   */
  public record Drift(String column, double nullRateFit, double nullRateNow, double beyondShareFit,
      double beyondShareNow, double psi) {}

  /**
   * What one pass measured.
   *
   * @param rows the rows of the table, counted by the same pass; empty when there was nothing to
   *     measure and so no pass
   * @param columns the drift of every column the plan has fit-time figures for, in plan order
   */
  public record Measured(java.util.OptionalLong rows, List<Drift> columns, java.util.Optional<NewGroups> newGroups) {}

  /**
   * Rows of groups that a group-wise plan never saw at fit time: they take the table-wide limits
   * and fill values.
   *
   * @param groups how many such groups, approximately (HyperLogLog, Spark's approx_count_distinct)
   */
  public record NewGroups(List<String> by, long rows, long groups) {}

  public static Measured measure(Dataset<Row> data, Plan plan) {
    List<ColumnPlan> cols = new ArrayList<>();
    List<Column> aggs = new ArrayList<>();
    java.util.Set<String> present = new java.util.HashSet<>(List.of(data.columns()));
    for (ColumnPlan cp : plan.columns()) {
      FitFigures f = plan.fitted().get(cp.name());
      if (f == null || !present.contains(cp.name())) {
        continue;
      }
      cols.add(cp);
      aggs.add(sum(when(Names.col(cp.name()).isNull(), 1L).otherwise(0L)));
      if (!f.binEdges().isEmpty()) {
        Column v = Treatments.valid(cp.name(), cp.validMin(), cp.validMax());
        aggs.add(count(v));
        for (double edge : f.binEdges()) {
          aggs.add(sum(when(v.lt(lit(edge)), 1L).otherwise(0L)));
        }
        // Beyond the table-wide limits, as at fit time, also for a column with group-wise limits.
        aggs.add(sum(when(Treatments.beyond(v, cp.withGroups(null)), 1L).otherwise(0L)));
      }
    }
    // Rows outside every group of the plan: group index 0, the same test as the treatment's.
    java.util.Optional<dev.sluice.plan.GroupFigures> grouped = Treatments.groups(plan);
    int groupsAt = aggs.size() + 1;
    if (grouped.isPresent()) {
      Column seen = Treatments.groupIndex(grouped.get()).notEqual(0);
      Column key = functions.struct(grouped.get().by().stream().map(Names::col).toArray(Column[]::new));
      aggs.add(sum(when(functions.not(seen), 1L).otherwise(0L)));
      aggs.add(functions.approx_count_distinct(when(functions.not(seen), key)));
    }
    if (aggs.isEmpty()) {
      return new Measured(java.util.OptionalLong.empty(), List.of(), java.util.Optional.empty());
    }
    Row r = data.agg(count(lit(1)), aggs.toArray(new Column[0])).first();
    long rows = r.getLong(0);
    List<Drift> out = new ArrayList<>();
    int at = 1;
    for (ColumnPlan cp : cols) {
      FitFigures f = plan.fitted().get(cp.name());
      double nullNow = rows == 0 ? Double.NaN : (double) value(r, at++) / rows;
      double beyondNow = Double.NaN;
      double psi = Double.NaN;
      if (!f.binEdges().isEmpty()) {
        long usable = value(r, at++);
        long[] below = new long[f.binEdges().size()];
        for (int k = 0; k < below.length; k++) {
          below[k] = value(r, at++);
        }
        long beyond = value(r, at++);
        if (usable > 0) {
          beyondNow = cp.outliers().active() ? (double) beyond / usable : Double.NaN;
          if (f.binShares() != null) {
            psi = psi(f.binShares(), shares(below, usable));
          }
        }
      }
      out.add(new Drift(cp.name(), f.nullRate(), nullNow,
          f.beyondShare() == null ? Double.NaN : f.beyondShare(), beyondNow, psi));
    }
    java.util.Optional<NewGroups> fresh = grouped.map(g -> new NewGroups(g.by(), value(r, groupsAt), value(r, groupsAt + 1)));
    return new Measured(java.util.OptionalLong.of(rows), out, fresh);
  }

  private static long value(Row r, int i) {
    return r.isNullAt(i) ? 0 : r.getLong(i);
  }

  /** Shares of the bins from the counts below each edge. */
  static double[] shares(long[] below, long usable) {
    double[] s = new double[below.length + 1];
    long before = 0;
    for (int k = 0; k < below.length; k++) {
      s[k] = (double) (below[k] - before) / usable;
      before = below[k];
    }
    s[below.length] = (double) (usable - before) / usable;
    return s;
  }

  /** The population stability index of {@code now} against {@code fit}, shares floored at {@link #FLOOR}. */
  static double psi(List<Double> fit, double[] now) {
    double total = 0;
    for (int k = 0; k < now.length; k++) {
      double e = Math.max(FLOOR, fit.get(k));
      double a = Math.max(FLOOR, now[k]);
      total += (a - e) * Math.log(a / e);
    }
    return total;
  }

  /** What the gates check of each column: the figures measured now. */
  public static List<GateCheck.Reading> readings(List<Drift> drift) {
    return drift.stream()
        .map(d -> new GateCheck.Reading(d.column(), d.nullRateNow(), d.beyondShareNow(), d.psi()))
        .toList();
  }

  /**
   * The drift figures as rows of a small table (treat's summary, and run.json), each with the
   * column's gate limits that were passed (empty when none).
   */
  public static List<Map<String, Object>> rows(List<Drift> drift, List<GateCheck.Breach> breaches) {
    List<Map<String, Object>> out = new ArrayList<>();
    for (Drift d : drift) {
      Map<String, Object> m = new LinkedHashMap<>();
      m.put("column", d.column());
      m.put("null_rate_fit", finite(d.nullRateFit()));
      m.put("null_rate_now", finite(d.nullRateNow()));
      m.put("beyond_share_fit", finite(d.beyondShareFit()));
      m.put("beyond_share_now", finite(d.beyondShareNow()));
      m.put("psi", finite(d.psi()));
      m.put("limits_passed", String.join(", ", breaches.stream()
          .filter(b -> d.column().equals(b.column())).map(GateCheck.Breach::limit).toList()));
      out.add(m);
    }
    return out;
  }

  /** Columns of {@link #rows}. */
  public static final Map<String, Class<?>> COLUMNS = columns();

  private static Map<String, Class<?>> columns() {
    Map<String, Class<?>> c = new LinkedHashMap<>();
    c.put("column", String.class);
    for (String k : List.of("null_rate_fit", "null_rate_now", "beyond_share_fit", "beyond_share_now", "psi")) {
      c.put(k, Double.class);
    }
    c.put("limits_passed", String.class);
    return c;
  }

  private static Double finite(double v) {
    return Double.isFinite(v) ? dev.sluice.stats.Published.round(v) : null;
  }
}
