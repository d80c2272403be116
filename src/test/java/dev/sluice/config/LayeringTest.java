package dev.sluice.config;

import static dev.sluice.config.ConfigTesting.failure;
import static dev.sluice.config.ConfigTesting.withOverrides;
import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.entry;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Optional;
import org.assertj.core.api.AbstractStringAssert;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The three layers (overrides, file, reference.conf), the --set syntax and file errors. */
class LayeringTest {
  @TempDir Path dir;

  private Path file(String text) throws IOException {
    Path path = dir.resolve("run.conf");
    Files.writeString(path, text, StandardCharsets.UTF_8);
    return path;
  }

  @Test
  void overrideBeatsFileBeatsReference() throws IOException {
    Path conf = file("sluice.defaults.outliers { iqr-k = 2.0, z-limit = 2.5 }");
    Settings s =
        SettingsLoader.load(Optional.of(conf), List.of("sluice.defaults.outliers.iqr-k=2.2"));
    assertThat(s.defaults().outliers().iqrK()).isEqualTo(2.2); // override over file
    assertThat(s.defaults().outliers().zLimit()).isEqualTo(2.5); // file over reference
    assertThat(s.defaults().outliers().madLimit()).isEqualTo(3.5); // reference
  }

  @Test
  void laterOverrideBeatsEarlierOne() {
    Settings s = withOverrides("collinearity.vif-limit=5", "collinearity.vif-limit=7.5");
    assertThat(s.collinearity().vifLimit()).isEqualTo(7.5);
  }

  @Test
  void overrideKeyMayLeaveOutTheSluicePrefix() {
    Settings s = withOverrides("defaults.scaling=robust", "sluice.collinearity.drop=true");
    assertThat(s.defaults().scaling()).isEqualTo(ScalingMethod.ROBUST);
    assertThat(s.collinearity().drop()).isTrue();
  }

  @Test
  void overrideValuesAreHocon() {
    Settings s =
        withOverrides(
            "defaults.valid-min = -40",
            "defaults.valid-max=null",
            "collinearity.enabled=false",
            "defaults.missing.constant=\"n/a # none\"",
            "spark.conf={ \"spark.sql.shuffle.partitions\" = 3 }");
    assertThat(s.defaults().validMin()).hasValue(-40);
    assertThat(s.defaults().validMax()).isEmpty();
    assertThat(s.collinearity().enabled()).isFalse();
    assertThat(s.defaults().missing().constant()).contains("n/a # none");
    assertThat(s.sparkConf()).containsExactly(entry("spark.sql.shuffle.partitions", "3"));
  }

  @Test
  void overrideValueThatIsNotHoconIsPlainText() {
    Settings s =
        withOverrides(
            "spark.master=local[2]",
            "spark.conf.\"spark.driver.extraJavaOptions\"=-Dcheck=on -Dzone=a",
            "spark.conf.\"spark.eventLog.dir\"=file:///tmp/events",
            "spark.conf.\"spark.app.name\"=cold store // nightly");
    assertThat(s.sparkMaster()).isEqualTo("local[2]");
    assertThat(s.sparkConf())
        .containsExactly(
            entry("spark.app.name", "cold store // nightly"),
            entry("spark.driver.extraJavaOptions", "-Dcheck=on -Dzone=a"),
            entry("spark.eventLog.dir", "file:///tmp/events"));
  }

  @Test
  void overrideCanNameAQuotedColumn() {
    Settings s = withOverrides("columns.\"gross.weight=kg\".scaling=standard");
    assertThat(s.columns()).containsOnlyKeys("gross.weight=kg");
    assertThat(s.column("gross.weight=kg").scaling()).isEqualTo(ScalingMethod.STANDARD);
  }

  @Test
  void overrideWithoutEqualsIsRejected() {
    failure(() -> withOverrides("defaults.scaling"))
        .isEqualTo("Cannot read --set defaults.scaling: expected KEY=VALUE");
    failure(() -> withOverrides("=robust"))
        .isEqualTo("Cannot read --set =robust: expected KEY=VALUE");
  }

  @Test
  void overrideWithABadKeyIsRejected() {
    failure(() -> withOverrides("defaults..scaling=robust"))
        .isEqualTo(
            "Cannot read --set defaults..scaling=robust: defaults..scaling is not a valid setting"
                + " key");
  }

  @Test
  void overrideOfAnUnknownKeyIsRejected() {
    failure(() -> withOverrides("defaults.scalling=robust"))
        .isEqualTo(
            "Unknown setting sluice.defaults.scalling (did you mean sluice.defaults.scaling?)");
  }

  @Test
  void missingFileIsNamed() {
    Path absent = dir.resolve("absent.conf");
    loadingFails(absent).isEqualTo("Cannot read config file " + absent + ": no such file");
  }

  @Test
  void directoryAsFileIsNamed() {
    loadingFails(dir).isEqualTo("Cannot read config file " + dir + ": it is a directory");
  }

  @Test
  void syntaxErrorNamesFileAndLine() throws IOException {
    Path conf = file("sluice {\n  defaults {\n    role = keep\n    scaling = [robust\n  }\n}\n");
    loadingFails(conf)
        .isEqualTo(
            "Cannot read config file "
                + conf
                + " at line 5: List should have had new element"
                + " after a comma, instead had token: '}' (if you want the comma or '}' to be part"
                + " of a string value, then double-quote it)");
  }

  @Test
  void fileWithoutTheSluiceWrapperIsRejected() throws IOException {
    Path conf = file("defaults { role = keep }");
    loadingFails(conf)
        .isEqualTo(
            "Unknown setting defaults.role in " + conf + " (every setting goes under sluice)");
  }

  @Test
  void unresolvedSubstitutionNamesFileAndLine() throws IOException {
    Path conf = file("sluice {\n  defaults.outliers.iqr-k = ${no-such-value}\n}\n");
    loadingFails(conf)
        .isEqualTo(
            "Cannot read config file "
                + conf
                + " at line 2: Could not resolve substitution to a value: ${no-such-value}");
  }

  @Test
  void substitutionWithinTheSettingsWorks() throws IOException {
    Path conf =
        file("sluice.defaults.outliers { iqr-k = 2, outer-k = ${sluice.defaults.outliers.iqr-k} }");
    assertThat(SettingsLoader.load(Optional.of(conf), List.of()).defaults().outliers().outerK())
        .isEqualTo(2.0);
  }

  @Test
  void sampleConfigLoads() {
    Path sample = Path.of(System.getProperty("user.dir"), "conf", "sample.conf");
    Settings s = SettingsLoader.load(Optional.of(sample), List.of());
    assertThat(s.column("pallet_id").role()).isEqualTo(Role.IDENTIFIER);
    assertThat(s.column("depot").role()).isEqualTo(Role.KEEP);
    assertThat(s.column("check_date").role()).isEqualTo(Role.KEEP);
    assertThat(s.column("air_temp_c").validMin()).hasValue(-40);
    assertThat(s.column("air_temp_c").validMax()).hasValue(40);
    assertThat(s.column("air_temp_c").outliers().action()).isEqualTo(OutlierAction.FLAG);
    assertThat(s.column("rel_humidity_pct").validMax()).hasValue(100);
    assertThat(s.column("dwell_hours").outliers().action()).isEqualTo(OutlierAction.CAP);
    assertThat(s.column("inspection_score").outliers().direction()).isEqualTo(Direction.LOW);
    assertThat(s.column("energy_kwh")).isEqualTo(withName(s.defaults(), "energy_kwh"));
    assertThat(s.column("energy_kwh").limits().psi()).hasValue(0.25);
  }

  @Test
  void effectiveConfigHoldsOnlyTheSluiceTree() throws IOException {
    Path conf = file("sluice.defaults.role = keep");
    var effective =
        SettingsLoader.effectiveConfig(Optional.of(conf), List.of("defaults.scaling=robust"));
    assertThat(effective.root().keySet()).containsExactly("sluice");
    assertThat(effective.getString("sluice.defaults.role")).isEqualTo("keep");
    assertThat(effective.getString("sluice.defaults.scaling")).isEqualTo("robust");
  }

  /** Asserts that loading {@code conf} alone fails; returns an assertion on the message. */
  private static AbstractStringAssert<?> loadingFails(Path conf) {
    return failure(() -> SettingsLoader.load(Optional.of(conf), List.of()));
  }

  private static ColumnSettings withName(ColumnSettings c, String name) {
    return new ColumnSettings(name, c.role(), c.validMin(), c.validMax(), c.invalidAction(), c.outliers(),
        c.missing(), c.scaling(), c.limits());
  }
}
