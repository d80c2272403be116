package dev.sluice.plan;

import dev.sluice.stats.NumericSteps;

/**
 * The outlier decision of one column. Limits are null where there is none on that side.
 *
 * @param lower the limit the action applies below (null: no lower limit)
 * @param upper the limit the action applies above (null: no upper limit)
 * @param innerLower Tukey inner fence Q1 - k IQR, reported whatever the method
 * @param outerLower Tukey outer fence Q1 - k_outer IQR, reported
 * @param reason why the limits are what they are
 */
public record OutlierPlan(
    String method,
    String direction,
    String action,
    Double lower,
    Double upper,
    Double innerLower,
    Double innerUpper,
    Double outerLower,
    Double outerUpper,
    String reason) {

  public boolean active() {
    return lower != null || upper != null;
  }

  /** Steps 2 and 3 for one value in plain Java: the given validity bounds, then this action. */
  public NumericSteps steps(Double validMin, Double validMax) {
    NumericSteps.Action a = switch (action) {
      case "cap" -> NumericSteps.Action.CAP;
      case "set-missing", "quarantine" -> NumericSteps.Action.REMOVE;
      default -> NumericSteps.Action.LEAVE;
    };
    return new NumericSteps(validMin == null ? Double.NEGATIVE_INFINITY : validMin,
        validMax == null ? Double.POSITIVE_INFINITY : validMax, a,
        lower == null ? Double.NEGATIVE_INFINITY : lower, upper == null ? Double.POSITIVE_INFINITY : upper);
  }

  public static OutlierPlan none(String reason) {
    return new OutlierPlan("none", "both", "keep", null, null, null, null, null, null, reason);
  }
}
