package dev.sluice.profile;

import dev.sluice.stats.HashedCounts;
import dev.sluice.stats.NumericSteps;
import dev.sluice.stats.RankSearch;
import dev.sluice.stats.RowSample;
import java.util.List;
import java.util.Map;
import java.util.Optional;

/**
 * The pass-1 profile of a table: its row count and one profile per column, in table order.
 *
 * @param sampleColumns the treated numeric columns the row sample holds, in its order (empty when
 *     the correlation analysis will not run)
 * @param sample a canonical sample of those columns' raw values (NaN for null), for rank
 *     correlations; null when sampleColumns is empty
 * @param pilot per measured column, its raw values in the pilot sample (NaN for null; empty when
 *     the table was small enough to need none): where later searches place their first windows
 * @param quartiles per measured column, its finished quartile search, which also gives the
 *     quartiles of the column under any order-keeping step such as capping
 * @param share what pass 1 gathered to spare pass 2, or null when it did not try
 * @param togetherColumns the columns whose nulls {@code together} tracks (the first 64 numeric
 *     and categorical columns in table order), bit 0 first
 * @param together rows by the set of those columns that are null in them, as a bit mask (rows
 *     with none left out); overflowed past 10,000 different sets
 * @param groups what pass 1 measured of each group of groups.by, or null without groups
 * @param pilotDistinct per measured column, the distinct usable values in its pilot (empty when
 *     there was no pilot): a lower bound on how many distinct values the column has
 */
public record TableProfile(
    long rows,
    List<ColumnProfile> columns,
    List<String> sampleColumns,
    RowSample sample,
    Map<String, double[]> pilot,
    Map<String, RankSearch> quartiles,
    PassOneShare share,
    List<String> togetherColumns,
    HashedCounts<Long> together,
    GroupMeasures groups,
    Map<String, Long> pilotDistinct) {

  /** Most columns whose nulls the missing-together counts track (one bit each in a long). */
  public static final int TOGETHER_COLUMNS = 64;

  public Optional<ColumnProfile> column(String name) {
    return columns.stream().filter(c -> c.name().equals(name)).findFirst();
  }

  /**
   * The quartiles of a measured column after validity and outlier steps that keep every value and
   * its order (capping, flagging, keeping): exactly the pass-1 order statistics with the steps
   * applied. Empty for steps that remove values, or a column with no quartile search.
   */
  public Optional<double[]> quartilesKeepingOrder(String name, NumericSteps steps) {
    RankSearch search = quartiles.get(name);
    return search == null || steps.removes() ? Optional.empty()
        : Optional.of(search.quantiles(steps::afterOutliers));
  }

  /** The pilot's raw values of a measured column (empty when there was no pilot). */
  public double[] pilotOf(String name) {
    double[] p = pilot.get(name);
    return p == null ? new double[0] : p;
  }
}
