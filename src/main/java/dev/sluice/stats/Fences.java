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
   * The range each Tukey fence can take while Q1 lies in [q1Low, q1High] and Q3 in
   * [q3Low, q3High]: {lowerMin, lowerMax, upperMin, upperMax}. Q1 - k IQR = (1 + k) Q1 - k Q3 grows
   * with Q1 and falls with Q3, and Q3 + k IQR the other way round. The range is widened by a
   * relative 1e-9 so that the fences as published (12 significant digits) stay inside it.
   *
   * @throws IllegalArgumentException for non-finite bounds, q1High >= q3Low (the IQR could be
   *     zero), or k negative or NaN
   */
  public static double[] tukeyRange(double q1Low, double q1High, double q3Low, double q3High, double k) {
    for (double b : new double[] {q1Low, q1High, q3Low, q3High}) {
      requireFinite(b, "a quartile bound");
    }
    requireMultiplier(k, "k");
    if (!(q1Low <= q1High && q1High < q3Low && q3Low <= q3High)) {
      throw new IllegalArgumentException("Cannot bound fences from Q1 in [" + q1Low + ", " + q1High
          + "] and Q3 in [" + q3Low + ", " + q3High + "]");
    }
    double[] r = {
      q1Low - reach(k, q3High - q1Low), q1High - reach(k, q3Low - q1High),
      q3Low + reach(k, q3Low - q1High), q3High + reach(k, q3High - q1Low)};
    for (int i = 0; i < 4; i++) {
      double slack = Math.abs(r[i]) * 1e-9 + Double.MIN_NORMAL;
      r[i] += i % 2 == 0 ? -slack : slack;
    }
    return r;
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
