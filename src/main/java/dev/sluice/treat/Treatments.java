package dev.sluice.treat;

import static org.apache.spark.sql.functions.coalesce;
import static org.apache.spark.sql.functions.lit;
import static org.apache.spark.sql.functions.when;

import dev.sluice.io.Names;
import dev.sluice.plan.ColumnPlan;
import dev.sluice.plan.GroupFigures;
import dev.sluice.plan.OutlierPlan;
import dev.sluice.profile.ValueExprs;
import java.util.ArrayList;
import java.util.List;
import java.util.OptionalDouble;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.functions;

/**
 * The Catalyst expressions that apply a plan to one column, step by step in the order of
 * treatment. No UDFs: every step is a plain comparison, coalesce or arithmetic expression.
 */
public final class Treatments {
  /** Suffix of the added boolean column marking values beyond the fences (action flag). */
  public static final String OUTLIER_FLAG_SUFFIX = "__outlier";
  /**
   * Working column of a group-wise plan: each row's group index ({@link #groupIndex}), computed
   * once per row and read by every column's limits and fill value.
   */
  public static final String GROUP_INDEX = "_sluice_group_index";
  /** Suffix of the added boolean column marking filled values (missing.indicator). */
  public static final String MISSING_FLAG_SUFFIX = "__missing";

  private Treatments() {}

  /** Step 2: the value as DOUBLE, or null where it is null, NaN, infinite or outside the bounds. */
  public static Column valid(String name, Double validMin, Double validMax) {
    return ValueExprs.usable(ValueExprs.asDouble(name), opt(validMin), opt(validMax));
  }

  /** True where the valid value lies beyond the action's limits (false where it is missing). */
  public static Column beyond(Column v, ColumnPlan cp) {
    Column out = lit(false);
    Column lower = lowerLimit(cp);
    Column upper = upperLimit(cp);
    if (lower != null) {
      out = out.or(v.lt(lower));
    }
    if (upper != null) {
      out = out.or(v.gt(upper));
    }
    return coalesce(out, lit(false));
  }

  /**
   * The lower limit of the outlier step: the plan's number, or, with groups, each group's own
   * (the plan's for a group without figures of its own); null when there is no lower limit.
   */
  public static Column lowerLimit(ColumnPlan cp) {
    return cp.outliers().lower() == null ? null : perGroup(cp, GroupFigures.Group::lower, cp.outliers().lower());
  }

  /** The upper limit of the outlier step, as {@link #lowerLimit}. */
  public static Column upperLimit(ColumnPlan cp) {
    return cp.outliers().upper() == null ? null : perGroup(cp, GroupFigures.Group::upper, cp.outliers().upper());
  }

  /** The fill value of step 4, as {@link #lowerLimit}; null when the column is not filled. */
  public static Column fill(ColumnPlan cp) {
    return cp.missing().fillNumber() == null ? null : perGroup(cp, GroupFigures.Group::fill, cp.missing().fillNumber());
  }

  /**
   * The column's figure for each row's group: {@code element_at(array(tableWide, v1, v2, ...),
   * _sluice_group_index + 1)}, reading the working column that {@link #withGroupIndex} adds; the
   * literal without groups. (Written inline, the index's CASE WHEN would be evaluated again for
   * every limit and fill of every column: three times slower on the benchmark table.)
   */
  private static <T> Column perGroup(ColumnPlan cp, java.util.function.Function<GroupFigures.Group, T> own,
      T tableWide) {
    if (cp.groups() == null || cp.groups().groups().stream().allMatch(g -> own.apply(g) == null)) {
      return lit(tableWide);
    }
    List<Column> values = new ArrayList<>();
    values.add(lit(tableWide));
    for (GroupFigures.Group g : cp.groups().groups()) {
      T v = own.apply(g);
      values.add(lit(v == null ? tableWide : v));
    }
    return functions.element_at(functions.array(values.toArray(new Column[0])), functions.col(GROUP_INDEX).plus(1));
  }

  /** The figures of the plan's group-wise columns (they all list the same groups), if any. */
  public static java.util.Optional<GroupFigures> groups(dev.sluice.plan.Plan plan) {
    return plan.columns().stream().filter(c -> c.groups() != null).map(ColumnPlan::groups).findFirst();
  }

  /** {@code data} with the working column {@link #GROUP_INDEX} when the plan has groups. */
  public static org.apache.spark.sql.Dataset<org.apache.spark.sql.Row> withGroupIndex(
      org.apache.spark.sql.Dataset<org.apache.spark.sql.Row> data, dev.sluice.plan.Plan plan) {
    return groups(plan).map(g -> withGroupIndex(data, g)).orElse(data);
  }

  /** {@code data} with the working column {@link #GROUP_INDEX} of these groups. */
  static org.apache.spark.sql.Dataset<org.apache.spark.sql.Row> withGroupIndex(
      org.apache.spark.sql.Dataset<org.apache.spark.sql.Row> data, GroupFigures groups) {
    return data.withColumn(GROUP_INDEX, groupIndex(groups));
  }

  /** 1 for the first group of the figures, 2 for the second, ...; 0 for a row of no listed group. */
  static Column groupIndex(GroupFigures f) {
    Column out = null;
    int i = 1;
    for (GroupFigures.Group g : f.groups()) {
      Column in = GroupPass.inGroup(f.by(), g.key());
      out = out == null ? when(in, lit(i)) : out.when(in, lit(i));
      i++;
    }
    return out == null ? lit(0) : out.otherwise(lit(0));
  }

  /**
   * Step 3: the valid value after the outlier action: capped, or missing (set-missing and
   * quarantine); flag and keep leave it as it is.
   */
  public static Column afterOutliers(ColumnPlan cp) {
    OutlierPlan o = cp.outliers();
    Column x = ValueExprs.asDouble(cp.name());
    Column valid = ValueExprs.within(x, opt(cp.validMin()), opt(cp.validMax()));
    Column lower = lowerLimit(cp);
    Column upper = upperLimit(cp);
    switch (o.action()) {
      case "cap":
        // x is finite where the condition holds, so greatest and least never meet a null or NaN.
        Column capped = x;
        if (lower != null) {
          capped = functions.greatest(capped, lower);
        }
        if (upper != null) {
          capped = functions.least(capped, upper);
        }
        return when(valid, capped);
      case "set-missing":
      case "quarantine":
        // A quarantined row leaves the treated table: its value counts as missing here.
        Column kept = valid;
        if (lower != null) {
          kept = kept.and(x.geq(lower));
        }
        if (upper != null) {
          kept = kept.and(x.leq(upper));
        }
        return when(kept, x);
      default:
        return when(valid, x);
    }
  }

  /** Steps 2 to 5 for a treated numeric column: valid, outliers, filled, scaled. */
  public static Column numeric(ColumnPlan cp) {
    Column t = afterOutliers(cp);
    Column fill = fill(cp);
    Column u = fill == null ? t : coalesce(t, fill);
    if (cp.scaling().active()) {
      u = u.minus(lit(cp.scaling().centre())).divide(lit(cp.scaling().scale()));
    }
    return u;
  }

  /**
   * Step 4 for a treated categorical column: fill with the plan's text value, or, with groups,
   * each group's own (the plan's for a group without one).
   */
  public static Column categorical(ColumnPlan cp, String sparkType) {
    Column c = Names.col(cp.name());
    String tableWide = cp.missing().fillText();
    if (tableWide == null) {
      return c;
    }
    return coalesce(c, perGroup(cp, GroupFigures.Group::fillText, tableWide).cast(sparkType));
  }

  /** Added column of action flag: true where the valid value lies beyond the limits. */
  public static Column outlierFlag(ColumnPlan cp) {
    return beyond(valid(cp.name(), cp.validMin(), cp.validMax()), cp);
  }

  /** Added column of missing.indicator: true where the step-4 fill was used. */
  public static Column missingFlag(ColumnPlan cp) {
    if (cp.kind().equals("numeric")) {
      return afterOutliers(cp).isNull();
    }
    return Names.col(cp.name()).isNull();
  }

  private static OptionalDouble opt(Double d) {
    return d == null ? OptionalDouble.empty() : OptionalDouble.of(d);
  }
}
