package dev.sluice.stats;

import java.math.BigDecimal;
import java.math.MathContext;

/**
 * The precision at which fitted numbers are published and applied: 12 significant digits.
 *
 * <p>Spark adds partial results in whatever order tasks finish, so a mean or a correlation can
 * differ in its last bits between two runs or two partitionings of the same data. Rounding every
 * number of a plan to 12 significant digits, well above what the statistics can claim, makes the
 * plan, the summary and the treated values the same run after run. Non-finite values pass as they
 * are.
 */
public final class Published {
  public static final int SIGNIFICANT_DIGITS = 12;
  private static final MathContext CONTEXT = new MathContext(SIGNIFICANT_DIGITS);

  private Published() {}

  public static double round(double x) {
    if (!Double.isFinite(x) || x == 0.0) {
      return x;
    }
    return new BigDecimal(x).round(CONTEXT).doubleValue();
  }

  /** Null stays null. */
  public static Double round(Double x) {
    return x == null ? null : round(x.doubleValue());
  }
}
