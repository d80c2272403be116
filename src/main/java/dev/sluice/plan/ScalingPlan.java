package dev.sluice.plan;

/** The rescaling of one column: treated value becomes (value - centre) / scale. */
public record ScalingPlan(String method, double centre, double scale, boolean zeroSpread, String reason) {
  public static ScalingPlan none() {
    return new ScalingPlan("none", 0.0, 1.0, false, "no scaling configured");
  }

  public boolean active() {
    return !method.equals("none");
  }
}
