package dev.sluice.config;

import java.util.Map;

/**
 * Every setting of a run, immutable, parsed once from reference.conf, the user's file and the
 * command line (in that order of increasing precedence).
 *
 * @param sparkMaster master URL for local runs (ignored when a session already exists)
 * @param sparkConf extra Spark settings passed through as given
 * @param gates what a breached limit does to the treated output, and the table-wide limit
 * @param groups the columns whose groups get their own limits and fill values
 * @param defaults the column settings that apply to a column not named in {@code columns}
 * @param columns the columns named in config, by exact name, defaults applied
 */
public record Settings(
    String sparkMaster,
    Map<String, String> sparkConf,
    InputSettings input,
    QuantileSettings quantiles,
    CollinearitySettings collinearity,
    GateSettings gates,
    GroupSettings groups,
    ColumnSettings defaults,
    Map<String, ColumnSettings> columns) {

  /** The settings of a column: its own entry, or the defaults under its name. */
  public ColumnSettings column(String name) {
    ColumnSettings own = columns.get(name);
    if (own != null) {
      return own;
    }
    return defaults.named(name);
  }
}
