package dev.sluice.config;

import static dev.sluice.config.ConfigTesting.parse;
import static dev.sluice.config.ConfigTesting.rejection;
import static org.assertj.core.api.Assertions.assertThat;

import java.util.Optional;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

/** Each rejected setting, with the exact one-line message the user sees. */
class ValidationTest {

  @Test
  void unknownKeySuggestsTheClosestKnownKey() {
    rejection("sluice.outliers.iqr-kk = 2")
        .isEqualTo(
            "Unknown setting sluice.outliers.iqr-kk (did you mean"
                + " sluice.defaults.outliers.iqr-k?)");
  }

  @Test
  void unknownKeyInsideAKnownBlock() {
    rejection("sluice.defaults.outliers.iqr-kk = 2")
        .isEqualTo(
            "Unknown setting sluice.defaults.outliers.iqr-kk"
                + " (did you mean sluice.defaults.outliers.iqr-k?)");
  }

  @Test
  void unknownKeyFarFromAnyKnownKeyHasNoSuggestion() {
    rejection("sluice.quantiles.flavour = vanilla")
        .isEqualTo("Unknown setting sluice.quantiles.flavour");
  }

  @Test
  void unknownBlockNamesItsFirstKeyAndTheCorrectedKey() {
    rejection("sluice.colums { air_temp_c { role = keep } }")
        .isEqualTo(
            "Unknown setting sluice.colums.air_temp_c.role"
                + " (did you mean sluice.columns.air_temp_c.role?)");
    rejection("sluice.defaults.outlier { method = mad }")
        .isEqualTo(
            "Unknown setting sluice.defaults.outlier.method"
                + " (did you mean sluice.defaults.outliers.method?)");
  }

  @Test
  void aCorrectedBlockNameIsOnlySuggestedWhenTheWholeKeyExists() {
    // "outlier" is close to "outliers", but outliers.k is no key either, and no key ends close to
    // "k": no hint rather than a wrong one.
    rejection("sluice.defaults.outlier.k = 3")
        .isEqualTo("Unknown setting sluice.defaults.outlier.k");
    rejection("sluice.columns.air_temp_c.outlier.k = 3")
        .startsWith("Column air_temp_c in config has unknown setting outlier.k")
        .doesNotContain("did you mean");
  }

  @Test
  void sparkMasterMustNotBeEmpty() {
    rejection("sluice.spark.master = \"\"")
        .isEqualTo(
            "Cannot set sluice.spark.master to \"\": expected a Spark master such as local[*]");
  }

  @Test
  void sparkConfIsFreeForm() {
    Settings s =
        parse(
            "sluice.spark.conf { \"spark.sql.shuffle.partitions\" = 8\n"
                + " spark.driver.memory = 2g\n spark.sql.ansi.enabled = true\n"
                + " spark.memory.fraction = 0.60 }");
    assertThat(s.sparkConf())
        .containsExactly(
            org.assertj.core.api.Assertions.entry("spark.driver.memory", "2g"),
            org.assertj.core.api.Assertions.entry("spark.memory.fraction", "0.60"),
            org.assertj.core.api.Assertions.entry("spark.sql.ansi.enabled", "true"),
            org.assertj.core.api.Assertions.entry("spark.sql.shuffle.partitions", "8"));
  }

  @Test
  void sparkConfValueMustBeScalar() {
    rejection("sluice.spark.conf { \"spark.jars\" = [a, b] }")
        .isEqualTo(
            "Cannot set sluice.spark.conf.\"spark.jars\" to [\"a\",\"b\"]:"
                + " expected a string, a number or a boolean");
  }

  @Test
  void aBlockGivenAsAValue() {
    rejection("sluice.defaults.outliers = 3")
        .isEqualTo("Cannot set sluice.defaults.outliers to 3: expected an object");
  }

  @Test
  void wrongTypeOfNumber() {
    rejection("sluice.defaults.outliers.iqr-k = abc")
        .isEqualTo("Cannot set sluice.defaults.outliers.iqr-k to \"abc\": expected a number");
  }

  @Test
  void numberWrittenAsQuotedTextIsAccepted() {
    assertThat(parse("sluice.defaults.outliers.iqr-k = \"2.5\"").defaults().outliers().iqrK())
        .isEqualTo(2.5);
  }

  @Test
  void wrongTypeOfFlag() {
    rejection("sluice.collinearity.drop = 3")
        .isEqualTo("Cannot set sluice.collinearity.drop to 3: expected true or false");
  }

  @Test
  void wholeNumberExpected() {
    rejection("sluice.collinearity.max-columns = 2.5")
        .isEqualTo("Cannot set sluice.collinearity.max-columns to 2.5: expected a whole number");
  }

  @Test
  void badEnumListsTheAllowedValues() {
    rejection("sluice.defaults.outliers.action = clip")
        .isEqualTo(
            "Cannot set sluice.defaults.outliers.action to \"clip\":"
                + " expected one of cap, set-missing, flag, keep, quarantine");
    rejection("sluice.defaults.scaling = MIN_MAX")
        .isEqualTo(
            "Cannot set sluice.defaults.scaling to \"MIN_MAX\":"
                + " expected one of none, standard, min-max, robust, max-abs");
    rejection("sluice.defaults.role = null")
        .isEqualTo(
            "Cannot set sluice.defaults.role to null:"
                + " expected one of treat, keep, identifier, required");
  }

  @Test
  void hyphenatedEnumValuesMapToTheJavaConstants() {
    Settings s =
        parse(
            "sluice.defaults { outliers.action = set-missing, scaling = max-abs,"
                + " outliers.method = zscore, outliers.direction = high, role = required,"
                + " missing.strategy = mode }");
    assertThat(s.defaults().outliers().action()).isEqualTo(OutlierAction.SET_MISSING);
    assertThat(s.defaults().scaling()).isEqualTo(ScalingMethod.MAX_ABS);
    assertThat(s.defaults().outliers().method()).isEqualTo(OutlierMethod.ZSCORE);
    assertThat(s.defaults().outliers().direction()).isEqualTo(Direction.HIGH);
    assertThat(s.defaults().role()).isEqualTo(Role.REQUIRED);
    assertThat(s.defaults().missing().strategy()).isEqualTo(ImputeStrategy.MODE);
  }

  @ParameterizedTest
  @CsvSource(
      delimiter = '|',
      value = {
        "defaults.outliers.iqr-k | 0 | expected a number above 0",
        "defaults.outliers.z-limit | -1 | expected a number above 0",
        "defaults.outliers.mad-limit | 0 | expected a number above 0",
        "quantiles.pilot-rows | 999 | expected a whole number from 1000 to 100000000",
        "quantiles.max-held-values | 100000001 | expected a whole number from 1000 to 100000000",
        "collinearity.spearman-rows | 10 | expected a whole number from 1000 to 10000000",
        "collinearity.pair-threshold | 0 | expected a number above 0 and at most 1",
        "collinearity.pair-threshold | 1.01 | expected a number above 0 and at most 1",
        "collinearity.vif-limit | 0.99 | expected a number of at least 1",
        "collinearity.max-columns | 1 | expected a whole number of at least 2",
        "defaults.missing.drop-null-rate | -0.1 | expected a number from 0 to 1",
        "defaults.missing.drop-null-rate | 1.5 | expected a number from 0 to 1",
      })
  void outOfRange(String key, String value, String reason) {
    rejection("sluice." + key + " = " + value)
        .isEqualTo("Cannot set sluice." + key + " to " + value + ": " + reason);
  }

  @ParameterizedTest
  @CsvSource(
      delimiter = '|',
      value = {
        "quantiles.relative-error | 0.001 | quantiles are now exact on tables of any size",
        "quantiles.exact-max-count | 100000 | quantiles are now exact on tables of any size",
        "quantiles.sketch | gk | quantiles are now exact on tables of any size",
        "quantiles.rank-grid-size | 1000 | Spearman's rho now comes from ranks in a row sample"
            + " (sluice.collinearity.spearman-rows)",
      })
  void retiredSettingsSayWhatBecameOfThem(String key, String value, String why) {
    rejection("sluice." + key + " = " + value)
        .isEqualTo("Setting sluice." + key + " is no longer used: " + why + "; remove it");
  }

  @ParameterizedTest
  @CsvSource(
      delimiter = '|',
      value = {
        "defaults.outliers.iqr-k | 0.01",
        "quantiles.pilot-rows | 1000",
        "quantiles.max-held-values | 100000000",
        "collinearity.spearman-rows | 1000",
        "collinearity.pair-threshold | 1",
        "collinearity.vif-limit | 1",
        "collinearity.max-columns | 2",
        "defaults.missing.drop-null-rate | 0",
        "defaults.missing.drop-null-rate | 1",
      })
  void rangeEdgesAreAccepted(String key, String value) {
    Settings s = parse("sluice." + key + " = " + value);
    assertThat(s).isNotNull();
  }

  @Test
  void notFiniteNumber() {
    rejection("sluice.defaults.valid-max = \"Infinity\"")
        .isEqualTo(
            "Cannot set sluice.defaults.valid-max to \"Infinity\": expected a finite number");
  }

  @Test
  void outerFenceInsideTheInnerFence() {
    rejection("sluice.defaults.outliers { iqr-k = 2, outer-k = 1.5 }")
        .isEqualTo(
            "Cannot set sluice.defaults.outliers.outer-k to 1.5:"
                + " expected at least sluice.defaults.outliers.iqr-k (2)");
  }

  @Test
  void outerFenceEqualToTheInnerFenceIsAccepted() {
    assertThat(parse("sluice.defaults.outliers { iqr-k = 3 }").defaults().outliers().outerK())
        .isEqualTo(3.0);
  }

  @Test
  void validMinAboveValidMaxInDefaults() {
    rejection("sluice.defaults { valid-min = 50, valid-max = 10 }")
        .isEqualTo(
            "Cannot set sluice.defaults.valid-max to 10: expected at least"
                + " sluice.defaults.valid-min (50)");
  }

  @Test
  void validMinAboveValidMaxInAColumn() {
    rejection("sluice.columns.air_temp_c { valid-min = 40, valid-max = -40 }")
        .isEqualTo(
            "Cannot set sluice.columns.air_temp_c.valid-max to -40:"
                + " expected at least sluice.columns.air_temp_c.valid-min (40)");
  }

  @Test
  void aColumnBoundClashingWithAnInheritedBoundBlamesTheColumnsOwnKey() {
    rejection("sluice.defaults.valid-min = 0\nsluice.columns.air_temp_c.valid-max = -5")
        .isEqualTo(
            "Cannot set sluice.columns.air_temp_c.valid-max to -5:"
                + " expected at least sluice.columns.air_temp_c.valid-min (0)");
    rejection("sluice.columns.dwell_hours.outliers.iqr-k = 4")
        .isEqualTo(
            "Cannot set sluice.columns.dwell_hours.outliers.iqr-k to 4:"
                + " expected at most sluice.columns.dwell_hours.outliers.outer-k (3.0)");
  }

  @Test
  void constantStrategyNeedsAConstant() {
    rejection("sluice.defaults.missing.strategy = constant")
        .isEqualTo(
            "Cannot set sluice.defaults.missing.strategy to \"constant\":"
                + " needs sluice.defaults.missing.constant to be set");
  }

  @Test
  void constantIsKeptAsText() {
    assertThat(
            parse("sluice.defaults.missing { strategy = constant, constant = 0.0 }")
                .defaults()
                .missing()
                .constant())
        .isEqualTo(Optional.of("0.0"));
    assertThat(
            parse("sluice.defaults.missing { strategy = constant, constant = unknown }")
                .defaults()
                .missing()
                .constant())
        .isEqualTo(Optional.of("unknown"));
  }

  @Test
  void constantMustBeScalar() {
    rejection("sluice.defaults.missing.constant = [1]")
        .isEqualTo(
            "Cannot set sluice.defaults.missing.constant to [1]: expected a string, a number or"
                + " null");
  }

  @Test
  void inputFormatMustBeKnown() {
    rejection("sluice.input.format = xlsx")
        .isEqualTo(
            "Cannot set sluice.input.format to \"xlsx\": expected one of parquet, csv, orc, json or"
                + " \"\"");
    assertThat(parse("sluice.input.format = csv").input().format()).contains("csv");
  }

  @Test
  void csvDelimiterMustNotBeEmpty() {
    rejection("sluice.input.csv.delimiter = \"\"")
        .isEqualTo(
            "Cannot set sluice.input.csv.delimiter to \"\": expected at least one character");
  }

  @Test
  void csvSchemaIsKept() {
    assertThat(
            parse("sluice.input.csv { delimiter = \";\", schema = \"a INT, b DOUBLE\" }").input())
        .isEqualTo(new InputSettings(Optional.empty(), ";", Optional.of("a INT, b DOUBLE")));
  }

  @Test
  void sluiceItselfMustBeABlock() {
    rejection("sluice = 5").isEqualTo("Cannot set sluice to 5: expected an object");
  }
}
