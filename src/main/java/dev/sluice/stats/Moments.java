package dev.sluice.stats;

/**
 * Count, mean, sum of squared deviations (m2), minimum and maximum of finite values.
 *
 * <p>Empty input has count 0 and NaN for every other figure. Variance and standard deviation use
 * n - 1 and are NaN for fewer than two values. A single value has m2 = 0 and min = max = mean.
 * Combining with an empty part returns the other part unchanged, so empty parts cost no accuracy.
 */
public record Moments(long count, double mean, double m2, double min, double max) {
  public static final Moments EMPTY =
      new Moments(0, Double.NaN, Double.NaN, Double.NaN, Double.NaN);

  public Moments {
    if (count < 0) {
      throw new IllegalArgumentException("Cannot have a negative count " + count);
    }
  }

  /**
   * Builds moments from a count, mean and sample standard deviation (as Spark reports them).
   * A count of 0 gives {@link #EMPTY}; a count of 1 gives m2 = 0 whatever the standard deviation
   * (Spark reports NaN or null there); otherwise m2 = stddev^2 (count - 1), NaN if stddev is NaN.
   */
  public static Moments of(long count, double mean, double stddev, double min, double max) {
    if (count == 0) {
      return EMPTY;
    }
    double m2 = count == 1 ? 0.0 : stddev * stddev * (count - 1);
    return new Moments(count, mean, m2, min, max);
  }

  /** Sample variance m2 / (n - 1); NaN for fewer than two values. */
  public double variance() {
    return count < 2 ? Double.NaN : m2 / (count - 1);
  }

  /** Sample standard deviation; NaN for fewer than two values. */
  public double stddev() {
    return Math.sqrt(variance());
  }

  /**
   * The moments of this data with {@code copies} more values all equal to {@code value}, exactly
   * (Chan et al.'s combination with a zero-variance part). Zero copies return this.
   *
   * @throws IllegalArgumentException for negative copies or a non-finite value
   */
  public Moments withPointMass(double value, long copies) {
    if (copies < 0) {
      throw new IllegalArgumentException("Cannot add " + copies + " copies of a value");
    }
    requireFinite(value);
    return copies == 0 ? this : merge(new Moments(copies, value, 0.0, value, value));
  }

  /** Chan et al.'s pairwise combination of two disjoint parts. */
  public Moments merge(Moments other) {
    if (other.count == 0) {
      return this;
    }
    if (count == 0) {
      return other;
    }
    long n = count + other.count;
    double delta = other.mean - mean;
    double otherShare = (double) other.count / n;
    double combinedMean = mean + delta * otherShare;
    double combinedM2 = m2 + other.m2 + delta * delta * count * otherShare;
    return new Moments(
        n, combinedMean, combinedM2, Math.min(min, other.min), Math.max(max, other.max));
  }

  private static void requireFinite(double x) {
    if (!Double.isFinite(x)) {
      throw new IllegalArgumentException("Cannot summarise the non-finite value " + x);
    }
  }
}
