package dev.sluice;

import dev.sluice.config.Role;
import dev.sluice.config.Settings;
import dev.sluice.config.SettingsLoader;
import dev.sluice.io.PlanFile;
import dev.sluice.plan.OutlierPlan;
import dev.sluice.plan.Plan;
import dev.sluice.plan.Planner;
import dev.sluice.plan.TreatedStats;
import dev.sluice.profile.Profiler;
import dev.sluice.profile.TableProfile;
import dev.sluice.report.Outputs;
import dev.sluice.report.SummaryTable;
import dev.sluice.treat.GroupPass;
import dev.sluice.treat.TreatedStatsPass;
import dev.sluice.treat.TreatedTable;
import dev.sluice.treat.TreatmentSplit;
import java.util.Optional;
import org.apache.spark.sql.Column;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.function.Consumer;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;

/**
 * The Java API: fit a plan on a table, then apply it. Fitting reads the table twice (the profile,
 * then the statistics of the treated values); applying is one projection and reads nothing until
 * the caller writes or counts the result.
 */
public final class Sluice {
  private Sluice() {}

  /**
   * What fitting found and decided.
   *
   * @param seconds wall-clock seconds of each pass, in order
   */
  public record Fit(TableProfile profile, Plan plan, TreatedStats stats, Map<String, Double> seconds) {}

  public static Fit fit(Dataset<Row> data, Settings settings, List<String> partitionColumns) {
    return fit(data, settings, partitionColumns, message -> {});
  }

  /** Fits a plan; {@code progress} hears one line as each pass starts. */
  public static Fit fit(
      Dataset<Row> data, Settings settings, List<String> partitionColumns, Consumer<String> progress) {
    checkColumns(data, settings);
    Map<String, Role> roles = Roles.effective(data.schema(), settings, partitionColumns);
    Roles.checkGroups(data.schema(), settings, roles);
    Map<String, Double> seconds = new LinkedHashMap<>();
    progress.accept("pass 1 of 3: profiling " + data.columns().length + " columns");
    long t0 = System.nanoTime();
    TableProfile profile = Profiler.profile(data, settings, roles);
    seconds.put("profile", elapsed(t0));
    long t1 = System.nanoTime();
    Map<String, OutlierPlan> outliers;
    Optional<TreatedStats> early;
    try {
      outliers = Planner.outliers(profile, settings);
      early = TreatedStatsPass.fromPassOne(profile, outliers, settings);
    } finally {
      // The rows pass 1 kept aside, in Spark's block store, are needed no longer.
      if (profile.share() != null) {
        profile.share().release();
      }
    }
    if (early.isPresent()) {
      progress.accept("pass 2 of 3 not needed: pass 1 also gave the statistics of the treated values");
    } else {
      progress.accept("pass 2 of 3: statistics of the treated values (" + profile.rows() + " rows)");
    }
    TreatedStats stats = early.orElseGet(() -> TreatedStatsPass.run(data, profile, outliers, settings));
    seconds.put("treated-statistics", elapsed(t1));
    Plan plan = Planner.finish(profile, settings, outliers, stats);
    if (settings.groups().any()) {
      Map<String, String> searched = GroupPass.searchedAfterPlan(plan.columns(), settings.groups().by(), profile.groups());
      progress.accept("group-wise limits and fill values by " + String.join(", ", settings.groups().by())
          + (searched.isEmpty() ? ": measured in the profile passes, beside the table-wide figures"
              : ": searching the group quartiles of " + String.join(", ", searched.keySet()) + " ("
                  + String.join("; ", new java.util.LinkedHashSet<>(searched.values())) + ")"));
      long t2 = System.nanoTime();
      plan = plan.withColumns(GroupPass.fit(data, plan.columns(), settings, profile.rows(), profile.groups()));
      seconds.put("groups", elapsed(t2));
    }
    TreatedTable.checkNoCollisions(data.schema(), plan);
    return new Fit(profile, plan, stats, seconds);
  }

  /** The treated rows: the plan applied, quarantined rows left out. */
  public static Dataset<Row> treat(Dataset<Row> data, Plan plan) {
    return TreatmentSplit.of(data, data.schema(), Optional.empty(), plan).treated();
  }

  /**
   * The rows held back, with original values and the quarantine_stage, quarantine_column,
   * quarantine_rule, quarantine_value and quarantine_reasons columns (empty when none can be).
   */
  public static Dataset<Row> quarantine(Dataset<Row> data, Plan plan) {
    TreatmentSplit split = TreatmentSplit.of(data, data.schema(), Optional.empty(), plan);
    return split.quarantined().orElseGet(() -> data.limit(0)
        .withColumn(TreatmentSplit.WORK, TreatedTable.reasons(plan, Optional.empty()))
        .select(TreatedTable.quarantineProjection(data.schema()).toArray(new Column[0])));
  }

  /**
   * The quality summary of a fit, one row per column, with the columns of summary/ and
   * summary.csv (a small DataFrame built on the driver; no pass over the data).
   */
  public static Dataset<Row> summary(SparkSession spark, Fit fit) {
    return Outputs.dataset(spark, SummaryTable.COLUMNS, SummaryTable.rows(fit.profile(), fit.plan(), fit.stats()));
  }

  /** Writes a plan as plan.json (sorted keys, stable), on any Hadoop file system. */
  public static void writePlan(SparkSession spark, Plan plan, String file) {
    Outputs.json(spark, file, plan);
  }

  /**
   * Reads a plan.json back for {@link #treat}; refuses a missing file, another format version or
   * unknown fields with a {@link SluiceException}.
   */
  public static Plan readPlan(SparkSession spark, String file) {
    return PlanFile.read(spark.sparkContext().hadoopConfiguration(), file);
  }

  /** Configured columns exist and their settings fit their types, before any Spark job. */
  static void checkColumns(Dataset<Row> data, Settings settings) {
    SettingsLoader.requireColumnsExist(settings, List.of(data.columns()));
    Roles.checkTypes(data.schema(), settings);
  }

  static double elapsed(long startNanos) {
    return Math.round((System.nanoTime() - startNanos) / 1e6) / 1000.0;
  }
}
