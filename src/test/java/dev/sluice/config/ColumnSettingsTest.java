package dev.sluice.config;

import static dev.sluice.config.ConfigTesting.failure;
import static dev.sluice.config.ConfigTesting.parse;
import static dev.sluice.config.ConfigTesting.rejection;
import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatCode;

import java.util.List;
import java.util.Optional;
import java.util.stream.Collectors;
import java.util.stream.IntStream;
import org.junit.jupiter.api.Test;

/**
 * Per-column blocks: names, deep merge over the defaults, contradictions, presence in the table.
 */
class ColumnSettingsTest {

  @Test
  void quotedNamesAreTakenExactly() {
    Settings s =
        parse(
            "sluice.columns {\n"
                + "  \"gross.weight\" { role = keep }\n"
                + "  \"dwell hours\" { scaling = robust }\n"
                + "  \"température_°C\" { valid-min = -40 }\n"
                + "  plain_name { role = required }\n"
                + "}");
    assertThat(s.columns())
        .containsOnlyKeys("gross.weight", "dwell hours", "température_°C", "plain_name");
    assertThat(s.column("gross.weight").role()).isEqualTo(Role.KEEP);
    assertThat(s.column("gross.weight").name()).isEqualTo("gross.weight");
    assertThat(s.column("dwell hours").scaling()).isEqualTo(ScalingMethod.ROBUST);
    assertThat(s.column("température_°C").validMin()).hasValue(-40);
    assertThat(s.column("plain_name").role()).isEqualTo(Role.REQUIRED);
    assertThat(s.columns()).doesNotContainKey("gross");
  }

  @Test
  void columnBlockIsMergedKeyByKeyOverTheDefaults() {
    Settings s =
        parse(
            "sluice.defaults { outliers { method = mad, mad-limit = 4 }, missing.indicator = true,"
                + " valid-min = 0 }\n"
                + "sluice.columns.air_temp_c { outliers.action = flag, valid-min = null }");
    ColumnSettings c = s.column("air_temp_c");
    assertThat(c.outliers())
        .isEqualTo(
            new OutlierSettings(
                OutlierMethod.MAD, 1.5, 3.0, 3.0, 4.0, Direction.BOTH, OutlierAction.FLAG));
    assertThat(c.missing())
        .isEqualTo(new MissingSettings(0.5, ImputeStrategy.MEDIAN, Optional.empty(), true));
    assertThat(c.validMin()).isEmpty(); // null in the column clears the default bound
    assertThat(s.defaults().outliers().action()).isEqualTo(OutlierAction.CAP);
    assertThat(s.column("energy_kwh").validMin()).hasValue(0);
  }

  @Test
  void unknownKeyInAColumnNamesTheColumn() {
    rejection("sluice.columns.air_temp_c.outliers.iqr-kk = 2")
        .isEqualTo(
            "Column air_temp_c in config has unknown setting outliers.iqr-kk"
                + " (did you mean outliers.iqr-k?)");
    rejection("sluice.columns.\"dwell hours\".pair-threshold = 0.8")
        .isEqualTo("Column \"dwell hours\" in config has unknown setting pair-threshold");
    rejection("sluice.columns.depot.outlier.action = keep")
        .isEqualTo(
            "Column depot in config has unknown setting outlier.action"
                + " (did you mean outliers.action?)");
  }

  @Test
  void columnMustBeABlock() {
    rejection("sluice.columns.air_temp_c = flag")
        .isEqualTo(
            "Cannot set sluice.columns.air_temp_c to \"flag\": expected a block of column"
                + " settings");
  }

  @Test
  void badValueInAColumnNamesTheColumnKey() {
    rejection("sluice.columns.\"gross.weight\".outliers.iqr-k = -1")
        .isEqualTo(
            "Cannot set sluice.columns.\"gross.weight\".outliers.iqr-k to -1:"
                + " expected a number above 0");
  }

  @Test
  void identifierWithTreatmentSettingsIsContradictory() {
    rejection("sluice.columns.pallet_id { role = identifier, outliers.action = flag }")
        .isEqualTo(
            "Column pallet_id has role identifier, which is never treated;"
                + " remove its outliers settings");
  }

  @Test
  void keepWithSeveralTreatmentSettingsNamesThemAll() {
    rejection(
            "sluice.columns.depot { role = keep, missing.strategy = mode, scaling = standard,"
                + " outliers.method = none }")
        .isEqualTo(
            "Column depot has role keep, which is never treated;"
                + " remove its outliers, missing and scaling settings");
  }

  @Test
  void roleInheritedFromTheDefaultsCountsToo() {
    rejection("sluice.defaults.role = keep\nsluice.columns.energy_kwh.scaling = standard")
        .isEqualTo(
            "Column energy_kwh has role keep, which is never treated; remove its scaling settings");
  }

  @Test
  void identifierWithBoundsOnlyIsAccepted() {
    assertThatCode(() -> parse("sluice.columns.pallet_id { role = identifier, valid-min = 1 }"))
        .doesNotThrowAnyException();
  }

  @Test
  void unknownColumnsAreTheConfiguredOnesTheTableLacks() {
    Settings s =
        parse("sluice.columns { b { role = keep }, a { role = keep }, c { role = keep } }");
    assertThat(SettingsLoader.unknownColumns(s, List.of("c", "x"))).containsExactly("a", "b");
    assertThat(SettingsLoader.unknownColumns(s, List.of("a", "b", "c"))).isEmpty();
  }

  @Test
  void requireColumnsExistNamesTheMissingColumnAndListsTheTable() {
    Settings s = parse("sluice.columns.air_tmp_c.valid-min = -40");
    failure(
            () ->
                SettingsLoader.requireColumnsExist(s, List.of("pallet_id", "air_temp_c", "depot")))
        .isEqualTo(
            "Column air_tmp_c in config (sluice.columns) is not in the table;"
                + " its columns are: pallet_id, air_temp_c, depot");
  }

  @Test
  void requireColumnsExistNamesEveryMissingColumn() {
    Settings s = parse("sluice.columns { \"dwell hours\" { role = keep }, depot { role = keep } }");
    failure(() -> SettingsLoader.requireColumnsExist(s, List.of("dwell_hours", "door openings")))
        .isEqualTo(
            "Columns depot, \"dwell hours\" in config (sluice.columns) are not in the table;"
                + " its columns are: dwell_hours, \"door openings\"");
  }

  @Test
  void requireColumnsExistCutsALongTableList() {
    Settings s = parse("sluice.columns.missing_one.role = keep");
    List<String> table = IntStream.range(0, 25).mapToObj(i -> "c" + i).toList();
    String first20 = table.subList(0, 20).stream().collect(Collectors.joining(", "));
    failure(() -> SettingsLoader.requireColumnsExist(s, table))
        .isEqualTo(
            "Column missing_one in config (sluice.columns) is not in the table;"
                + " its columns are: "
                + first20
                + " and 5 more");
  }

  @Test
  void requireColumnsExistPassesWhenAllArePresent() {
    Settings s = parse("sluice.columns.depot.role = keep");
    assertThatCode(() -> SettingsLoader.requireColumnsExist(s, List.of("depot", "pallet_id")))
        .doesNotThrowAnyException();
  }
}
