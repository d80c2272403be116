package dev.sluice.config;

/**
 * How exact quantiles are searched for (they are exact whatever these are; these decide memory and
 * the number of passes).
 *
 * @param pilotRows rows read from the start of a few spread partitions to place the windows whose
 *     values the profile keeps, on tables too large to keep a whole column
 * @param maxHeldValues most values the search windows of one pass keep in memory, over all
 *     columns, in each task and in the merged result; a window past its share turns into a
 *     histogram (and the search takes one more pass). Columns whose share fits a whole column
 *     are kept whole and need no pilot.
 */
public record QuantileSettings(int pilotRows, int maxHeldValues) {
  /** Floor of one window's share, so that very wide tables still hold some values per window. */
  static final int MIN_PER_WINDOW = 1_000;

  /** The share of the held values one window of a pass with {@code windows} windows may keep. */
  public int heldPerWindow(int windows) {
    return Math.max(MIN_PER_WINDOW, maxHeldValues / Math.max(1, windows));
  }
}
