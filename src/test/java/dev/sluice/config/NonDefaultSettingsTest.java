package dev.sluice.config;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.entry;

import com.typesafe.config.Config;
import java.util.List;
import java.util.Optional;
import org.junit.jupiter.api.Test;

/** The rendering of what a run changed from reference.conf, for the report. */
class NonDefaultSettingsTest {

  @Test
  void referenceAloneChangesNothing() {
    Config effective = SettingsLoader.effectiveConfig(Optional.empty(), List.of());
    assertThat(SettingsLoader.nonDefaultSettings(effective)).isEmpty();
  }

  @Test
  void listsChangedKeysSortedWithPlainValues() {
    Config effective =
        SettingsLoader.effectiveConfig(
            Optional.empty(),
            List.of(
                "quantiles.pilot-rows=50000",
                "defaults.outliers.iqr-k=1.5",
                "spark.conf.\"spark.sql.shuffle.partitions\"=4",
                "columns.\"gross.weight\".outliers.action=flag",
                "defaults.valid-min=0",
                "input.format=csv"));
    assertThat(SettingsLoader.nonDefaultSettings(effective))
        .containsExactly(
            entry("sluice.columns.\"gross.weight\".outliers.action", "flag"),
            entry("sluice.defaults.valid-min", "0"),
            entry("sluice.input.format", "csv"),
            entry("sluice.quantiles.pilot-rows", "50000"),
            entry("sluice.spark.conf.\"spark.sql.shuffle.partitions\"", "4"));
  }

  @Test
  void aBoundClearedBackToNullIsNotAChange() {
    Config effective =
        SettingsLoader.effectiveConfig(Optional.empty(), List.of("defaults.valid-max=null"));
    assertThat(SettingsLoader.nonDefaultSettings(effective)).isEmpty();
  }
}
