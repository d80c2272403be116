package dev.sluice.profile;

import java.util.List;
import java.util.Map;

/**
 * What pass 1 measured of each group of groups.by, for the columns whose group-wise limits or fill
 * values it could settle: per measured column, per group key (in key order), the usable values'
 * count, mean, sample standard deviation and exact type 7 quartiles; per categorical column, the
 * group's count of values and its mode. A column is absent when some group
 * with enough values to need its quartiles was not settled in pass 1 (a group the pilot never
 * saw, a window that missed); its figures are then searched after the plan.
 *
 * @param by the group key columns
 * @param columns per settled measured column, its groups' figures
 * @param modes per settled categorical column filled with its mode, its groups' modes
 * @param unsettled the candidate columns left to the later search, each with the reason
 */
public record GroupMeasures(List<String> by, Map<String, Map<List<String>, Measure>> columns,
    Map<String, Map<List<String>, Mode>> modes, Map<String, String> unsettled) {

  /**
   * One group's usable values of one column.
   *
   * @param quartiles Q1, median, Q3 (type 7); NaN where the group has too few values to need them
   * @param windows pass 1's windows over the group's values, or null (a group the pilot did not
   *     see): what figures after the group's outlier step are read off
   * @param regions the moments of the values in each region of those windows, or null
   * @param mad the median absolute deviation from the group's median, for a column with MAD
   *     limits (found in the pass that finds the table-wide MAD); NaN when not found
   * @param values each usable value's count, for a column filled with its mode; null when not
   *     counted or too many distinct values to count
   */
  public record Measure(long usable, double mean, double stddev, double[] quartiles,
      dev.sluice.stats.OrderWindows windows, dev.sluice.stats.ScaledMoments[] regions, double mad,
      dev.sluice.stats.HashedCounts<Double> values) {
    /** Without windows. */
    public Measure(long usable, double mean, double stddev, double[] quartiles) {
      this(usable, mean, stddev, quartiles, null, null, Double.NaN, null);
    }

    /** The same figures with the group's MAD. */
    Measure withMad(double value) {
      return new Measure(usable, mean, stddev, quartiles, windows, regions, value, values);
    }
  }

  /**
   * One group's values of one categorical column.
   *
   * @param values its non-null values
   * @param mode the most frequent, ties to the smallest (null: none)
   */
  public record Mode(long values, String mode) {}

  /** Group keys in order, key column by key column, a null value first. */
  public static int compareKeys(List<String> a, List<String> b) {
    for (int i = 0; i < a.size(); i++) {
      String x = a.get(i);
      String y = b.get(i);
      int c = x == null ? (y == null ? 0 : -1) : y == null ? 1 : x.compareTo(y);
      if (c != 0) {
        return c;
      }
    }
    return 0;
  }

  /** Nothing settled: every column in {@code columns} left to the later search, for one reason. */
  static GroupMeasures none(List<String> by, List<String> columns, String reason) {
    Map<String, String> unsettled = new java.util.LinkedHashMap<>();
    columns.forEach(c -> unsettled.put(c, reason));
    return new GroupMeasures(by, Map.of(), Map.of(), unsettled);
  }
}
