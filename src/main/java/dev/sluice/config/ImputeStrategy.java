package dev.sluice.config;

/** How missing values are filled. Config values: median, mean, mode, constant, none. */
public enum ImputeStrategy {
  MEDIAN,
  MEAN,
  MODE,
  CONSTANT,
  /** Leave missing values missing. */
  NONE
}
