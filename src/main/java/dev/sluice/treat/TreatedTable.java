package dev.sluice.treat;

import static org.apache.spark.sql.functions.lit;
import static org.apache.spark.sql.functions.when;

import dev.sluice.SluiceException;
import dev.sluice.io.Names;
import dev.sluice.plan.ColumnPlan;
import dev.sluice.plan.OutlierPlan;
import dev.sluice.plan.Plan;
import dev.sluice.profile.ValueExprs;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.List;
import java.util.Locale;
import java.util.Optional;
import java.util.Set;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.functions;
import org.apache.spark.sql.types.StructField;
import org.apache.spark.sql.types.StructType;

/**
 * Applies a plan to a table as one projection: the treated rows, and the rows held back for
 * quarantine with their original values and the reasons. Nothing is computed from the data here.
 *
 * <p>A row goes to quarantine when any of these holds, and its reasons are listed in this order:
 * the CSV line could not be parsed (stage {@code read}); a value lies outside the validity bounds
 * of a column whose invalid-action is quarantine ({@code validity}); a valid value lies beyond the
 * limits of a column whose outlier action is quarantine ({@code outliers}); a {@code required}
 * column is missing after those steps ({@code required}).
 */
public final class TreatedTable {
  /** Columns added to quarantined rows: the first reason, and all of them. */
  public static final String STAGE = "quarantine_stage";
  public static final String COLUMN = "quarantine_column";
  public static final String RULE = "quarantine_rule";
  public static final String VALUE = "quarantine_value";
  public static final String REASONS = "quarantine_reasons";
  private static final List<String> ADDED = List.of(STAGE, COLUMN, RULE, VALUE, REASONS);
  /** Working column of pass 3: every reason of the row, empty for a treated row. */
  static final String WORK = "_sluice_reasons";

  private TreatedTable() {}

  /** The projection of treated columns, in table order, flags after the column they describe. */
  public static List<Column> projection(StructType schema, Plan plan) {
    List<Column> out = new ArrayList<>();
    for (StructField f : schema.fields()) {
      ColumnPlan cp = plan.column(f.name()).orElse(null);
      if (cp == null) {
        out.add(Names.col(f.name()));
        continue;
      }
      if (!cp.kept()) {
        continue;
      }
      out.add(value(cp, f).alias(f.name()));
      if (cp.treated() && cp.outliers().action().equals("flag") && cp.outliers().active()) {
        out.add(Treatments.outlierFlag(cp).alias(f.name() + Treatments.OUTLIER_FLAG_SUFFIX));
      }
      if (cp.treated() && cp.missing().indicator() && cp.missing().fills()) {
        out.add(Treatments.missingFlag(cp).alias(f.name() + Treatments.MISSING_FLAG_SUFFIX));
      }
    }
    return out;
  }

  private static Column value(ColumnPlan cp, StructField f) {
    if (!cp.treated()) {
      return Names.col(f.name());
    }
    if (cp.kind().equals("numeric")) {
      return Treatments.numeric(cp);
    }
    return Treatments.categorical(cp, f.dataType().sql());
  }

  /** Every reason a row is quarantined, as an array of (stage, column, rule, value); empty if none. */
  public static Column reasons(Plan plan, Optional<String> malformedColumn) {
    List<Column> parts = new ArrayList<>();
    malformedColumn.ifPresent(m -> parts.add(
        when(Names.col(m).isNotNull(), reason("read", null, "malformed-row", Names.col(m)))));
    for (ColumnPlan cp : plan.columns()) {
      if (cp.treated()) {
        parts.addAll(columnReasons(cp));
      }
    }
    if (parts.isEmpty()) {
      return functions.array().cast("array<struct<stage:string,column:string,rule:string,value:string>>");
    }
    return functions.array_compact(functions.array(parts.toArray(new Column[0])));
  }

  private static List<Column> columnReasons(ColumnPlan cp) {
    List<Column> parts = new ArrayList<>();
    Column original = Names.col(cp.name()).cast("string");
    if (cp.kind().equals("numeric")) {
      Column x = ValueExprs.asDouble(cp.name());
      Column finite = ValueExprs.isFinite(x);
      if (cp.invalidAction().equals("quarantine") && cp.validMin() != null) {
        parts.add(when(finite.and(x.lt(lit(cp.validMin()))), reason("validity", cp.name(), "valid-min", original)));
      }
      if (cp.invalidAction().equals("quarantine") && cp.validMax() != null) {
        parts.add(when(finite.and(x.gt(lit(cp.validMax()))), reason("validity", cp.name(), "valid-max", original)));
      }
      OutlierPlan o = cp.outliers();
      Column v = Treatments.valid(cp.name(), cp.validMin(), cp.validMax());
      if (o.action().equals("quarantine") && o.lower() != null) {
        parts.add(when(v.lt(Treatments.lowerLimit(cp)), reason("outliers", cp.name(), "lower-limit", original)));
      }
      if (o.action().equals("quarantine") && o.upper() != null) {
        parts.add(when(v.gt(Treatments.upperLimit(cp)), reason("outliers", cp.name(), "upper-limit", original)));
      }
    }
    if (cp.missing().quarantine()) {
      Column missing = cp.kind().equals("numeric")
          ? Treatments.afterOutliers(cp).isNull()
          : Names.col(cp.name()).isNull();
      parts.add(when(missing, reason("required", cp.name(), "required", original)));
    }
    return parts;
  }

  private static Column reason(String stage, String column, String rule, Column value) {
    return functions.struct(
        lit(stage).alias("stage"),
        lit(column).cast("string").alias("column"),
        lit(rule).alias("rule"),
        functions.coalesce(value.cast("string"), lit("null")).alias("value"));
  }

  /** True when the plan (or malformed input) can send any row to quarantine. */
  public static boolean quarantines(Plan plan, Optional<String> malformedColumn) {
    if (malformedColumn.isPresent()) {
      return true;
    }
    for (ColumnPlan cp : plan.columns()) {
      if (cp.treated() && !columnReasons(cp).isEmpty()) {
        return true;
      }
    }
    return false;
  }

  /** Quarantined rows: the original columns, then the first reason and all reasons. */
  public static List<Column> quarantineProjection(StructType schema) {
    List<Column> out = new ArrayList<>();
    for (String n : schema.fieldNames()) {
      out.add(Names.col(n));
    }
    Column first = functions.col(WORK).getItem(0);
    out.add(first.getField("stage").alias(STAGE));
    out.add(first.getField("column").alias(COLUMN));
    out.add(first.getField("rule").alias(RULE));
    out.add(first.getField("value").alias(VALUE));
    out.add(functions.col(WORK).alias(REASONS));
    return out;
  }

  /**
   * Fails before any Spark job when an added column would collide with an existing one (compared
   * case-insensitively, as Spark resolves names by default).
   */
  public static void checkNoCollisions(StructType schema, Plan plan) {
    Set<String> existing = new HashSet<>();
    for (String n : schema.fieldNames()) {
      existing.add(n.toLowerCase(Locale.ROOT));
    }
    List<String> clashes = new ArrayList<>();
    for (ColumnPlan cp : plan.columns()) {
      for (String suffix : List.of(Treatments.OUTLIER_FLAG_SUFFIX, Treatments.MISSING_FLAG_SUFFIX)) {
        String added = cp.name() + suffix;
        if (existing.contains(added.toLowerCase(Locale.ROOT)) && adds(cp, suffix)) {
          clashes.add(added);
        }
      }
    }
    for (String added : ADDED) {
      if (existing.contains(added)) {
        clashes.add(added);
      }
    }
    if (Treatments.groups(plan).isPresent() && existing.contains(Treatments.GROUP_INDEX)) {
      clashes.add(Treatments.GROUP_INDEX);
    }
    if (!clashes.isEmpty()) {
      throw SluiceException.usage("The table already has column(s) " + String.join(", ", clashes)
          + " that the treatment would add; rename them or turn off the flag that adds them");
    }
  }

  private static boolean adds(ColumnPlan cp, String suffix) {
    if (!cp.treated() || !cp.kept()) {
      return false;
    }
    if (suffix.equals(Treatments.OUTLIER_FLAG_SUFFIX)) {
      return cp.outliers().action().equals("flag") && cp.outliers().active();
    }
    return cp.missing().indicator() && cp.missing().fills();
  }
}
