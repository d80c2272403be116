package dev.sluice.stats;

/**
 * Count, mean, sum of squared deviations (m2), minimum and maximum of finite values.
 *
 * <p>Empty input has count 0 and NaN for every other figure. Variance and standard deviation use
 * n - 1 and are NaN for fewer than two values.
 */
public record Moments(long count, double mean, double m2, double min, double max) {
  public static final Moments EMPTY =
      new Moments(0, Double.NaN, Double.NaN, Double.NaN, Double.NaN);

  /** Builds moments from a count, mean and sample standard deviation (as Spark reports them). */
  public static Moments of(long count, double mean, double stddev, double min, double max) {
    throw new UnsupportedOperationException("todo");
  }

  public double variance() {
    throw new UnsupportedOperationException("todo");
  }

  public double stddev() {
    throw new UnsupportedOperationException("todo");
  }

  /** The moments of this data with {@code copies} more values all equal to {@code value}, exactly. */
  public Moments withPointMass(double value, long copies) {
    throw new UnsupportedOperationException("todo");
  }

  /** Chan et al.'s pairwise combination of two disjoint parts. */
  public Moments merge(Moments other) {
    throw new UnsupportedOperationException("todo");
  }

  /** Mutable, mergeable accumulator (Welford's update); NaN and infinite values are rejected. */
  public static final class Accumulator {
    public void add(double x) {
      throw new UnsupportedOperationException("todo");
    }

    public Moments result() {
      throw new UnsupportedOperationException("todo");
    }
  }
}
