package dev.sluice.plan;

import dev.sluice.config.ImputeStrategy;
import dev.sluice.config.OutlierMethod;
import dev.sluice.config.OutlierSettings;
import dev.sluice.stats.Fences;
import java.util.List;

/**
 * Each group's own outlier limits and fill value from what was measured of its values, by the
 * rules of the table-wide plan (same method, k or limit, direction and action). A group with too few
 * usable values, or no spread, takes the table-wide figures, and says why.
 */
public final class GroupPlanner {
  private GroupPlanner() {}

  /**
   * What the grouped aggregate measured of one column's usable values in one group.
   *
   * @param key the group's values of the by columns as text
   * @param mad the median absolute deviation from the group's median (NaN when not measured)
   */
  public record Measured(List<String> key, long usable, double q1, double median, double q3, double mean,
      double stddev, double mad) {
    /** Without the MAD (a column whose limits do not use it). */
    public Measured(List<String> key, long usable, double q1, double median, double q3, double mean, double stddev) {
      this(key, usable, q1, median, q3, mean, stddev, Double.NaN);
    }
  }

  /** Whether a column gets group-wise limits: its table-wide limits come from the IQR, z-score or MAD. */
  public static boolean groupsLimits(ColumnPlan cp) {
    String method = cp.outliers().method();
    return cp.outliers().active() && (method.equals("iqr") || method.equals("zscore") || method.equals("mad"));
  }

  /** Whether a column's group-wise limits need each group's MAD. */
  public static boolean needsMad(ColumnPlan cp) {
    return cp.outliers().active() && cp.outliers().method().equals("mad");
  }

  /** Whether a column gets group-wise fill values: a median, mean or mode fill. */
  public static boolean groupsFill(ColumnPlan cp) {
    String strategy = cp.missing().strategy();
    return cp.missing().fillNumber() != null
        && (strategy.equals("median") || strategy.equals("mean") || strategy.equals("mode"));
  }

  /** The group's limits (fill still to come), or its fallback to the table-wide figures. */
  public static GroupFigures.Group limits(ColumnPlan cp, OutlierSettings o, Measured m, int minValues) {
    if (m.usable() < minValues) {
      return fallback(m, m.usable() + " usable values, fewer than groups.min-values = " + minValues);
    }
    if (!groupsLimits(cp)) {
      return new GroupFigures.Group(m.key(), m.usable(), null, null, null, null);
    }
    Fences f;
    if (o.method() == OutlierMethod.IQR) {
      if (!(m.q3() - m.q1() > 0)) {
        return fallback(m, "IQR is zero in this group");
      }
      f = Fences.tukey(m.q1(), m.q3(), o.iqrK());
    } else if (o.method() == OutlierMethod.MAD) {
      if (!(m.mad() > 0) || !Double.isFinite(m.mad())) {
        return fallback(m, "MAD is zero or undefined in this group");
      }
      f = Fences.modifiedZ(m.median(), m.mad(), o.madLimit());
    } else {
      if (!(m.stddev() > 0) || !Double.isFinite(m.stddev())) {
        return fallback(m, "standard deviation is zero or undefined in this group");
      }
      f = Fences.zScore(m.mean(), m.stddev(), o.zLimit());
    }
    f = f.sides(o.direction().lowSide(), o.direction().highSide());
    return new GroupFigures.Group(m.key(), m.usable(),
        cp.outliers().lower() == null ? null : OutlierPlanner.finiteOrNull(f.lower()),
        cp.outliers().upper() == null ? null : OutlierPlanner.finiteOrNull(f.upper()), null, null);
  }

  private static GroupFigures.Group fallback(Measured m, String why) {
    return new GroupFigures.Group(m.key(), m.usable(), null, null, null, why + ": the table-wide figures apply");
  }

  /**
   * The group's fill value when it follows from the first measurement, else NaN (a second one over
   * the values after the outlier step must measure it). Capping moves no value across the median
   * when the median lies within the limits, and keeping or flagging moves none at all; the mean of
   * capped values, any figure after values are removed, and a mode, need the second measurement.
   */
  public static double fillFromFirst(ColumnPlan cp, GroupFigures.Group g, Measured m) {
    String action = cp.outliers().active() ? cp.outliers().action() : "keep";
    boolean unchanged = action.equals("keep") || action.equals("flag");
    if (cp.missing().strategy().equals(ImputeStrategy.MEAN.name().toLowerCase(java.util.Locale.ROOT))) {
      return unchanged ? m.mean() : Double.NaN;
    }
    if (cp.missing().strategy().equals(ImputeStrategy.MODE.name().toLowerCase(java.util.Locale.ROOT))) {
      return Double.NaN;
    }
    double lower = g.lower() != null ? g.lower() : cp.outliers().lower() != null ? cp.outliers().lower() : Double.NEGATIVE_INFINITY;
    double upper = g.upper() != null ? g.upper() : cp.outliers().upper() != null ? cp.outliers().upper() : Double.POSITIVE_INFINITY;
    boolean capsAroundIt = action.equals("cap") && lower <= m.median() && m.median() <= upper;
    return unchanged || capsAroundIt ? m.median() : Double.NaN;
  }

  /** The group with its fill value. */
  public static GroupFigures.Group withFill(GroupFigures.Group g, double fill) {
    return new GroupFigures.Group(g.key(), g.usable(), g.lower(), g.upper(),
        Double.isFinite(fill) ? OutlierPlanner.finiteOrNull(fill) : null, g.fallback());
  }
}
