package dev.sluice.plan;

import static dev.sluice.plan.OutlierPlanner.kebab;
import static dev.sluice.plan.OutlierPlanner.lower;

import dev.sluice.SluiceException;
import dev.sluice.config.ColumnSettings;
import dev.sluice.config.ImputeStrategy;
import dev.sluice.config.MissingSettings;
import dev.sluice.config.Role;
import dev.sluice.config.Settings;
import dev.sluice.profile.ColumnKind;
import dev.sluice.profile.ColumnProfile;
import dev.sluice.profile.TableProfile;
import dev.sluice.stats.FilledMoments;
import dev.sluice.stats.Published;
import dev.sluice.stats.Scaling;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * Turns profiles into decisions, in the fixed order of treatment. {@link #outliers} runs after
 * pass 1; {@link #finish} after pass 2, when the statistics of the treated values are known.
 */
public final class Planner {
  private Planner() {}

  /** The outlier limits of every column, from the pass-1 profile. */
  public static Map<String, OutlierPlan> outliers(TableProfile profile, Settings settings) {
    Map<String, OutlierPlan> out = new LinkedHashMap<>();
    for (ColumnProfile c : profile.columns()) {
      out.put(c.name(), OutlierPlanner.plan(c, settings.column(c.name())));
    }
    return out;
  }

  /** The complete plan: missing values, scaling and collinearity from the pass-2 statistics. */
  public static Plan finish(
      TableProfile profile, Settings settings, Map<String, OutlierPlan> outliers, TreatedStats stats) {
    List<ColumnPlan> columns = new ArrayList<>();
    for (ColumnProfile c : profile.columns()) {
      columns.add(column(c, settings.column(c.name()), outliers.get(c.name()), stats, profile.rows()));
    }
    CollinearityFindings findings = CollinearityPlanner.analyse(columns, profile, stats, settings);
    List<ColumnPlan> finalColumns = new ArrayList<>();
    for (ColumnPlan cp : columns) {
      boolean drop = cp.kept() && findings.dropped().contains(cp.name());
      finalColumns.add(drop ? cp.dropped("suggested by the VIF analysis (collinearity.drop = true)") : cp);
    }
    ColumnProfile any = profile.columns().stream().filter(ColumnProfile::measured).findFirst().orElse(null);
    return new Plan(
        Plan.FORMAT_VERSION,
        profile.rows(),
        any == null ? "none" : any.quantileMethod(),
        any == null ? 0.0 : any.rankError(),
        List.copyOf(finalColumns),
        findings,
        fitted(profile, finalColumns, stats),
        Gates.of(settings, finalColumns));
  }

  /** The fit-time figures of every treated column (drift is measured against them). */
  static java.util.SortedMap<String, FitFigures> fitted(TableProfile profile, List<ColumnPlan> columns,
      TreatedStats stats) {
    java.util.SortedMap<String, FitFigures> out = new java.util.TreeMap<>();
    // Each count reads a window's held values: the columns are counted side by side.
    Map<String, long[]> counted = new java.util.concurrent.ConcurrentHashMap<>();
    columns.parallelStream().forEach(cp -> {
      ColumnProfile c = profile.column(cp.name()).orElse(null);
      dev.sluice.stats.RankSearch search = profile.quartiles().get(cp.name());
      if (c != null && cp.treated() && cp.kept() && c.measured() && search != null && c.usable() > 0
          && !Double.isNaN(c.q1())) {
        counted.put(cp.name(),
            new long[] {search.countBelow(c.q1()), search.countBelow(c.median()), search.countBelow(c.q3())});
      }
    });
    for (ColumnPlan cp : columns) {
      ColumnProfile c = profile.column(cp.name()).orElse(null);
      if (c == null || !cp.treated() || !cp.kept()) {
        continue;
      }
      double nullRate = Published.round(c.nullRate());
      if (!c.measured()) {
        out.put(cp.name(), new FitFigures(nullRate, List.of(), null, null));
        continue;
      }
      List<Double> edges = List.of(c.q1(), c.median(), c.q3());
      List<Double> shares = null;
      long[] below = counted.get(cp.name());
      if (below != null) {
        if (below[0] >= 0 && below[1] >= 0 && below[2] >= 0) {
          double n = c.usable();
          shares = List.of(Published.round(below[0] / n), Published.round((below[1] - below[0]) / n),
              Published.round((below[2] - below[1]) / n), Published.round((n - below[2]) / n));
        }
      }
      TreatedStats.ColumnStats t = stats == null ? null : stats.columns().get(cp.name());
      Double beyond = t == null || !cp.outliers().active() || c.usable() == 0 ? null
          : Published.round((double) (t.belowLimit() + t.aboveLimit()) / c.usable());
      out.put(cp.name(), new FitFigures(nullRate, Double.isNaN(c.q1()) ? List.of() : edges, shares, beyond));
    }
    return out;
  }

  private static ColumnPlan column(
      ColumnProfile c, ColumnSettings s, OutlierPlan outliers, TreatedStats stats, long rows) {
    boolean numeric = c.kind() == ColumnKind.NUMERIC;
    boolean treated = c.treated() || (c.kind() == ColumnKind.CATEGORICAL && treats(c.role()));
    Double vMin = numeric && s.validMin().isPresent() ? s.validMin().getAsDouble() : null;
    Double vMax = numeric && s.validMax().isPresent() ? s.validMax().getAsDouble() : null;
    if (!treated) {
      String why = "role " + lower(c.role().name()) + ", " + lower(c.kind().name()) + ": unchanged";
      return new ColumnPlan(c.name(), c.type(), lower(c.kind().name()), lower(c.role().name()), false,
          vMin, vMax, "none", outliers, MissingPlan.untouched(why), ScalingPlan.none(), null, null);
    }
    TreatedStats.ColumnStats t = numeric ? stats.columns().get(c.name()) : null;
    long present = numeric ? t.present() : rows - c.nulls();
    double nullRate = rows == 0 ? 0.0 : (double) (rows - present) / rows;
    String drop = null;
    if (nullRate > s.missing().dropNullRate() && c.role() != Role.REQUIRED) {
      drop = String.format(
          "null rate %.4f after the validity and outlier steps exceeds drop-null-rate %s",
          nullRate, s.missing().dropNullRate());
    }
    MissingPlan missing = numeric ? numericMissing(c, s, t) : categoricalMissing(c, s);
    ScalingPlan scaling = numeric && drop == null ? scaling(s, t, missing, rows) : ScalingPlan.none();
    String invalid = numeric && (vMin != null || vMax != null) ? kebab(s.invalidAction().name()) : "none";
    return new ColumnPlan(c.name(), c.type(), lower(c.kind().name()), lower(c.role().name()), true,
        vMin, vMax, invalid, outliers, missing, scaling, drop, null);
  }

  private static boolean treats(Role role) {
    return role == Role.TREAT || role == Role.REQUIRED;
  }

  private static MissingPlan numericMissing(ColumnProfile c, ColumnSettings s, TreatedStats.ColumnStats t) {
    MissingSettings m = s.missing();
    if (c.role() == Role.REQUIRED) {
      return new MissingPlan(false, "none", null, null, false, true,
          "required column: rows missing it are quarantined");
    }
    double fill;
    switch (m.strategy()) {
      case MEDIAN:
        fill = t.median();
        break;
      case MEAN:
        fill = t.mean();
        break;
      case MODE:
        fill = t.mode();
        break;
      case CONSTANT:
        fill = constantNumber(c.name(), m);
        break;
      default:
        return new MissingPlan(false, "none", null, null, false, false, "missing values left missing");
    }
    String strategy = kebab(m.strategy().name());
    if (!Double.isFinite(fill)) {
      return new MissingPlan(false, strategy, null, null, false, false,
          "no values left to take the " + strategy + " from: missing values left missing");
    }
    return new MissingPlan(false, strategy, Published.round(fill), null, m.indicator(), false,
        strategy + " of the values after the outlier step");
  }

  private static double constantNumber(String column, MissingSettings m) {
    String text = m.constant().orElseThrow();
    try {
      return Double.parseDouble(text.trim());
    } catch (NumberFormatException e) {
      // joinPath quotes the column name only where HOCON needs it, as the other messages do.
      String key = com.typesafe.config.ConfigUtil.joinPath("sluice", "columns", column, "missing", "constant");
      throw SluiceException.usage(
          "Cannot set " + key + " to \"" + text + "\": the column is numeric");
    }
  }

  private static MissingPlan categoricalMissing(ColumnProfile c, ColumnSettings s) {
    MissingSettings m = s.missing();
    if (c.role() == Role.REQUIRED) {
      return new MissingPlan(false, "none", null, null, false, true,
          "required column: rows missing it are quarantined");
    }
    if (m.strategy() == ImputeStrategy.NONE) {
      return MissingPlan.untouched("missing values left missing");
    }
    if (m.strategy() == ImputeStrategy.CONSTANT) {
      return new MissingPlan(false, "constant", null, m.constant().orElseThrow(), m.indicator(), false,
          "configured constant");
    }
    if (c.topValue() == null) {
      return MissingPlan.untouched(c.rows() > c.nulls()
          ? "too many distinct values to count a most frequent one: missing values left missing"
          : "no values to take the mode from: missing values left missing");
    }
    return new MissingPlan(false, "mode", null, c.topValue(), m.indicator(), false,
        "most frequent value (categorical columns are filled with the mode)");
  }

  /**
   * Scaling fitted on the values after imputation. Mean, standard deviation, minimum and maximum
   * account exactly for the filled values; robust scaling uses the median and IQR of the values
   * before filling, so that filling many gaps with the median cannot shrink the IQR to zero.
   */
  private static ScalingPlan scaling(
      ColumnSettings s, TreatedStats.ColumnStats t, MissingPlan missing, long rows) {
    FilledMoments m = FilledMoments.of(
        t.present(), t.mean(), t.stddev(), t.min(), t.max(), missing.fillNumber(), rows - t.present());
    String method = kebab(s.scaling().name());
    Scaling sc;
    switch (s.scaling()) {
      case STANDARD:
        sc = Scaling.standard(m.mean(), m.stddev());
        break;
      case MIN_MAX:
        sc = Scaling.minMax(m.min(), m.max());
        break;
      case MAX_ABS:
        sc = Scaling.maxAbs(m.min(), m.max());
        break;
      case ROBUST:
        sc = Scaling.robust(t.median(), t.q3() - t.q1());
        break;
      default:
        return ScalingPlan.none();
    }
    if (m.count() == 0) {
      return new ScalingPlan("none", 0.0, 1.0, false, "no values to fit " + method + " scaling on");
    }
    String why = sc.zeroSpread()
        ? "zero spread: values are only centred (a constant column becomes 0)"
        : method + " scaling fitted after imputation";
    return new ScalingPlan(method, Published.round(sc.centre()), Published.round(sc.scale()),
        sc.zeroSpread(), why);
  }
}
