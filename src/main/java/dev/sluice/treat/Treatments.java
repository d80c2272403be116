package dev.sluice.treat;

import static org.apache.spark.sql.functions.coalesce;
import static org.apache.spark.sql.functions.lit;
import static org.apache.spark.sql.functions.when;

import dev.sluice.io.Names;
import dev.sluice.plan.ColumnPlan;
import dev.sluice.plan.OutlierPlan;
import dev.sluice.profile.ValueExprs;
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
  /** Suffix of the added boolean column marking filled values (missing.indicator). */
  public static final String MISSING_FLAG_SUFFIX = "__missing";

  private Treatments() {}

  /** Step 2: the value as DOUBLE, or null where it is null, NaN, infinite or outside the bounds. */
  public static Column valid(String name, Double validMin, Double validMax) {
    return ValueExprs.usable(ValueExprs.asDouble(name), opt(validMin), opt(validMax));
  }

  /** True where the valid value lies beyond the action's limits (false where it is missing). */
  public static Column beyond(Column v, OutlierPlan o) {
    Column out = lit(false);
    if (o.lower() != null) {
      out = out.or(v.lt(lit(o.lower())));
    }
    if (o.upper() != null) {
      out = out.or(v.gt(lit(o.upper())));
    }
    return coalesce(out, lit(false));
  }

  /**
   * Step 3: the valid value after the outlier action: capped, or missing (set-missing and
   * quarantine); flag and keep leave it as it is.
   */
  public static Column afterOutliers(String name, Double validMin, Double validMax, OutlierPlan o) {
    Column x = ValueExprs.asDouble(name);
    Column valid = ValueExprs.within(x, opt(validMin), opt(validMax));
    switch (o.action()) {
      case "cap":
        // x is finite where the condition holds, so greatest and least never meet a null or NaN.
        Column capped = x;
        if (o.lower() != null) {
          capped = functions.greatest(capped, lit(o.lower()));
        }
        if (o.upper() != null) {
          capped = functions.least(capped, lit(o.upper()));
        }
        return when(valid, capped);
      case "set-missing":
      case "quarantine":
        // A quarantined row leaves the treated table: its value counts as missing here.
        Column kept = valid;
        if (o.lower() != null) {
          kept = kept.and(x.geq(lit(o.lower())));
        }
        if (o.upper() != null) {
          kept = kept.and(x.leq(lit(o.upper())));
        }
        return when(kept, x);
      default:
        return when(valid, x);
    }
  }

  public static Column afterOutliers(ColumnPlan cp) {
    return afterOutliers(cp.name(), cp.validMin(), cp.validMax(), cp.outliers());
  }

  /** Steps 2 to 5 for a treated numeric column: valid, outliers, filled, scaled. */
  public static Column numeric(ColumnPlan cp) {
    Column t = afterOutliers(cp);
    Column u = cp.missing().fillNumber() == null ? t : coalesce(t, lit(cp.missing().fillNumber()));
    if (cp.scaling().active()) {
      u = u.minus(lit(cp.scaling().centre())).divide(lit(cp.scaling().scale()));
    }
    return u;
  }

  /** Step 4 for a treated categorical column: fill with the plan's text value. */
  public static Column categorical(ColumnPlan cp, String sparkType) {
    Column c = Names.col(cp.name());
    if (cp.missing().fillText() == null) {
      return c;
    }
    return coalesce(c, lit(cp.missing().fillText()).cast(sparkType));
  }

  /** Added column of action flag: true where the valid value lies beyond the limits. */
  public static Column outlierFlag(ColumnPlan cp) {
    return beyond(valid(cp.name(), cp.validMin(), cp.validMax()), cp.outliers());
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
