package dev.sluice.config;

/** What the job may do with a column. Config values: treat, keep, identifier, required. */
public enum Role {
  /** Profiled and treated (the default for numeric columns). */
  TREAT,
  /** Profiled, written unchanged. */
  KEEP,
  /** Written unchanged, counted but not profiled as a measurement, never correlated. */
  IDENTIFIER,
  /** Treated like TREAT, and a row missing this column is sent to quarantine, not imputed. */
  REQUIRED
}
