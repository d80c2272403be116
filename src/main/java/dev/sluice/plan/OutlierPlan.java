package dev.sluice.plan;

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

  public static OutlierPlan none(String reason) {
    return new OutlierPlan("none", "both", "keep", null, null, null, null, null, null, reason);
  }
}
