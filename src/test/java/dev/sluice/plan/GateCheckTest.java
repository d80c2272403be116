package dev.sluice.plan;

import static org.assertj.core.api.Assertions.assertThat;

import dev.sluice.config.Settings;
import dev.sluice.config.SettingsLoader;
import java.util.List;
import java.util.Optional;
import java.util.OptionalDouble;
import java.util.Set;
import java.util.TreeMap;
import org.junit.jupiter.api.Test;

/** The gates: which limits a run's figures pass, and how gates given to treat replace the plan's. */
class GateCheckTest {
  private static final Gates GATES = new Gates("hold", 0.01, new TreeMap<>(java.util.Map.of(
      "humidity", new Gates.Limits(0.2, null, 0.25),
      "dwell", new Gates.Limits(null, 0.05, null))));

  @Test
  void aLimitIsPassedOnlyWhenTheFigureIsAboveIt() {
    List<GateCheck.Breach> none = GateCheck.check(GATES, List.of(
        new GateCheck.Reading("humidity", 0.2, 0.9, 0.25), // at the limits: kept ("at most")
        new GateCheck.Reading("dwell", 0.9, 0.05, 9.0),    // no null-rate or psi limit on dwell
        new GateCheck.Reading("other", 1.0, 1.0, 9.0)),    // no limits at all
        OptionalDouble.of(0.01));
    assertThat(none).isEmpty();

    List<GateCheck.Breach> passed = GateCheck.check(GATES, List.of(
        new GateCheck.Reading("humidity", 0.3125, 0.0, Double.NaN), // psi not measured: no verdict
        new GateCheck.Reading("dwell", 0.0, 0.0625, Double.NaN)),
        OptionalDouble.of(0.02));
    assertThat(passed).extracting(GateCheck.Breach::describe).containsExactly(
        "humidity: null-rate 0.3125 is above its limit 0.2",
        "dwell: beyond-share 0.0625 is above its limit 0.05",
        "table: quarantined-share 0.02 is above its limit 0.01");
    assertThat(passed.get(2).column()).isNull();
  }

  @Test
  void aFittingRunHasNoQuarantineShareAndNoDriftToCheck() {
    Gates strict = new Gates("hold", 0.0, new TreeMap<>(java.util.Map.of("x", new Gates.Limits(null, null, 0.0))));
    assertThat(GateCheck.check(strict, List.of(new GateCheck.Reading("x", 0.5, 0.5, Double.NaN)),
        OptionalDouble.empty())).isEmpty();
  }

  @Test
  void figuresAreShownWithFourSignificantDigits() {
    assertThat(GateCheck.shown(0.123456)).isEqualTo("0.1235");
    assertThat(GateCheck.shown(0.2)).isEqualTo("0.2");
    assertThat(GateCheck.shown(12.5)).isEqualTo("12.5");
    assertThat(GateCheck.shown(0.0)).isEqualTo("0");
  }

  @Test
  void settingsGiveLimitsToTreatedKeptColumnsOnly() {
    Settings s = SettingsLoader.load(Optional.empty(), List.of("defaults.limits.null-rate=0.1",
        "columns.b.limits.psi=0.25", "gates.quarantined-share=0.02", "gates.on-breach=publish"));
    Gates g = Gates.of(s, List.of(column("a", true, true), column("b", true, true),
        column("kept-as-is", false, true), column("dropped", true, false)));
    assertThat(g.onBreach()).isEqualTo("publish");
    assertThat(g.holds()).isFalse();
    assertThat(g.quarantinedShare()).isEqualTo(0.02);
    assertThat(g.columns()).containsOnlyKeys("a", "b");
    assertThat(g.columns().get("a")).isEqualTo(new Gates.Limits(0.1, null, null));
    assertThat(g.columns().get("b")).isEqualTo(new Gates.Limits(0.1, null, 0.25));
    assertThat(Gates.of(SettingsLoader.load(Optional.empty(), List.of()), List.of(column("a", true, true))))
        .isEqualTo(Gates.NONE);
    // A text column has no outlier limits or quartile bins: only its null-rate limit is kept.
    ColumnPlan text = new ColumnPlan("class", "string", "categorical", "treat", true, null, null, "none", null, null,
        null, null, null);
    Settings all = SettingsLoader.load(Optional.empty(), List.of("defaults.limits.null-rate=0.1",
        "defaults.limits.psi=0.25", "defaults.limits.beyond-share=0.01"));
    assertThat(Gates.of(all, List.of(text)).columns().get("class")).isEqualTo(new Gates.Limits(0.1, null, null));
  }

  @Test
  void aGateSettingGivenToTreatReplacesOnlyThatSettingOfThePlan() {
    List<ColumnPlan> cols = List.of(column("humidity", true, true), column("dwell", true, true));
    Settings s = SettingsLoader.load(Optional.empty(), List.of("defaults.limits.psi=0.5", "columns.dwell.limits.null-rate=0.3"));
    Gates g = GATES.overriddenBy(s, Set.of("sluice.defaults.limits.psi", "sluice.columns.dwell.limits.null-rate"), cols);
    assertThat(g.onBreach()).isEqualTo("hold");
    assertThat(g.quarantinedShare()).isEqualTo(0.01);
    assertThat(g.columns().get("humidity")).isEqualTo(new Gates.Limits(0.2, null, 0.5));
    assertThat(g.columns().get("dwell")).isEqualTo(new Gates.Limits(0.3, 0.05, 0.5));
    // Nothing given: the plan's gates as they are.
    assertThat(GATES.overriddenBy(SettingsLoader.load(Optional.empty(), List.of()), Set.of(), cols)).isEqualTo(GATES);
  }

  private static ColumnPlan column(String name, boolean treated, boolean kept) {
    return new ColumnPlan(name, "double", "numeric", "treat", treated, null, null, "set-missing", null, null, null,
        kept ? null : "dropped", null);
  }
}
