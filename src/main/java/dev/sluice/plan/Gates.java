package dev.sluice.plan;

import dev.sluice.config.ColumnLimits;
import dev.sluice.config.GateSettings;
import dev.sluice.config.Settings;
import dev.sluice.config.SettingsLoader;
import java.util.List;
import java.util.OptionalDouble;
import java.util.SortedMap;
import java.util.TreeMap;

/**
 * The gates of a plan: the limits its data must keep to, carried in plan.json so that {@code
 * treat} checks each new partition against the limits reviewed with the plan.
 *
 * @param onBreach hold or publish: what becomes of the treated output when a limit is passed
 * @param quarantinedShare the largest share of the rows read that may go to quarantine (null: no
 *     limit)
 * @param columns the limits of each treated column that has any, by name
 */
public record Gates(String onBreach, Double quarantinedShare, SortedMap<String, Limits> columns) {
  /** No limits; a breach cannot happen. */
  public static final Gates NONE = new Gates("hold", null, new TreeMap<>());

  /**
   * One column's limits (null: no limit).
   *
   * @param nullRate the most nulls, as a share of the rows read
   * @param beyondShare the largest share of usable values beyond the outlier limits
   * @param psi the largest population stability index against the fit-time bins
   */
  public record Limits(Double nullRate, Double beyondShare, Double psi) {}

  /** Whether a breach holds the treated output back (the default) rather than publishing it. */
  public boolean holds() {
    return !"publish".equals(onBreach);
  }

  /** The gates the settings give the plan's treated, kept columns. */
  public static Gates of(Settings settings, List<ColumnPlan> columns) {
    SortedMap<String, Limits> limits = new TreeMap<>();
    for (ColumnPlan cp : columns) {
      ColumnLimits l = settings.column(cp.name()).limits();
      // A column that is not numeric has no outlier limits and no quartile bins: only its null rate is measured.
      boolean numeric = cp.kind().equals("numeric");
      Limits own = new Limits(boxed(l.nullRate()), numeric ? boxed(l.beyondShare()) : null, numeric ? boxed(l.psi()) : null);
      if (cp.treated() && cp.kept() && (own.nullRate() != null || own.beyondShare() != null || own.psi() != null)) {
        limits.put(cp.name(), own);
      }
    }
    GateSettings g = settings.gates();
    return new Gates(SettingsLoader.configName(g.onBreach()), boxed(g.quarantinedShare()), limits);
  }

  /**
   * These gates with each setting that {@code given} names taken from {@code settings} instead:
   * {@code gates.on-breach}, {@code gates.quarantined-share}, and a column limit given under
   * {@code defaults.limits} (for every column) or under the column's own {@code limits}.
   *
   * @param given the keys set, in HOCON path syntax, e.g. {@code sluice.defaults.limits.psi}
   */
  public Gates overriddenBy(Settings settings, java.util.Set<String> given, List<ColumnPlan> columns) {
    Gates fresh = of(settings, columns);
    String breach = given.contains("sluice.gates.on-breach") ? fresh.onBreach() : onBreach;
    Double share = given.contains("sluice.gates.quarantined-share") ? fresh.quarantinedShare() : quarantinedShare;
    SortedMap<String, Limits> limits = new TreeMap<>();
    for (ColumnPlan cp : columns) {
      if (!cp.treated() || !cp.kept()) {
        continue;
      }
      Limits old = this.columns.getOrDefault(cp.name(), new Limits(null, null, null));
      Limits now = fresh.columns().getOrDefault(cp.name(), new Limits(null, null, null));
      java.util.function.Predicate<String> set = k -> given.contains("sluice.defaults.limits." + k)
          || given.contains(com.typesafe.config.ConfigUtil.joinPath("sluice", "columns", cp.name(), "limits", k));
      Limits merged = new Limits(set.test("null-rate") ? now.nullRate() : old.nullRate(),
          set.test("beyond-share") ? now.beyondShare() : old.beyondShare(),
          set.test("psi") ? now.psi() : old.psi());
      if (merged.nullRate() != null || merged.beyondShare() != null || merged.psi() != null) {
        limits.put(cp.name(), merged);
      }
    }
    return new Gates(breach, share, limits);
  }

  private static Double boxed(OptionalDouble x) {
    return x.isPresent() ? x.getAsDouble() : null;
  }
}
