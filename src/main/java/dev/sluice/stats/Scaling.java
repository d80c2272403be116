package dev.sluice.stats;

/**
 * An affine rescaling (x - centre) / scale. When the data's spread is zero the scale is 1 and
 * {@link #zeroSpread()} is true, so a constant column maps to 0 and nothing is divided by zero.
 */
public record Scaling(double centre, double scale, boolean zeroSpread) {
  public static final Scaling IDENTITY = new Scaling(0.0, 1.0, false);

  /** Standard (z) scaling: centre mean, scale sample standard deviation. */
  public static Scaling standard(double mean, double stddev) {
    throw new UnsupportedOperationException("todo");
  }

  /** Min-max scaling to [0, 1]: centre min, scale max - min. */
  public static Scaling minMax(double min, double max) {
    throw new UnsupportedOperationException("todo");
  }

  /** Robust scaling: centre median, scale IQR. */
  public static Scaling robust(double median, double iqr) {
    throw new UnsupportedOperationException("todo");
  }

  /** Max-abs scaling to [-1, 1]: centre 0, scale max(|min|, |max|). */
  public static Scaling maxAbs(double min, double max) {
    throw new UnsupportedOperationException("todo");
  }

  public double apply(double x) {
    return (x - centre) / scale;
  }
}
