package dev.sluice.treat;

import dev.sluice.SluiceException;
import dev.sluice.io.Names;
import dev.sluice.plan.ColumnPlan;
import dev.sluice.plan.Plan;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.List;
import java.util.Locale;
import java.util.Set;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.functions;
import org.apache.spark.sql.types.StructField;

/**
 * Applies a plan to a table as one projection: the treated rows, and the rows held back for
 * quarantine with their original values and a reason. Nothing is computed from the data here.
 */
public final class TreatedTable {
  /** Column added to quarantined rows, naming every rule the row broke. */
  public static final String REASON_COLUMN = "quarantine_reason";

  private TreatedTable() {}

  /** The projection of treated columns, in table order, flags after the column they describe. */
  public static List<Column> projection(Dataset<Row> input, Plan plan) {
    List<Column> out = new ArrayList<>();
    for (StructField f : input.schema().fields()) {
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

  /** The reason a row is quarantined, or null when it is not (missing required values). */
  public static Column reason(Plan plan) {
    List<Column> parts = new ArrayList<>();
    for (ColumnPlan cp : plan.columns()) {
      if (cp.treated() && cp.missing().quarantine()) {
        Column missing = cp.kind().equals("numeric")
            ? Treatments.afterOutliers(cp).isNull()
            : Names.col(cp.name()).isNull();
        parts.add(functions.when(missing, functions.lit("required " + cp.name() + " is missing")));
      }
    }
    if (parts.isEmpty()) {
      return functions.lit(null).cast("string");
    }
    Column joined = functions.concat_ws("; ", parts.toArray(new Column[0]));
    return functions.when(joined.notEqual(functions.lit("")), joined);
  }

  public static boolean quarantines(Plan plan) {
    return plan.columns().stream().anyMatch(c -> c.treated() && c.missing().quarantine());
  }

  /**
   * Fails before any Spark job when an added column would collide with an existing one (compared
   * case-insensitively, as Spark resolves names by default).
   */
  public static void checkNoCollisions(Dataset<Row> input, Plan plan) {
    Set<String> existing = new HashSet<>();
    for (String n : input.columns()) {
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
    if (existing.contains(REASON_COLUMN)) {
      clashes.add(REASON_COLUMN);
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
