package dev.sluice.config;

import java.util.OptionalDouble;

/**
 * The fully resolved settings of one column: the global defaults with the column's own overrides
 * applied.
 *
 * @param validMin values below are incorrect entries (empty: no lower bound)
 * @param validMax values above are incorrect entries (empty: no upper bound)
 * @param invalidAction what happens to an incorrect entry
 * @param limits the column's gate limits
 */
public record ColumnSettings(
    String name,
    Role role,
    OptionalDouble validMin,
    OptionalDouble validMax,
    InvalidAction invalidAction,
    OutlierSettings outliers,
    MissingSettings missing,
    ScalingMethod scaling,
    ColumnLimits limits) {

  /**
   * True when a later step needs the quartiles of the values after the outlier step: filling by
   * the median, or robust scaling.
   */
  public boolean usesTreatedQuartiles() {
    return missing.strategy() == ImputeStrategy.MEDIAN || scaling == ScalingMethod.ROBUST;
  }

  /** Settings whose incorrect entries become missing (the default). */
  public ColumnSettings(
      String name,
      Role role,
      OptionalDouble validMin,
      OptionalDouble validMax,
      OutlierSettings outliers,
      MissingSettings missing,
      ScalingMethod scaling) {
    this(name, role, validMin, validMax, InvalidAction.SET_MISSING, outliers, missing, scaling,
        ColumnLimits.NONE);
  }

  /** The same settings under another column name. */
  public ColumnSettings named(String other) {
    return new ColumnSettings(
        other, role, validMin, validMax, invalidAction, outliers, missing, scaling, limits);
  }
}
