package dev.sluice.plan;

/**
 * The missing-value decision of one column.
 *
 * @param dropColumn the column is left out of the treated output (null rate over the threshold)
 * @param strategy median, mean, mode, constant or none
 * @param fillNumber the value numeric gaps are filled with (null: not filled)
 * @param fillText the value categorical gaps are filled with (null: not filled)
 * @param indicator an added boolean column marks filled rows
 * @param quarantine rows still missing this (required) column go to quarantine
 */
public record MissingPlan(
    boolean dropColumn,
    String strategy,
    Double fillNumber,
    String fillText,
    boolean indicator,
    boolean quarantine,
    String reason) {

  public static MissingPlan untouched(String reason) {
    return new MissingPlan(false, "none", null, null, false, false, reason);
  }

  public boolean fills() {
    return fillNumber != null || fillText != null;
  }
}
