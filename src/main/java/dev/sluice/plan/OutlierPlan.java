package dev.sluice.plan;

import dev.sluice.config.ColumnSettings;
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
    return new NumericSteps(validMin == null ? Double.NEGATIVE_INFINITY : validMin,
        validMax == null ? Double.POSITIVE_INFINITY : validMax, stepAction(),
        lower == null ? Double.NEGATIVE_INFINITY : lower, upper == null ? Double.POSITIVE_INFINITY : upper);
  }

  /** {@link #steps(Double, Double)} with the column's configured validity bounds. */
  public NumericSteps steps(ColumnSettings column) {
    return steps(column.validMin().isPresent() ? column.validMin().getAsDouble() : null,
        column.validMax().isPresent() ? column.validMax().getAsDouble() : null);
  }

  /** What the action does to a value beyond a limit (whether or not there is a limit). */
  public NumericSteps.Action stepAction() {
    return switch (action) {
      case "cap" -> NumericSteps.Action.CAP;
      case "set-missing", "quarantine" -> NumericSteps.Action.REMOVE;
      default -> NumericSteps.Action.LEAVE;
    };
  }

  public static OutlierPlan none(String reason) {
    return new OutlierPlan("none", "both", "keep", null, null, null, null, null, null, reason);
  }
}
