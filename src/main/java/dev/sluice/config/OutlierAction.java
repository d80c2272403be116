package dev.sluice.config;

/** What happens to a value beyond the fences. Config values: cap, set-missing, flag, keep, quarantine. */
public enum OutlierAction {
  /** Replace by the fence it crossed (winsorize). */
  CAP,
  /** Replace by missing; the missing-value step then imputes it. */
  SET_MISSING,
  /** Keep the value and mark the row in an added boolean column. */
  FLAG,
  /** Keep the value; only count it. */
  KEEP,
  /** Send the whole row to quarantine with its original values. */
  QUARANTINE
}
