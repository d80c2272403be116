package dev.sluice.profile;

import dev.sluice.config.Role;
import dev.sluice.stats.PowerScale;

/**
 * Pass-1 figures of one column. Numeric figures are taken over the usable values (finite and
 * within the validity bounds) and are NaN where a column has none or is not numeric.
 *
 * @param nulls null entries in the input (NaN and infinite values are counted apart)
 * @param invalid finite values outside the validity bounds
 * @param usable finite values within the bounds: the count the statistics are taken over
 * @param quantileMethod how q1, median and q3 were computed: always exact type 7 now
 * @param rankError the bound on the normalized rank error of those quantiles: 0, exact
 * @param mad median absolute deviation from the median (NaN unless the mad method needs it)
 * @param distinct approximate distinct count of categorical and identifier columns (-1 otherwise)
 * @param topValue the most frequent value of a categorical column as text (null if none)
 * @param minText smallest date or timestamp as text (temporal columns), else null
 */
public record ColumnProfile(
    String name,
    String type,
    ColumnKind kind,
    Role role,
    long rows,
    long nulls,
    long nan,
    long infinite,
    long invalid,
    long usable,
    double min,
    double max,
    double mean,
    double stddev,
    double q1,
    double median,
    double q3,
    String quantileMethod,
    double rankError,
    double mad,
    long distinct,
    String topValue,
    long topCount,
    String minText,
    String maxText) {
  /** The quantile method of every measured column: Hyndman and Fan type 7, exact. */
  public static final String EXACT_TYPE7 = "exact-type7";

  public double nullRate() {
    return rows == 0 ? Double.NaN : (double) nulls / rows;
  }

  public double iqr() {
    return q3 - q1;
  }

  /** Profiled as a measurement: numeric and not an identifier. */
  public boolean measured() {
    return kind == ColumnKind.NUMERIC && role != Role.IDENTIFIER;
  }

  /** A numeric column whose values the job changes. */
  public boolean treated() {
    return measured() && (role == Role.TREAT || role == Role.REQUIRED);
  }

  /**
   * The power-of-two factor by which this column's values are scaled before their moments are
   * summed: 1 for ordinary magnitudes (see {@link PowerScale}).
   */
  public double momentScale() {
    return PowerScale.forMagnitude(Math.max(Math.abs(min), Math.abs(max)));
  }
}
