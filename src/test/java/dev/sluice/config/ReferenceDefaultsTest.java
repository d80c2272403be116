package dev.sluice.config;

import static org.assertj.core.api.Assertions.assertThat;

import com.typesafe.config.ConfigUtil;
import java.io.IOException;
import java.io.InputStream;
import java.nio.charset.StandardCharsets;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.OptionalDouble;
import java.util.regex.Pattern;
import org.junit.jupiter.api.Test;

/** reference.conf alone: the documented keys, comments and default values. */
class ReferenceDefaultsTest {
  private static final Pattern KEY_LINE = Pattern.compile("^\\s*[\"A-Za-z][^=#{]*(=|\\{).*");

  @Test
  void everyDefaultIsTheDocumentedValue() {
    Settings s = SettingsLoader.load(Optional.empty(), List.of());
    assertThat(s.sparkMaster()).isEqualTo("local[*]");
    assertThat(s.sparkConf()).isEmpty();
    assertThat(s.input()).isEqualTo(new InputSettings(Optional.empty(), ",", Optional.empty()));
    assertThat(s.quantiles()).isEqualTo(new QuantileSettings(200_000, 8_000_000));
    // The held values are shared by a pass's windows, down to a floor per window.
    assertThat(s.quantiles().heldPerWindow(30)).isEqualTo(266_666);
    assertThat(s.quantiles().heldPerWindow(100_000)).isEqualTo(1_000);
    assertThat(s.collinearity()).isEqualTo(new CollinearitySettings(true, 0.9, 10, false, 500, 100_000));
    assertThat(s.defaults()).isEqualTo(documentedDefaults(""));
    assertThat(s.columns()).isEmpty();
  }

  @Test
  void anUnnamedColumnGetsTheDefaultsUnderItsOwnName() {
    Settings s = SettingsLoader.load(Optional.empty(), List.of());
    assertThat(s.column("energy_kwh")).isEqualTo(documentedDefaults("energy_kwh"));
  }

  @Test
  void referenceHoldsExactlyTheDocumentedKeys() {
    Map<String, ?> leaves =
        ConfigTree.leaves(
            SettingsLoader.reference().getObject("sluice"),
            List.of("sluice"),
            ConfigUtil::joinPath);
    assertThat(leaves.keySet())
        .containsExactly(
            "sluice.collinearity.drop",
            "sluice.collinearity.enabled",
            "sluice.collinearity.max-columns",
            "sluice.collinearity.pair-threshold",
            "sluice.collinearity.spearman-rows",
            "sluice.collinearity.vif-limit",
            "sluice.columns",
            "sluice.defaults.invalid-action",
            "sluice.defaults.limits.beyond-share",
            "sluice.defaults.limits.null-rate",
            "sluice.defaults.limits.psi",
            "sluice.defaults.missing.constant",
            "sluice.defaults.missing.drop-null-rate",
            "sluice.defaults.missing.indicator",
            "sluice.defaults.missing.strategy",
            "sluice.defaults.outliers.action",
            "sluice.defaults.outliers.direction",
            "sluice.defaults.outliers.iqr-k",
            "sluice.defaults.outliers.mad-limit",
            "sluice.defaults.outliers.method",
            "sluice.defaults.outliers.outer-k",
            "sluice.defaults.outliers.z-limit",
            "sluice.defaults.role",
            "sluice.defaults.scaling",
            "sluice.defaults.valid-max",
            "sluice.defaults.valid-min",
            "sluice.gates.on-breach",
            "sluice.gates.quarantined-share",
            "sluice.groups.by",
            "sluice.groups.max-groups",
            "sluice.groups.min-values",
            "sluice.input.csv.delimiter",
            "sluice.input.csv.header",
            "sluice.input.csv.schema",
            "sluice.input.format",
            "sluice.quantiles.max-held-values",
            "sluice.quantiles.pilot-rows",
            "sluice.spark.conf",
            "sluice.spark.master");
  }

  @Test
  void everyKeyLineOfReferenceConfHasAComment() throws IOException {
    List<String> keyLines =
        referenceText().lines().filter(line -> KEY_LINE.matcher(line).matches()).toList();
    assertThat(keyLines).hasSizeGreaterThan(30);
    assertThat(keyLines).allSatisfy(line -> assertThat(line).contains("#"));
  }

  @Test
  void keyLineCheckSeesAnUncommentedKey() {
    assertThat(KEY_LINE.matcher("    iqr-k = 1.5").matches()).isTrue();
    assertThat(KEY_LINE.matcher("    # iqr-k = 1.5").matches()).isFalse();
  }

  private static String referenceText() throws IOException {
    try (InputStream in = SettingsLoader.class.getResourceAsStream("/reference.conf")) {
      return new String(in.readAllBytes(), StandardCharsets.UTF_8);
    }
  }

  private static ColumnSettings documentedDefaults(String name) {
    return new ColumnSettings(
        name,
        Role.TREAT,
        OptionalDouble.empty(),
        OptionalDouble.empty(),
        new OutlierSettings(
            OutlierMethod.IQR, 1.5, 3.0, 3.0, 3.5, Direction.BOTH, OutlierAction.CAP),
        new MissingSettings(0.5, ImputeStrategy.MEDIAN, Optional.empty(), false),
        ScalingMethod.NONE);
  }
}
