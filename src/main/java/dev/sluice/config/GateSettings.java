package dev.sluice.config;

import java.util.OptionalDouble;

/**
 * What the gates guard for the whole table; the column limits are in {@link ColumnLimits}.
 *
 * @param onBreach what becomes of the treated output when a limit is passed
 * @param quarantinedShare the largest share of the rows read that may go to quarantine (empty: no
 *     limit)
 */
public record GateSettings(OnBreach onBreach, OptionalDouble quarantinedShare) {
  /** The defaults: no table limit, output held back on a breach. */
  public static final GateSettings DEFAULT = new GateSettings(OnBreach.HOLD, OptionalDouble.empty());

  /** Config values: hold, publish. */
  public enum OnBreach {
    /** treated/ and quarantine/ are published under held/ instead, for review; nothing is lost. */
    HOLD,
    /** Published as on success; the run still exits with code 4. */
    PUBLISH
  }
}
