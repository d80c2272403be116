package dev.sluice.config;

/**
 * What happens to a value outside the validity bounds (an incorrect entry). Config values:
 * set-missing, quarantine.
 */
public enum InvalidAction {
  /** The value becomes missing; the missing-value step may then fill it. */
  SET_MISSING,
  /** The whole row goes to quarantine with its original values. */
  QUARANTINE
}
