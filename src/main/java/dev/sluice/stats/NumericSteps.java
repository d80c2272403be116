package dev.sluice.stats;

import java.io.Serializable;

/**
 * Steps 2 and 3 of the order of treatment for one numeric value, in plain Java: validity bounds,
 * then the outlier action. The statistics passes use it on each value; the writing pass applies
 * the same steps as Catalyst expressions ({@code treat.Treatments}), and the two must agree on
 * every double, which a test checks. {@code plan.ColumnPlan#steps} builds one from a plan.
 *
 * <p>NaN stands for "no value": a null, NaN or infinite input, a value outside the validity
 * bounds, and a value that the outlier action removes (set-missing, quarantine).
 */
public final class NumericSteps implements Serializable {
  private static final long serialVersionUID = 1L;

  /** What the outlier step does to a value beyond a limit. */
  public enum Action { CAP, REMOVE, LEAVE }

  private final double validMin;
  private final double validMax;
  private final Action action;
  private final double lower;
  private final double upper;

  /**
   * @param validMin lowest valid value, -Infinity for none (likewise validMax)
   * @param lower the outlier limit below which the action applies, -Infinity for none
   * @param upper the outlier limit above which the action applies, +Infinity for none
   */
  public NumericSteps(double validMin, double validMax, Action action, double lower, double upper) {
    this.validMin = validMin;
    this.validMax = validMax;
    this.action = action;
    this.lower = lower;
    this.upper = upper;
  }

  /** Validity bounds only, before any outlier limit is known (pass 1). */
  public static NumericSteps validity(Double validMin, Double validMax) {
    return new NumericSteps(orMinus(validMin), orPlus(validMax), Action.LEAVE,
        Double.NEGATIVE_INFINITY, Double.POSITIVE_INFINITY);
  }

  static double orMinus(Double d) {
    return d == null ? Double.NEGATIVE_INFINITY : d;
  }

  static double orPlus(Double d) {
    return d == null ? Double.POSITIVE_INFINITY : d;
  }

  /** The lowest valid value, -Infinity for none. */
  public double validMin() {
    return validMin;
  }

  /** The highest valid value, +Infinity for none. */
  public double validMax() {
    return validMax;
  }

  /** True when the outlier step removes values (set-missing, quarantine): it changes their number. */
  public boolean removes() {
    return action == Action.REMOVE;
  }

  /** True for a finite value outside the validity bounds: an incorrect entry. */
  public boolean invalid(double x) {
    return Double.isFinite(x) && (x < validMin || x > validMax);
  }

  /** Step 2: x where it is finite and within the bounds, else NaN. */
  public double valid(double x) {
    return Double.isFinite(x) && !(x < validMin || x > validMax) ? x : Double.NaN;
  }

  /** Step 3 on a valid value (NaN passes through): capped, removed (NaN) or left. */
  public double afterOutliers(double v) {
    switch (action) {
      case CAP:
        return v < lower ? lower : v > upper ? upper : v;
      case REMOVE:
        return v < lower || v > upper ? Double.NaN : v;
      default:
        return v;
    }
  }

  /** Steps 2 and 3. */
  public double treated(double x) {
    return afterOutliers(valid(x));
  }
}
