package dev.sluice.plan;

import java.util.List;
import java.util.Optional;

/**
 * The fitted treatment plan: every per-column decision with its numbers, and the collinearity
 * findings. Applying a plan never recomputes a statistic.
 *
 * @param formatVersion version of this plan's JSON layout
 * @param rowsFitted rows of the table the plan was fitted on
 * @param quantileMethod exact-type7 (Hyndman and Fan type 7, exact)
 * @param rankError bound on the normalized rank error of the quantiles (0 when exact)
 * @param fitted per treated column, by name, what it looked like at fit time (for drift)
 * @param gates the limits the data must keep to, checked by every run that uses the plan
 */
public record Plan(
    int formatVersion,
    long rowsFitted,
    String quantileMethod,
    double rankError,
    List<ColumnPlan> columns,
    CollinearityFindings collinearity,
    java.util.SortedMap<String, FitFigures> fitted,
    Gates gates) {

  /** 2: with the fit-time figures that drift is measured against; 3: with the gates. */
  public static final int FORMAT_VERSION = 3;

  /** The oldest layout still read: a version 2 plan is read as one without gates. */
  public static final int OLDEST_FORMAT_VERSION = 2;

  /** The same plan over other columns (a subset of these). */
  public Plan withColumns(List<ColumnPlan> others) {
    return new Plan(formatVersion, rowsFitted, quantileMethod, rankError, List.copyOf(others), collinearity,
        fitted, gates);
  }

  /** The same plan with other gates, in the current layout. */
  public Plan withGates(Gates others) {
    return new Plan(FORMAT_VERSION, rowsFitted, quantileMethod, rankError, columns, collinearity, fitted, others);
  }

  public Optional<ColumnPlan> column(String name) {
    return columns.stream().filter(c -> c.name().equals(name)).findFirst();
  }
}
