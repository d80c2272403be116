package dev.sluice.config;

import java.util.OptionalDouble;

/**
 * The gate limits of one column (empty: no limit). A run whose data passes one of them ends with
 * exit code 4 and, by default, holds its treated output back ({@link GateSettings}).
 *
 * @param nullRate the most nulls, as a share of the rows read
 * @param beyondShare the largest share of usable values beyond the outlier limits
 * @param psi the largest population stability index against the plan's fit ({@code treat} only)
 */
public record ColumnLimits(OptionalDouble nullRate, OptionalDouble beyondShare, OptionalDouble psi) {
  /** No limits: the default. */
  public static final ColumnLimits NONE =
      new ColumnLimits(OptionalDouble.empty(), OptionalDouble.empty(), OptionalDouble.empty());

  public boolean any() {
    return nullRate.isPresent() || beyondShare.isPresent() || psi.isPresent();
  }
}
