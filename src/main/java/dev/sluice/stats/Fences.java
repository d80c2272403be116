package dev.sluice.stats;

/**
 * A pair of outlier limits. A value strictly below {@code lower} or strictly above {@code upper}
 * lies beyond the fences. An absent side is represented by an infinite limit.
 */
public record Fences(double lower, double upper) {
  /** Consistency constant of the modified z-score, 0.6745 (Iglewicz and Hoaglin, 1993). */
  public static final double MODIFIED_Z_CONSTANT = 0.6745;

  public Fences {
    // reject NaN limits and lower > upper with IllegalArgumentException
  }

  /** Tukey's fences: Q1 - k IQR and Q3 + k IQR (k = 1.5 inner, 3 outer). */
  public static Fences tukey(double q1, double q3, double k) {
    throw new UnsupportedOperationException("todo");
  }

  /** mean -/+ limit * sd: the values whose |z| exceeds {@code limit}. */
  public static Fences zScore(double mean, double sd, double limit) {
    throw new UnsupportedOperationException("todo");
  }

  /**
   * Values whose modified z-score |0.6745 (x - median) / MAD| exceeds {@code limit}, that is
   * median -/+ limit * MAD / 0.6745.
   */
  public static Fences modifiedZ(double median, double mad, double limit) {
    throw new UnsupportedOperationException("todo");
  }

  /** Keeps only the lower side, the upper side or both; an unused side becomes infinite. */
  public Fences sides(boolean lowerSide, boolean upperSide) {
    throw new UnsupportedOperationException("todo");
  }

  public boolean isBelow(double x) {
    return x < lower;
  }

  public boolean isAbove(double x) {
    return x > upper;
  }

  /** Winsorizes: returns x clamped to [lower, upper]. */
  public double cap(double x) {
    throw new UnsupportedOperationException("todo");
  }
}
