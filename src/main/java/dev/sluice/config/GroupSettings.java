package dev.sluice.config;

import java.util.List;

/**
 * Group-wise treatment: each group of rows (one value of the {@code by} columns, e.g. one depot)
 * gets its own outlier limits and fill value.
 *
 * @param by the columns whose values form the groups, in order (empty: no groups)
 * @param minValues a group with fewer usable values in a column than this takes the table-wide
 *     limits and fill value for that column
 * @param maxGroups the most groups a table may have; more is refused
 */
public record GroupSettings(List<String> by, int minValues, int maxGroups) {
  public boolean any() {
    return !by.isEmpty();
  }
}
