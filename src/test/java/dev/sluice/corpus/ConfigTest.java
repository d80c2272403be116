package dev.sluice.corpus;

import static dev.sluice.corpus.Corpus.assertRefused;
import static dev.sluice.corpus.Corpus.assertRefusedAtOnce;
import static dev.sluice.corpus.Corpus.assertRefusedWith;
import static dev.sluice.corpus.Corpus.palletChecks;
import static dev.sluice.corpus.Corpus.text;
import static org.assertj.core.api.Assertions.assertThat;

import dev.sluice.testing.SharedSpark;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.attribute.PosixFilePermissions;
import java.util.ArrayList;
import java.util.List;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.Assumptions;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.ExtendWith;
import org.junit.jupiter.api.io.TempDir;

/**
 * Bad settings and bad command lines: each is refused with exit 2 and a one-line message naming
 * the key, value, column, option or file at fault, and nothing is published. The input is the
 * small pallet table (pallet_id, depot, air_temp_c, door_openings), which is fine in itself.
 */
@ExtendWith(SharedSpark.class)
class ConfigTest {
  @TempDir static Path shared;
  @TempDir Path tmp;

  private static Path checks;

  @BeforeAll
  static void table(SparkSession spark) {
    checks = palletChecks(spark, shared.resolve("checks"), 12);
  }

  private Path out() {
    return tmp.resolve("out");
  }

  /** {@code run --input checks --output out} and {@code more}. */
  private Corpus.Result run(String... more) {
    return Corpus.run("run", checks, out(), more);
  }

  private Path conf(String hocon) {
    return text(tmp.resolve("cold-room.conf"), hocon);
  }

  // Unknown keys and wrong types

  @Test
  void unknownKeyInAColumnBlockOfTheFileSuggestsTheRightKey() {
    Path conf = conf("sluice.columns.air_temp_c { outlier.action = flag }\n");
    assertRefusedAtOnce(run("--config", conf.toString()), 2, "Column air_temp_c in config has unknown"
        + " setting outlier.action (did you mean outliers.action?)", out());
  }

  @Test
  void unknownKeyOnTheCommandLineSuggestsTheRightKey() {
    assertRefusedAtOnce(run("--set", "collinearity.vif-limt=5"), 2, "Unknown setting"
        + " sluice.collinearity.vif-limt (did you mean sluice.collinearity.vif-limit?)", out());
  }

  @Test
  void listWhereANumberIsExpectedNamesKeyAndValue() {
    Path conf = conf("sluice.defaults.missing.drop-null-rate = [0.5]\n");
    assertRefusedAtOnce(run("--config", conf.toString()), 2, "Cannot set"
        + " sluice.defaults.missing.drop-null-rate to [0.5]: expected a number", out());
  }

  @Test
  void wordWhereAFlagIsExpectedNamesKeyAndValue() {
    assertRefusedAtOnce(run("--set", "collinearity.enabled=maybe"), 2, "Cannot set"
        + " sluice.collinearity.enabled to \"maybe\": expected true or false", out());
  }

  @Test
  void rateAboveOneIsOutOfRange() {
    assertRefusedAtOnce(run("--set", "defaults.missing.drop-null-rate=1.5"), 2, "Cannot set"
        + " sluice.defaults.missing.drop-null-rate to 1.5: expected a number from 0 to 1", out());
  }

  // Bounds that cannot both hold

  @Test
  void validMinAboveValidMaxInAColumn() {
    Corpus.Result r = run("--set", "columns.air_temp_c.valid-min=10", "--set", "columns.air_temp_c.valid-max=-10");
    assertRefusedAtOnce(r, 2, "Cannot set sluice.columns.air_temp_c.valid-max to -10: expected at least"
        + " sluice.columns.air_temp_c.valid-min (10)", out());
  }

  @Test
  void innerFenceFactorAboveTheInheritedOuterOne() {
    Corpus.Result r = run("--set", "columns.air_temp_c.outliers.iqr-k=4");
    assertRefusedAtOnce(r, 2, "Cannot set sluice.columns.air_temp_c.outliers.iqr-k to 4: expected at most"
        + " sluice.columns.air_temp_c.outliers.outer-k (3.0)", out());
  }

  // Columns

  @Test
  void everyConfiguredColumnTheTableLacksIsNamed() {
    Corpus.Result r = run("--set", "columns.air_temp.valid-max=9", "--set", "columns.door_opening.role=keep");
    assertRefused(r, 2, "Columns air_temp, door_opening in config (sluice.columns) are not in the table;"
        + " its columns are: pallet_id, depot, air_temp_c, door_openings", out());
  }

  @Test
  void validityBoundsOnATextColumnCannotApply() {
    assertRefused(run("--set", "columns.depot.valid-max=3"), 2, "Column depot is string, not numeric:"
        + " validity bounds (valid-min, valid-max) cannot apply", out());
  }

  // Contradictions

  @Test
  void keptColumnWithAnOutlierOverrideIsContradictory() {
    Corpus.Result r = run("--set", "columns.air_temp_c.role=keep", "--set", "columns.air_temp_c.outliers.action=flag");
    assertRefusedAtOnce(r, 2, "Column air_temp_c has role keep, which is never treated; remove its"
        + " outliers settings", out());
  }

  @Test
  void identifierFromTheFileWithScalingFromTheCommandLineIsContradictory() {
    Path conf = conf("sluice.columns.door_openings { role = identifier }\n");
    Corpus.Result r = run("--config", conf.toString(), "--set", "columns.door_openings.scaling=robust");
    assertRefusedAtOnce(r, 2, "Column door_openings has role identifier, which is never treated; remove"
        + " its scaling settings", out());
  }

  @Test
  void keepInheritedFromTheDefaultsWithMissingAndScalingOverrides() {
    Corpus.Result r = run("--set", "defaults.role=keep", "--set", "columns.air_temp_c.missing.indicator=true",
        "--set", "columns.air_temp_c.scaling=standard");
    assertRefusedAtOnce(r, 2, "Column air_temp_c has role keep, which is never treated; remove its"
        + " missing and scaling settings", out());
  }

  @Test
  void constantStrategyWithoutAConstant() {
    assertRefusedAtOnce(run("--set", "columns.air_temp_c.missing.strategy=constant"), 2, "Cannot set"
        + " sluice.columns.air_temp_c.missing.strategy to \"constant\": needs"
        + " sluice.columns.air_temp_c.missing.constant to be set", out());
  }

  @Test
  void textConstantForANumericColumn() {
    Corpus.Result r = run("--set", "columns.air_temp_c.missing.strategy=constant",
        "--set", "columns.air_temp_c.missing.constant=cold");
    String message = assertRefusedWith(r, 2, "Cannot set sluice.columns.", out());
    assertThat(message).isEqualTo(
        "sluice: Cannot set sluice.columns.air_temp_c.missing.constant to \"cold\": the column is numeric");
  }

  @Test
  void dropOfSuggestedColumnsWithTheAnalysisOffIsContradictory() {
    // Not refused today: with the analysis off nothing is suggested, so drop = true would be
    // ignored; by the rule applied to kept columns, a setting that would be ignored is refused.
    Corpus.Result r = run("--set", "collinearity.enabled=false", "--set", "collinearity.drop=true");
    String message = assertRefusedWith(r, 2, "", out());
    assertThat(message).contains("collinearity.drop").contains("collinearity.enabled");
  }

  // Config files

  @Test
  void configFileWithoutReadPermission() throws Exception {
    Path conf = conf("sluice.defaults.scaling = robust\n");
    Files.setPosixFilePermissions(conf, PosixFilePermissions.fromString("---------"));
    Assumptions.assumeFalse(Files.isReadable(conf),
        "this user reads a file of mode 000 (root): see the directory and garbage cases");
    assertRefusedAtOnce(run("--config", conf.toString()), 2,
        "Cannot read config file " + conf + ": permission denied", out());
  }

  @Test
  void configPathThatIsADirectory() throws Exception {
    Path dir = Files.createDirectories(tmp.resolve("conf.d"));
    assertRefusedAtOnce(run("--config", dir.toString()), 2,
        "Cannot read config file " + dir + ": it is a directory", out());
  }

  @Test
  void hoconSyntaxErrorNamesFileAndLine() {
    Path conf = conf("sluice {\n  defaults {\n    scaling = robust\n  }\n");
    Corpus.Result r = run("--config", conf.toString());
    String message = assertRefusedWith(r, 2, "Cannot read config file " + conf + " at line 5: ", out());
    assertThat(message).contains("end of file");
    assertThat(r.errLines()).as(r.shown()).hasSize(1);
  }

  @Test
  void configFileOfBinaryGarbage() throws Exception {
    Path conf = Files.write(tmp.resolve("cold-room.conf"), new byte[] {(byte) 0xff, (byte) 0xfe, 0, 1, '{', '{'});
    assertRefusedWith(run("--config", conf.toString()), 2, "Cannot read config file " + conf + " at line 1: ", out());
  }

  // --set syntax

  @Test
  void setWithoutAnEqualsSign() {
    assertRefusedAtOnce(run("--set", "defaults.scaling"), 2,
        "Cannot read --set defaults.scaling: expected KEY=VALUE", out());
  }

  @Test
  void setWithAnEmptyPartInTheKey() {
    assertRefusedAtOnce(run("--set", "columns.air_temp_c..valid-max=3"), 2, "Cannot read --set"
        + " columns.air_temp_c..valid-max=3: columns.air_temp_c..valid-max is not a valid setting key", out());
  }

  @Test
  void setWithAQuoteLeftOpenHasNoKey() {
    assertRefusedAtOnce(run("--set", "columns.\"air_temp_c.valid-max=3"), 2,
        "Cannot read --set columns.\"air_temp_c.valid-max=3: expected KEY=VALUE", out());
  }

  @Test
  void setWithNothingAfterIt() {
    assertRefusedAtOnce(run("--set"), 2, "Option --set needs a value (see sluice --help)", out());
  }

  // Commands and options

  @Test
  void commandNamesAreCaseSensitive() {
    Corpus.Result r = Corpus.run("Run", "--input", checks.toString(), "--output", out().toString());
    assertRefusedAtOnce(r, 2, "Unknown command Run; expected run, survey, fit, treat or explain (see sluice --help)", out());
  }

  @Test
  void misspeltOptionIsNamed() {
    Corpus.Result r = Corpus.run("survey", "--inputs", checks.toString(), "--output", out().toString());
    assertRefusedAtOnce(r, 2, "Unknown option --inputs (see sluice --help)", out());
  }

  @Test
  void strayArgumentIsNamed() {
    Corpus.Result r = Corpus.run("run", "checks", "--input", checks.toString(), "--output", out().toString());
    assertRefusedAtOnce(r, 2, "Unexpected argument checks (see sluice --help)", out());
  }

  @Test
  void optionValueThatLooksLikeAnOptionIsRefused() {
    Corpus.Result r = Corpus.run("run", "--input", "--output", out().toString());
    assertRefusedAtOnce(r, 2, "Option --input needs a value (see sluice --help)", out());
  }

  // Formats

  @Test
  void unknownFormatOption() {
    assertRefusedAtOnce(run("--format", "xlsx"), 2,
        "Cannot set format to xlsx: expected one of csv, json, orc, parquet", out());
  }

  @Test
  void unknownFormatSetting() {
    assertRefusedAtOnce(run("--set", "input.format=xlsx"), 2, "Cannot set sluice.input.format to"
        + " \"xlsx\": expected one of parquet, csv, orc, json or \"\"", out());
  }

  @Test
  void formatThatDoesNotMatchTheFilesIsBadInputNamingThePath() {
    String message = assertRefusedWith(run("--format", "json"), 3, "Cannot read " + checks + " as json: ", out());
    assertThat(message).doesNotContain("unexpected failure");
  }

  // --where

  @Test
  void emptyWherePredicateGivesAReason() {
    String message = assertRefusedWith(run("--where", ""), 2, "Cannot use --where : ", out());
    assertThat(message).as("Spark's reason follows").containsPattern("[A-Za-z]{3,}");
  }

  @Test
  void whereOnAColumnTheTableLacksNamesIt() {
    String message = assertRefusedWith(run("--where", "room_temp_c > 3"), 2,
        "Cannot use --where room_temp_c > 3: ", out());
    assertThat(message).contains("`room_temp_c`").contains("`air_temp_c`");
  }

  @Test
  void refusedRunsKeepAnEarlierCompleteOutput() throws Exception {
    // A refused run over an earlier complete output keeps that output and its marker.
    Path o = out();
    Corpus.Result first = Corpus.run("survey", checks, o);
    assertThat(first.code()).as(first.shown()).isZero();
    String marker = Files.readString(o.resolve("_COMMITTED"));
    List<String[]> bad = new ArrayList<>();
    bad.add(new String[] {"--set", "collinearity.enabled=maybe"});
    bad.add(new String[] {"--set", "columns.air_temp.valid-max=9"});
    bad.add(new String[] {"--format", "xlsx"});
    for (String[] more : bad) {
      Corpus.Result r = Corpus.run("survey", checks, o, more);
      assertThat(r.code()).as(r.shown()).isEqualTo(2);
      assertThat(Files.readString(o.resolve("_COMMITTED"))).as(String.join(" ", more)).isEqualTo(marker);
    }
  }
}
