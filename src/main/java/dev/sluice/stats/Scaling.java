package dev.sluice.stats;

/**
 * An affine rescaling (x - centre) / scale. When the data's spread is zero the scale is 1 and
 * {@link #zeroSpread()} is true, so a constant column maps to 0 and nothing is divided by zero.
 *
 * <p>Edge cases: a spread that is zero, NaN or infinite (a NaN standard deviation of a single
 * value, an overflowed range) is treated as zero spread. A non-finite centre (as from an empty
 * column) and a negative spread are rejected: they mean the statistics were not fitted.
 */
public record Scaling(double centre, double scale, boolean zeroSpread) {
  public static final Scaling IDENTITY = new Scaling(0.0, 1.0, false);

  public Scaling {
    if (!Double.isFinite(centre)) {
      throw new IllegalArgumentException("Cannot scale around a centre of " + centre);
    }
    if (!(scale > 0.0 && Double.isFinite(scale))) {
      throw new IllegalArgumentException("Cannot scale by " + scale + ": it must be finite and positive");
    }
  }

  /** Standard (z) scaling: centre mean, scale sample standard deviation. */
  public static Scaling standard(double mean, double stddev) {
    return around(mean, stddev);
  }

  /** Min-max scaling to [0, 1]: centre min, scale max - min. */
  public static Scaling minMax(double min, double max) {
    requireOrdered(min, max);
    return around(min, max - min);
  }

  /** Robust scaling: centre median, scale IQR. */
  public static Scaling robust(double median, double iqr) {
    return around(median, iqr);
  }

  /** Max-abs scaling to [-1, 1]: centre 0, scale max(|min|, |max|). */
  public static Scaling maxAbs(double min, double max) {
    requireOrdered(min, max);
    return around(0.0, Math.max(Math.abs(min), Math.abs(max)));
  }

  public double apply(double x) {
    return (x - centre) / scale;
  }

  private static Scaling around(double centre, double spread) {
    if (spread < 0.0) {
      throw new IllegalArgumentException("Cannot scale by a negative spread " + spread);
    }
    boolean usable = spread > 0.0 && Double.isFinite(spread);
    return usable ? new Scaling(centre, spread, false) : new Scaling(centre, 1.0, true);
  }

  private static void requireOrdered(double min, double max) {
    if (min > max) {
      throw new IllegalArgumentException("Cannot scale with min " + min + " above max " + max);
    }
  }
}
