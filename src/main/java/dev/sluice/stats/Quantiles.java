package dev.sluice.stats;

import java.util.Arrays;

/**
 * Sample quantile definitions of Hyndman and Fan (1996), computed on sorted arrays.
 *
 * <p>Type 7 (R's and numpy's default) is the job's definition for exact quantiles; type 6 is
 * provided because the NIST e-Handbook uses it in its worked examples.
 *
 * <p>Edge cases: an empty array or a probability outside [0, 1] (NaN included) is rejected; a
 * single value is every quantile of itself; ties need no special care. The sorted arrays are not
 * checked for order or finiteness (that would cost a pass per call); between -Infinity and
 * +Infinity the interpolation yields NaN, between equal neighbours it returns the neighbour.
 */
public final class Quantiles {
  private Quantiles() {}

  /**
   * Type 7: h = (n - 1) p + 1, interpolating linearly between the order statistics around h.
   *
   * @param sorted finite values in ascending order, at least one
   * @param p probability in [0, 1]
   * @throws IllegalArgumentException for an empty array or p outside [0, 1]
   */
  public static double type7(double[] sorted, double p) {
    check(sorted, p);
    return interpolate(sorted, (sorted.length - 1) * p);
  }

  /** Type 6: h = (n + 1) p, clamped to the first and last order statistic. Same contract as type 7. */
  public static double type6(double[] sorted, double p) {
    check(sorted, p);
    double h = (sorted.length + 1) * p;
    double clamped = Math.min(Math.max(h, 1.0), sorted.length);
    return interpolate(sorted, clamped - 1.0);
  }

  /**
   * Sorts a copy of {@code values} (NaN rejected) and returns the type 7 quantile at each p.
   *
   * @throws IllegalArgumentException for empty or NaN-holding values, or a p outside [0, 1]
   */
  public static double[] type7Of(double[] values, double... ps) {
    double[] sorted = values.clone();
    for (double v : sorted) {
      if (Double.isNaN(v)) {
        throw new IllegalArgumentException("Cannot take quantiles of NaN values");
      }
    }
    Arrays.sort(sorted);
    double[] result = new double[ps.length];
    for (int i = 0; i < ps.length; i++) {
      result[i] = type7(sorted, ps[i]);
    }
    return result;
  }

  /**
   * The type 7 quantile p of n values known only through a window of them: {@code below} values
   * lie below the window's smallest value and {@code window} holds, in ascending order, every value
   * from there to its largest. NaN when the order statistics type 7 needs lie outside the window.
   */
  public static double type7InWindow(long n, double p, long below, double[] window) {
    if (n <= 0) {
      return Double.NaN;
    }
    double h = (n - 1) * p;
    long r0 = (long) Math.floor(h);
    long r1 = Math.min(r0 + 1, n - 1);
    if (r0 < below || r1 >= below + window.length) {
      return Double.NaN;
    }
    return r0 == n - 1 ? window[(int) (r0 - below)]
        : between(window[(int) (r0 - below)], window[(int) (r1 - below)], h - r0);
  }

  /** Linear interpolation at the zero-based fractional index h in [0, n - 1]. */
  private static double interpolate(double[] sorted, double h) {
    int lo = (int) Math.floor(h);
    if (lo >= sorted.length - 1) {
      return sorted[sorted.length - 1];
    }
    return between(sorted[lo], sorted[lo + 1], h - lo);
  }

  /**
   * The point {@code fraction} of the way from order statistic a to the next one, b: type 7's
   * interpolation step, shared by every path that computes it so that all give the same bits.
   */
  public static double between(double a, double b, double fraction) {
    // Skipping the product keeps order statistics exact and equal infinite neighbours finite-safe.
    if (fraction == 0.0 || a == b) {
      return a;
    }
    return a + fraction * (b - a);
  }

  private static void check(double[] sorted, double p) {
    if (sorted.length == 0) {
      throw new IllegalArgumentException("Cannot take a quantile of no values");
    }
    if (!(p >= 0.0 && p <= 1.0)) {
      throw new IllegalArgumentException("Cannot take the quantile at p = " + p + ": p must be in [0, 1]");
    }
  }
}
