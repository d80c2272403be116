package dev.sluice.stats;

/**
 * An exact power-of-two factor that brings very large values near 1 before their moments are
 * summed.
 *
 * <p>A sum or a sum of squares of doubles overflows long before the values themselves do: the
 * squares of values above about 1.3e154 are already infinite. Multiplying by a power of two is
 * exact (it changes only the exponent), so moments of the scaled values, scaled back at the end,
 * are as accurate as the double arithmetic allows and never infinite where the true figure is
 * finite. Columns of ordinary magnitude get the factor 1 and are summed as they are.
 */
public final class PowerScale {
  /** Magnitudes from 2^500 (about 3.3e150) up are scaled; squares of smaller ones stay finite. */
  static final int FROM_EXPONENT = 500;

  private PowerScale() {}

  /**
   * The factor for a column whose largest absolute value is {@code maxAbs}: 1 for ordinary
   * magnitudes, non-finite or NaN input, else 2^-e with e the binary exponent of {@code maxAbs}.
   */
  public static double forMagnitude(double maxAbs) {
    if (!Double.isFinite(maxAbs) || Math.getExponent(maxAbs) < FROM_EXPONENT) {
      return 1.0;
    }
    return Math.scalb(1.0, -Math.getExponent(maxAbs));
  }
}
