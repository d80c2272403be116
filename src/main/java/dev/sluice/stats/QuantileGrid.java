package dev.sluice.stats;

import java.util.Arrays;

/**
 * A column's quantile function sampled at ascending probabilities (for instance 0, 1/G, ..., 1),
 * with linear interpolation between the points. It also gives the inverse, the mid-rank of a value
 * in [0, 1], which the Spearman correlation uses on large tables.
 *
 * <p>With a type 7 grid holding every order statistic (probabilities (k - 1) / (n - 1)), the
 * mid-rank of x_(k) is (k - 1) / (n - 1), and for a tie the mean of the tied positions: an affine
 * function of the ordinary mid-rank, so the Pearson correlation of mid-ranks is Spearman's rho.
 * On a coarser grid the mid-rank is the grid's own interpolation, accurate to the grid spacing.
 *
 * <p>Edge cases: NaN in gives NaN out; a constant column (every value equal) has the mid-rank 0.5
 * at its value. The arrays are copied in and out, so an instance is immutable.
 */
public final class QuantileGrid {
  private final double[] probabilities;
  private final double[] values;

  /**
   * @param probabilities strictly ascending, first 0 and last 1
   * @param values non-decreasing, finite, same length (at least 2)
   * @throws IllegalArgumentException when any of these does not hold
   */
  public QuantileGrid(double[] probabilities, double[] values) {
    if (probabilities.length != values.length || values.length < 2) {
      throw new IllegalArgumentException("A quantile grid needs two or more probabilities and as"
          + " many values, not " + probabilities.length + " and " + values.length);
    }
    this.probabilities = probabilities.clone();
    this.values = values.clone();
    checkProbabilities(this.probabilities);
    checkValues(this.values);
  }

  /** Evenly spaced probabilities 0, 1/g, ..., 1 (g + 1 of them), g >= 1. */
  public static double[] evenProbabilities(int g) {
    if (g < 1) {
      throw new IllegalArgumentException("Cannot split [0, 1] into " + g + " steps");
    }
    double[] ps = new double[g + 1];
    for (int i = 0; i <= g; i++) {
      ps[i] = (double) i / g;
    }
    return ps;
  }

  /**
   * The interpolated quantile at p in [0, 1].
   *
   * @throws IllegalArgumentException for p outside [0, 1] or NaN
   */
  public double quantile(double p) {
    if (!(p >= 0.0 && p <= 1.0)) {
      throw new IllegalArgumentException("Cannot take the quantile at p = " + p + ": p must be in [0, 1]");
    }
    int found = Arrays.binarySearch(probabilities, p);
    if (found >= 0) {
      return values[found];
    }
    int hi = -found - 1;
    int lo = hi - 1;
    double t = (p - probabilities[lo]) / (probabilities[hi] - probabilities[lo]);
    return values[lo] + t * (values[hi] - values[lo]);
  }

  /**
   * The mid-rank of x in [0, 1]: 0 below the minimum, 1 above the maximum; where the quantile
   * function is flat at x (tied values) the midpoint of the flat stretch; elsewhere the inverse of
   * the linear interpolation.
   */
  public double midRank(double x) {
    if (Double.isNaN(x)) {
      return Double.NaN;
    }
    int first = boundary(x, false);
    if (first == values.length) {
      return 1.0;
    }
    if (values[first] == x) {
      int last = boundary(x, true) - 1;
      return (probabilities[first] + probabilities[last]) / 2.0;
    }
    if (first == 0) {
      return 0.0;
    }
    int lo = first - 1;
    double t = (x - values[lo]) / (values[first] - values[lo]);
    return probabilities[lo] + t * (probabilities[first] - probabilities[lo]);
  }

  /**
   * The mid-rank of x in the distribution after values are capped to [lower, upper] (infinite
   * limits allowed): at or above {@code upper} the midpoint of [midRank(upper), 1], at or below
   * {@code lower} the midpoint of [0, midRank(lower)], otherwise {@link #midRank}. The upper side
   * is tested first, which matters only when lower == upper.
   *
   * @throws IllegalArgumentException for NaN limits or lower > upper
   */
  public double midRankAfterCap(double x, double lower, double upper) {
    if (!(lower <= upper)) {
      throw new IllegalArgumentException("Cannot cap to [" + lower + ", " + upper + "]");
    }
    if (x >= upper) {
      return (midRank(upper) + 1.0) / 2.0;
    }
    if (x <= lower) {
      return midRank(lower) / 2.0;
    }
    return midRank(x);
  }

  /**
   * The quantile at p of the values left after an outlier step with limits [lower, upper]
   * (infinite limits allowed). With {@code cap} the values beyond are clamped to the limits, a
   * monotone change, so the quantile is the clamped quantile. Otherwise they are removed, and the
   * quantile is taken within the stretch of ranks [midRank(lower), midRank(upper)] that remains.
   * As accurate as this grid's ranks.
   *
   * @throws IllegalArgumentException for p outside [0, 1], NaN limits or lower > upper
   */
  public double quantileWithin(double p, double lower, double upper, boolean cap) {
    if (!(lower <= upper)) {
      throw new IllegalArgumentException("Cannot limit to [" + lower + ", " + upper + "]");
    }
    if (cap) {
      return Math.min(upper, Math.max(lower, quantile(p)));
    }
    double from = Double.isInfinite(lower) ? 0.0 : midRank(lower);
    double to = Double.isInfinite(upper) ? 1.0 : midRank(upper);
    double q = quantile(Math.min(1.0, Math.max(0.0, from + p * (to - from))));
    return Math.min(upper, Math.max(lower, q));
  }

  public double[] probabilities() {
    return probabilities.clone();
  }

  public double[] values() {
    return values.clone();
  }

  /** Index of the first value >= x (> x when {@code pastTies}), or the length when there is none. */
  private int boundary(double x, boolean pastTies) {
    int lo = 0;
    int hi = values.length;
    while (lo < hi) {
      int mid = (lo + hi) >>> 1;
      if (values[mid] < x || (pastTies && values[mid] == x)) {
        lo = mid + 1;
      } else {
        hi = mid;
      }
    }
    return lo;
  }

  private static void checkProbabilities(double[] ps) {
    if (ps[0] != 0.0 || ps[ps.length - 1] != 1.0) {
      throw new IllegalArgumentException("Grid probabilities must run from 0 to 1");
    }
    for (int i = 1; i < ps.length; i++) {
      if (!(ps[i] > ps[i - 1])) {
        throw new IllegalArgumentException("Grid probabilities must be strictly ascending at index " + i);
      }
    }
  }

  private static void checkValues(double[] vs) {
    for (int i = 0; i < vs.length; i++) {
      if (!Double.isFinite(vs[i])) {
        throw new IllegalArgumentException("Grid values must be finite, not " + vs[i] + " at index " + i);
      }
      if (i > 0 && vs[i] < vs[i - 1]) {
        throw new IllegalArgumentException("Grid values must not decrease at index " + i);
      }
    }
  }
}
