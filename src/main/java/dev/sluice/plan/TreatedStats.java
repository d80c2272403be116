package dev.sluice.plan;

import dev.sluice.stats.CoMoments;
import java.util.List;
import java.util.Map;

/**
 * Pass-2 figures: statistics of each treated column after the validity and outlier steps (and
 * before imputation), plus the co-moments from which Pearson correlations after imputation follow.
 *
 * @param columns per treated column, by name
 * @param comomentColumns the columns of the co-moment accumulators, in their order
 * @param pearson sums of products of the values (null when the analysis does not run)
 */
public record TreatedStats(
    Map<String, ColumnStats> columns,
    List<String> comomentColumns,
    CoMoments pearson) {

  /**
   * @param present values left after validity and outlier steps
   * @param q1 quartiles of those values (NaN unless median imputation or robust scaling needs them)
   * @param mode most frequent of those values (NaN unless mode imputation needs it)
   * @param belowInner usable values below the Tukey inner fence (likewise the others)
   * @param belowLimit usable values below the limit the action applied to (capped, set missing or
   *     flagged)
   */
  public record ColumnStats(
      long present,
      double mean,
      double stddev,
      double min,
      double max,
      double q1,
      double median,
      double q3,
      double mode,
      long belowInner,
      long aboveInner,
      long belowOuter,
      long aboveOuter,
      long belowLimit,
      long aboveLimit) {}
}
