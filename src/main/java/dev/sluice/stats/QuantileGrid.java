package dev.sluice.stats;

/**
 * A column's quantile function sampled at ascending probabilities (for instance 0, 1/G, ..., 1),
 * with linear interpolation between the points. It also gives the inverse, the mid-rank of a value
 * in [0, 1], which the Spearman correlation uses on large tables.
 */
public final class QuantileGrid {
  /**
   * @param probabilities strictly ascending, first 0 and last 1
   * @param values non-decreasing, finite, same length (at least 2)
   */
  public QuantileGrid(double[] probabilities, double[] values) {
    throw new UnsupportedOperationException("todo");
  }

  /** Evenly spaced probabilities 0, 1/g, ..., 1 (g + 1 of them), g >= 1. */
  public static double[] evenProbabilities(int g) {
    throw new UnsupportedOperationException("todo");
  }

  /** The interpolated quantile at p in [0, 1]. */
  public double quantile(double p) {
    throw new UnsupportedOperationException("todo");
  }

  /**
   * The mid-rank of x in [0, 1]: 0 below the minimum, 1 above the maximum; where the quantile
   * function is flat at x (tied values) the midpoint of the flat stretch; elsewhere the inverse of
   * the linear interpolation.
   */
  public double midRank(double x) {
    throw new UnsupportedOperationException("todo");
  }

  /**
   * The mid-rank of x in the distribution after values are capped to [lower, upper] (infinite
   * limits allowed): at or above {@code upper} the midpoint of [midRank(upper), 1], at or below
   * {@code lower} the midpoint of [0, midRank(lower)], otherwise {@link #midRank}.
   */
  public double midRankAfterCap(double x, double lower, double upper) {
    throw new UnsupportedOperationException("todo");
  }

  public double[] probabilities() {
    throw new UnsupportedOperationException("todo");
  }

  public double[] values() {
    throw new UnsupportedOperationException("todo");
  }
}
