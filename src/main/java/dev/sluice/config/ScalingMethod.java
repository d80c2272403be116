package dev.sluice.config;

/** Rescaling of treated numeric columns. Config values: none, standard, min-max, robust, max-abs. */
public enum ScalingMethod {
  NONE,
  STANDARD,
  MIN_MAX,
  ROBUST,
  MAX_ABS
}
