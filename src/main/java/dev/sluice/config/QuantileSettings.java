package dev.sluice.config;

/**
 * @param exactMaxCount quantiles are exact (type 7) when the table has at most this many rows
 * @param relativeError rank error of the approximate quantiles
 * @param rankGridSize number of intervals of the quantile grid used for ranks (Spearman)
 * @param sketch the sketch behind approximate quantiles
 */
public record QuantileSettings(
    long exactMaxCount, double relativeError, int rankGridSize, QuantileSketch sketch) {
  /** Greenwald-Khanna, the deterministic default. */
  public QuantileSettings(long exactMaxCount, double relativeError, int rankGridSize) {
    this(exactMaxCount, relativeError, rankGridSize, QuantileSketch.GK);
  }
}
