package dev.sluice.plan;

import java.util.List;

/**
 * One column's group-wise figures: for each group of rows (one value of the {@code by} columns)
 * its own outlier limits and fill value, or the reason it takes the table-wide ones.
 *
 * @param by the columns whose values form the groups
 * @param quantileMethod how the group quartiles and medians were found
 * @param rankError bound on their normalized rank error
 * @param groups every group seen at fit time, ordered by key; a group not listed (new since the
 *     fit) takes the table-wide figures
 */
public record GroupFigures(List<String> by, String quantileMethod, double rankError, List<Group> groups) {

  /**
   * One group.
   *
   * @param key the group's values of the {@code by} columns as text (null for a null value)
   * @param usable the column's usable values in the group
   * @param lower the group's lower limit (null: the table-wide one, or none on that side)
   * @param upper the group's upper limit (null: the table-wide one, or none on that side)
   * @param fill the group's fill value of a numeric column (null: the table-wide one)
   * @param fillText the group's fill value of a categorical column, its mode (null: the table-wide one)
   * @param fallback why the group takes the table-wide figures (null: it has its own)
   */
  public record Group(List<String> key, long usable, Double lower, Double upper, Double fill, String fillText,
      String fallback) {

    /** A group of a numeric column: limits and fill, no text fill. */
    public Group(List<String> key, long usable, Double lower, Double upper, Double fill, String fallback) {
      this(key, usable, lower, upper, fill, null, fallback);
    }
  }

  /** Groups with figures of their own. */
  public long own() {
    return groups.stream().filter(g -> g.fallback() == null).count();
  }
}
