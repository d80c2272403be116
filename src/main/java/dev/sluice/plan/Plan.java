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
 */
public record Plan(
    int formatVersion,
    long rowsFitted,
    String quantileMethod,
    double rankError,
    List<ColumnPlan> columns,
    CollinearityFindings collinearity,
    java.util.SortedMap<String, FitFigures> fitted) {

  /** 2: with the fit-time figures that drift is measured against. */
  public static final int FORMAT_VERSION = 2;

  public Optional<ColumnPlan> column(String name) {
    return columns.stream().filter(c -> c.name().equals(name)).findFirst();
  }
}
