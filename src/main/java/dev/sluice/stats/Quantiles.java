package dev.sluice.stats;

/**
 * Sample quantile definitions of Hyndman and Fan (1996), computed on sorted arrays.
 *
 * <p>Type 7 (R's and numpy's default) is the job's definition for exact quantiles; type 6 is
 * provided because the NIST e-Handbook uses it in its worked examples.
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
    throw new UnsupportedOperationException("todo");
  }

  /** Type 6: h = (n + 1) p, clamped to the first and last order statistic. Same contract as type 7. */
  public static double type6(double[] sorted, double p) {
    throw new UnsupportedOperationException("todo");
  }

  /** Sorts a copy of {@code values} (NaN rejected) and returns the type 7 quantile at each p. */
  public static double[] type7Of(double[] values, double... ps) {
    throw new UnsupportedOperationException("todo");
  }
}
