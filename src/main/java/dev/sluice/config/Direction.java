package dev.sluice.config;

/** Which side of the distribution can hold outliers. Config values: both, low, high. */
public enum Direction {
  BOTH,
  /** Only low values are outliers, e.g. a score where higher is better. */
  LOW,
  /** Only high values are outliers. */
  HIGH;

  public boolean lowSide() {
    return this != HIGH;
  }

  public boolean highSide() {
    return this != LOW;
  }
}
