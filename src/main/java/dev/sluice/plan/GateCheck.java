package dev.sluice.plan;

import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.OptionalDouble;

/**
 * Checks what a run measured against the gates of its plan. A figure that was not measured (NaN:
 * no drift index in a fitting run, no values in a column) passes no limit and breaks none.
 */
public final class GateCheck {
  private GateCheck() {}

  /**
   * What a run measured of one column.
   *
   * @param nullRate nulls among the rows read
   * @param beyondShare usable values beyond the outlier limits, among the usable values
   * @param psi the population stability index against the plan's fit
   */
  public record Reading(String column, double nullRate, double beyondShare, double psi) {}

  /**
   * One limit passed.
   *
   * @param column the column, or null for the table-wide limit
   * @param limit the limit's config key: null-rate, beyond-share, psi or quarantined-share
   * @param max the limit's value
   * @param measured what the run measured
   */
  public record Breach(String column, String limit, double max, double measured) {
    /** One line naming the limit, e.g. {@code humidity_pct: null-rate 0.31 is above its limit 0.2}. */
    public String describe() {
      String where = column == null ? "table" : column;
      return where + ": " + limit + " " + shown(measured) + " is above its limit " + shown(max);
    }
  }

  /**
   * Every limit passed, column by column in reading order and then the table's.
   *
   * @param quarantinedShare the share of the rows read that went to quarantine; empty when the
   *     run treated nothing
   */
  public static List<Breach> check(Gates gates, List<Reading> readings, OptionalDouble quarantinedShare) {
    List<Breach> out = new ArrayList<>();
    Map<String, Gates.Limits> limits = gates.columns();
    for (Reading r : readings) {
      Gates.Limits l = limits.get(r.column());
      if (l == null) {
        continue;
      }
      over(out, r.column(), "null-rate", l.nullRate(), r.nullRate());
      over(out, r.column(), "beyond-share", l.beyondShare(), r.beyondShare());
      over(out, r.column(), "psi", l.psi(), r.psi());
    }
    if (quarantinedShare.isPresent()) {
      over(out, null, "quarantined-share", gates.quarantinedShare(), quarantinedShare.getAsDouble());
    }
    return out;
  }

  private static void over(List<Breach> out, String column, String limit, Double max, double measured) {
    if (max != null && !Double.isNaN(measured) && measured > max) {
      out.add(new Breach(column, limit, max, measured));
    }
  }

  /** The readings of a fitting run: its own null rates and beyond shares; no drift index. */
  public static List<Reading> atFit(Plan plan) {
    List<Reading> out = new ArrayList<>();
    plan.fitted().forEach((name, f) -> out.add(new Reading(name, f.nullRate(),
        f.beyondShare() == null ? Double.NaN : f.beyondShare(), Double.NaN)));
    return out;
  }

  /** Four significant digits, no trailing zeros: 0.3125, 0.2, 12.5. */
  static String shown(double x) {
    return java.math.BigDecimal.valueOf(x).round(new java.math.MathContext(4)).stripTrailingZeros().toPlainString();
  }
}
