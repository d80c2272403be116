package dev.sluice.config;

/** The sketch behind approximate quantiles on tables above {@code quantiles.exact-max-count}. */
public enum QuantileSketch {
  /** Spark's percentile_approx (Greenwald-Khanna): a deterministic rank-error bound; slower. */
  GK,
  /** Spark's kll_sketch_* functions (Apache DataSketches KLL): faster, randomized. */
  KLL
}
