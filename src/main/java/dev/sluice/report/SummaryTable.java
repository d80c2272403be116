package dev.sluice.report;

import dev.sluice.plan.ColumnPlan;
import dev.sluice.plan.MissingPlan;
import dev.sluice.plan.OutlierPlan;
import dev.sluice.plan.Plan;
import dev.sluice.plan.TreatedStats;
import dev.sluice.profile.ColumnProfile;
import dev.sluice.profile.TableProfile;
import dev.sluice.stats.FilledMoments;
import dev.sluice.stats.Published;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * The quality summary: one row per column with its profile before treatment, what the treatment
 * did, and its figures after treatment (in original units, before scaling).
 *
 * <p>Rows are ordered maps from column name to a Long, Double, Boolean or String value (null when
 * not applicable), so the same rows feed the Parquet table, the CSV file and the report.
 */
public final class SummaryTable {
  /** The summary's columns, in order, with their types. */
  public static final Map<String, Class<?>> COLUMNS = columns();

  private SummaryTable() {}

  private static Map<String, Class<?>> columns() {
    Map<String, Class<?>> c = new LinkedHashMap<>();
    String[] text = {"column", "type", "kind", "role"};
    for (String t : text) {
      c.put(t, String.class);
    }
    for (String n : new String[] {"rows", "nulls"}) {
      c.put(n, Long.class);
    }
    c.put("null_rate", Double.class);
    for (String n : new String[] {"nan", "infinite", "invalid", "usable"}) {
      c.put(n, Long.class);
    }
    for (String n : new String[] {"min", "q1", "median", "q3", "max", "iqr", "lower_fence",
        "upper_fence"}) {
      c.put(n, Double.class);
    }
    c.put("below_fence", Long.class);
    c.put("above_fence", Long.class);
    c.put("lower_outer_fence", Double.class);
    c.put("upper_outer_fence", Double.class);
    c.put("below_outer_fence", Long.class);
    c.put("above_outer_fence", Long.class);
    c.put("mean", Double.class);
    c.put("stddev", Double.class);
    c.put("mad", Double.class);
    c.put("quantile_method", String.class);
    c.put("rank_error", Double.class);
    c.put("distinct_approx", Long.class);
    c.put("top_value", String.class);
    c.put("top_count", Long.class);
    c.put("earliest", String.class);
    c.put("latest", String.class);
    c.put("valid_min", Double.class);
    c.put("valid_max", Double.class);
    c.put("outlier_method", String.class);
    c.put("outlier_direction", String.class);
    c.put("outlier_action", String.class);
    c.put("action_lower", Double.class);
    c.put("action_upper", Double.class);
    for (String n : new String[] {"values_capped", "values_set_missing", "values_flagged",
        "missing_after_outliers"}) {
      c.put(n, Long.class);
    }
    c.put("imputation", String.class);
    c.put("fill_value", String.class);
    c.put("values_filled", Long.class);
    c.put("rows_to_quarantine", Boolean.class);
    c.put("scaling", String.class);
    c.put("scale_centre", Double.class);
    c.put("scale_factor", Double.class);
    for (String n : new String[] {"mean_treated", "stddev_treated", "min_treated", "max_treated",
        "vif"}) {
      c.put(n, Double.class);
    }
    c.put("in_output", Boolean.class);
    c.put("notes", String.class);
    return java.util.Collections.unmodifiableMap(c);
  }

  public static List<Map<String, Object>> rows(TableProfile profile, Plan plan, TreatedStats stats) {
    List<Map<String, Object>> out = new ArrayList<>();
    for (ColumnProfile c : profile.columns()) {
      ColumnPlan cp = plan.column(c.name()).orElseThrow();
      TreatedStats.ColumnStats t = stats.columns().get(c.name());
      Map<String, Object> r = row(c, cp, t, plan);
      r.replaceAll((k, v) -> v instanceof Double d ? Published.round(d) : v);
      out.add(r);
    }
    return out;
  }

  private static Map<String, Object> row(
      ColumnProfile c, ColumnPlan cp, TreatedStats.ColumnStats t, Plan plan) {
    Map<String, Object> r = new LinkedHashMap<>();
    r.put("column", c.name());
    r.put("type", c.type());
    r.put("kind", cp.kind());
    r.put("role", cp.role());
    r.put("rows", c.rows());
    r.put("nulls", c.nulls());
    r.put("null_rate", num(c.nullRate()));
    boolean numeric = c.measured();
    r.put("nan", numeric ? c.nan() : null);
    r.put("infinite", numeric ? c.infinite() : null);
    r.put("invalid", numeric ? c.invalid() : null);
    r.put("usable", numeric ? c.usable() : null);
    r.put("min", num(c.min()));
    r.put("q1", num(c.q1()));
    r.put("median", num(c.median()));
    r.put("q3", num(c.q3()));
    r.put("max", num(c.max()));
    r.put("iqr", num(c.iqr()));
    OutlierPlan o = cp.outliers();
    r.put("lower_fence", o.innerLower());
    r.put("upper_fence", o.innerUpper());
    r.put("below_fence", t == null ? null : t.belowInner());
    r.put("above_fence", t == null ? null : t.aboveInner());
    r.put("lower_outer_fence", o.outerLower());
    r.put("upper_outer_fence", o.outerUpper());
    r.put("below_outer_fence", t == null ? null : t.belowOuter());
    r.put("above_outer_fence", t == null ? null : t.aboveOuter());
    r.put("mean", num(c.mean()));
    r.put("stddev", num(c.stddev()));
    r.put("mad", num(c.mad()));
    r.put("quantile_method", c.quantileMethod());
    r.put("rank_error", num(c.rankError()));
    r.put("distinct_approx", c.distinct() < 0 ? null : c.distinct());
    r.put("top_value", c.topValue());
    r.put("top_count", c.topValue() == null ? null : c.topCount());
    r.put("earliest", c.minText());
    r.put("latest", c.maxText());
    r.put("valid_min", cp.validMin());
    r.put("valid_max", cp.validMax());
    treatment(r, c, cp, t);
    r.put("vif", vifOf(plan, c.name()));
    r.put("in_output", cp.kept());
    r.put("notes", notes(cp));
    return r;
  }

  private static void treatment(
      Map<String, Object> r, ColumnProfile c, ColumnPlan cp, TreatedStats.ColumnStats t) {
    OutlierPlan o = cp.outliers();
    r.put("outlier_method", cp.treated() && t != null ? o.method() : null);
    r.put("outlier_direction", cp.treated() && t != null ? o.direction() : null);
    r.put("outlier_action", cp.treated() && t != null ? o.action() : null);
    r.put("action_lower", o.lower());
    r.put("action_upper", o.upper());
    long beyond = t == null ? 0 : t.belowLimit() + t.aboveLimit();
    r.put("values_capped", t == null ? null : o.action().equals("cap") ? beyond : 0L);
    r.put("values_set_missing", t == null ? null : o.action().equals("set-missing") ? beyond : 0L);
    r.put("values_flagged", t == null ? null : o.action().equals("flag") ? beyond : 0L);
    long missingAfter = t == null ? c.nulls() : c.rows() - t.present();
    r.put("missing_after_outliers", cp.treated() ? missingAfter : null);
    MissingPlan m = cp.missing();
    r.put("imputation", cp.treated() ? m.strategy() : null);
    r.put("fill_value", m.fillNumber() != null ? String.valueOf(m.fillNumber()) : m.fillText());
    r.put("values_filled", cp.treated() ? (m.fills() && cp.kept() ? missingAfter : 0L) : null);
    r.put("rows_to_quarantine", cp.treated() ? m.quarantine() : null);
    r.put("scaling", cp.treated() ? cp.scaling().method() : null);
    r.put("scale_centre", cp.scaling().active() ? cp.scaling().centre() : null);
    r.put("scale_factor", cp.scaling().active() ? cp.scaling().scale() : null);
    FilledMoments after = afterTreatment(c, cp, t);
    r.put("mean_treated", after == null ? null : num(after.mean()));
    r.put("stddev_treated", after == null ? null : num(after.stddev()));
    r.put("min_treated", after == null ? null : num(after.min()));
    r.put("max_treated", after == null ? null : num(after.max()));
  }

  /** Moments of the treated values before scaling; exact, with filled values counted in. */
  static FilledMoments afterTreatment(ColumnProfile c, ColumnPlan cp, TreatedStats.ColumnStats t) {
    if (t == null || !cp.kept()) {
      return null;
    }
    return FilledMoments.of(t.present(), t.mean(), t.stddev(), t.min(), t.max(),
        cp.missing().fillNumber(), c.rows() - t.present());
  }

  private static Double vifOf(Plan plan, String column) {
    int i = plan.collinearity().columns().indexOf(column);
    return i < 0 ? null : plan.collinearity().vif().get(i);
  }

  private static String notes(ColumnPlan cp) {
    List<String> parts = new ArrayList<>();
    if (cp.treated()) {
      parts.add("outliers: " + cp.outliers().reason());
    }
    parts.add("missing: " + cp.missing().reason());
    if (cp.scaling().active()) {
      parts.add("scaling: " + cp.scaling().reason());
    }
    if (!cp.kept()) {
      parts.add("dropped: " + cp.dropReason());
    }
    if (cp.groups() != null) {
      parts.add("groups by " + String.join(", ", cp.groups().by()) + ": " + cp.groups().own() + " of "
          + cp.groups().groups().size() + " groups with limits and fill values of their own (plan.json);"
          + " this row's counts and figures after treatment are for the table-wide limits and fill value");
    }
    return String.join("; ", parts);
  }

  /** A figure as published: NaN (none) and infinite (beyond the double range) become null. */
  private static Double num(double d) {
    return Double.isFinite(d) ? d : null;
  }
}
