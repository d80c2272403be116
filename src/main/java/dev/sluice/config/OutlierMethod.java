package dev.sluice.config;

/** How outlier limits are found. Config values: iqr, zscore, mad, none. */
public enum OutlierMethod {
  /** Tukey's fences Q1 - k IQR, Q3 + k IQR. */
  IQR,
  /** mean -/+ limit * standard deviation. */
  ZSCORE,
  /** Modified z-score 0.6745 (x - median) / MAD beyond a limit. */
  MAD,
  /** No outlier limits. */
  NONE
}
