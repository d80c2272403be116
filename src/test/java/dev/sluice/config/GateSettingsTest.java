package dev.sluice.config;

import static dev.sluice.config.ConfigTesting.parse;
import static dev.sluice.config.ConfigTesting.rejection;
import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;

import dev.sluice.SluiceException;
import java.util.List;
import java.util.Optional;
import org.junit.jupiter.api.Test;

/** The gates and column limits: defaults, inheritance, and each rejected value with its message. */
class GateSettingsTest {

  @Test
  void byDefaultNothingIsLimitedAndABreachWouldHoldTheOutputBack() {
    Settings s = parse("");
    assertThat(s.gates()).isEqualTo(GateSettings.DEFAULT);
    assertThat(s.column("any").limits()).isEqualTo(ColumnLimits.NONE);
    assertThat(s.column("any").limits().any()).isFalse();
  }

  @Test
  void aColumnInheritsTheDefaultLimitsKeyByKey() {
    Settings s = parse("sluice.defaults.limits { null-rate = 0.1, psi = 0.25 }\n"
        + "sluice.columns.humidity.limits.psi = 0.5\n"
        + "sluice.gates { on-breach = publish, quarantined-share = 0.02 }");
    assertThat(s.column("humidity").limits().nullRate()).hasValue(0.1);
    assertThat(s.column("humidity").limits().psi()).hasValue(0.5);
    assertThat(s.column("other").limits().psi()).hasValue(0.25);
    assertThat(s.column("other").limits().beyondShare()).isEmpty();
    assertThat(s.gates().onBreach()).isEqualTo(GateSettings.OnBreach.PUBLISH);
    assertThat(s.gates().quarantinedShare()).hasValue(0.02);
  }

  @Test
  void eachBadValueIsNamed() {
    rejection("sluice.defaults.limits.null-rate = 1.5")
        .isEqualTo("Cannot set sluice.defaults.limits.null-rate to 1.5: expected a number from 0 to 1, or null for no limit");
    rejection("sluice.gates.quarantined-share = -0.1")
        .isEqualTo("Cannot set sluice.gates.quarantined-share to -0.1: expected a number from 0 to 1, or null for no limit");
    rejection("sluice.defaults.limits.psi = -1")
        .isEqualTo("Cannot set sluice.defaults.limits.psi to -1: expected a number of at least 0, or null for no limit");
    rejection("sluice.gates.on-breach = warn").isEqualTo("Cannot set sluice.gates.on-breach to \"warn\": expected one of hold, publish");
    rejection("sluice.columns.pallet { role = identifier, limits.null-rate = 0.1 }")
        .contains("which is never treated; remove its limits settings");
  }

  @Test
  void treatMayOnlyBeGivenGatesLimitsAndSparkSettings() {
    assertThat(SettingsLoader.requireOnlyGates(Optional.empty(), List.of("defaults.limits.psi=0.3",
        "columns.\"air temp\".limits.null-rate=0.1", "gates.on-breach=publish", "spark.conf.\"spark.sql.shuffle.partitions\"=4")))
        .containsExactlyInAnyOrder("sluice.defaults.limits.psi", "sluice.columns.\"air temp\".limits.null-rate",
            "sluice.gates.on-breach", "sluice.spark.conf.\"spark.sql.shuffle.partitions\"");
    assertThatThrownBy(() -> SettingsLoader.requireOnlyGates(Optional.empty(),
        List.of("defaults.limits.psi=0.3", "defaults.outliers.iqr-k=3")))
        .isInstanceOf(SluiceException.class)
        .hasMessage("treat takes its treatment from the plan; of the settings only gates, limits, input and spark may be given,"
            + " not sluice.defaults.outliers.iqr-k");
  }
}
