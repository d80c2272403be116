package dev.sluice.config;

import java.util.OptionalDouble;

/**
 * The fully resolved settings of one column: the global defaults with the column's own overrides
 * applied.
 *
 * @param validMin values below are incorrect entries (empty: no lower bound)
 * @param validMax values above are incorrect entries (empty: no upper bound)
 */
public record ColumnSettings(
    String name,
    Role role,
    OptionalDouble validMin,
    OptionalDouble validMax,
    OutlierSettings outliers,
    MissingSettings missing,
    ScalingMethod scaling) {}
