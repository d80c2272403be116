package dev.sluice.stats;

/**
 * A pair of outlier limits. A value strictly below {@code lower} or strictly above {@code upper}
 * lies beyond the fences. An absent side is represented by an infinite limit.
 *
 * <p>Edge cases: NaN limits and lower > upper are rejected. A zero spread (IQR, standard deviation
 * or MAD of 0) collapses the fences onto their anchors, so with all-equal data every value that
 * differs from the common value lies beyond them; callers that want no flagging then must check
 * the spread first. An infinite multiplier gives infinite fences (nothing is flagged), even with a
 * zero spread. NaN is never below or above the fences, and {@link #cap} passes it through.
 */
public record Fences(double lower, double upper) {
  /** Consistency constant of the modified z-score, 0.6745 (Iglewicz and Hoaglin, 1993). */
  public static final double MODIFIED_Z_CONSTANT = 0.6745;

  public Fences {
    if (Double.isNaN(lower) || Double.isNaN(upper)) {
      throw new IllegalArgumentException(
          "Fence limits must not be NaN: lower = " + lower + ", upper = " + upper);
    }
    if (lower > upper) {
      throw new IllegalArgumentException(
          "Lower fence " + lower + " must not exceed upper fence " + upper);
    }
  }

  /**
   * Tukey's fences: Q1 - k IQR and Q3 + k IQR (k = 1.5 inner, 3 outer).
   *
   * @throws IllegalArgumentException for non-finite quartiles, q1 > q3, or k negative or NaN
   */
  public static Fences tukey(double q1, double q3, double k) {
    requireFinite(q1, "Q1");
    requireFinite(q3, "Q3");
    requireMultiplier(k, "k");
    if (q1 > q3) {
      throw new IllegalArgumentException("Cannot build fences from Q1 = " + q1 + " above Q3 = " + q3);
    }
    double reach = reach(k, q3 - q1);
    return new Fences(q1 - reach, q3 + reach);
  }

  /**
   * mean -/+ limit * sd: the values whose |z| exceeds {@code limit}.
   *
   * @throws IllegalArgumentException for a non-finite mean, sd negative or NaN, limit negative or
   *     NaN
   */
  public static Fences zScore(double mean, double sd, double limit) {
    return symmetric(mean, sd, limit);
  }

  /**
   * Values whose modified z-score |0.6745 (x - median) / MAD| exceeds {@code limit}, that is
   * median -/+ limit * MAD / 0.6745. Same validation as {@link #zScore}.
   */
  public static Fences modifiedZ(double median, double mad, double limit) {
    requireMultiplier(mad, "MAD");
    return symmetric(median, mad / MODIFIED_Z_CONSTANT, limit);
  }

  /** Keeps only the lower side, the upper side or both; an unused side becomes infinite. */
  public Fences sides(boolean lowerSide, boolean upperSide) {
    return new Fences(
        lowerSide ? lower : Double.NEGATIVE_INFINITY, upperSide ? upper : Double.POSITIVE_INFINITY);
  }

  public boolean isBelow(double x) {
    return x < lower;
  }

  public boolean isAbove(double x) {
    return x > upper;
  }

  /** Winsorizes: returns x clamped to [lower, upper]; NaN stays NaN. */
  public double cap(double x) {
    return Math.max(lower, Math.min(upper, x));
  }

  private static Fences symmetric(double centre, double spread, double limit) {
    requireFinite(centre, "centre");
    requireMultiplier(spread, "spread");
    requireMultiplier(limit, "limit");
    double reach = reach(limit, spread);
    return new Fences(centre - reach, centre + reach);
  }

  /** limit * spread, except that an infinite limit always reaches infinitely far (0 * inf is NaN). */
  private static double reach(double limit, double spread) {
    return limit == Double.POSITIVE_INFINITY ? Double.POSITIVE_INFINITY : limit * spread;
  }

  private static void requireFinite(double value, String what) {
    if (!Double.isFinite(value)) {
      throw new IllegalArgumentException("Cannot build fences from " + what + " = " + value);
    }
  }

  private static void requireMultiplier(double value, String what) {
    if (!(value >= 0.0)) {
      throw new IllegalArgumentException(
          "Cannot build fences from " + what + " = " + value + ": it must be zero or more");
    }
  }
}
