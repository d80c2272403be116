package dev.sluice.treat;

import static dev.sluice.testing.Fixtures.column;
import static dev.sluice.testing.Fixtures.doubles;
import static dev.sluice.testing.Fixtures.settings;
import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

import dev.sluice.Sluice;
import dev.sluice.config.Settings;
import dev.sluice.plan.ColumnPlan;
import dev.sluice.testing.SharedSpark;
import java.util.List;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.ExtendWith;

/**
 * The treatment steps through Spark, on the NIST e-Handbook 1.3.5.17.1 Grubbs' test example
 * (eight values, one extreme): outlier methods, directions, actions, imputation after the outlier
 * step. Expected values: (S) stated by the source, (D) derived by hand or with Commons Math from
 * the source's data, as noted.
 */
@ExtendWith(SharedSpark.class)
class TreatmentTest {
  // NIST/SEMATECH e-Handbook 1.3.5.17.1, Grubbs' test example data (S).
  static final double[] GRUBBS = {199.31, 199.53, 200.19, 200.82, 201.92, 201.95, 202.18, 245.57};

  private static Sluice.Fit fit(Dataset<Row> data, Settings s) {
    return Sluice.fit(data, s, List.of());
  }

  private static List<Object> treated(Dataset<Row> data, Sluice.Fit fit, String col) {
    return column(Sluice.treat(data, fit.plan()).collectAsList(), col);
  }

  @Test
  void iqrCapsTheExtremeAtTheInnerFence(SparkSession spark) {
    Dataset<Row> data = doubles(spark, "y", GRUBBS);
    Sluice.Fit fit = fit(data, settings());
    ColumnPlan cp = fit.plan().column("y").orElseThrow();
    // (D) type 7 on the Grubbs data: Q1 200.025, Q3 202.0075, inner fences 197.05125 and
    // 204.98125, outer upper fence 207.955 (../shared/REFERENCES.md).
    assertThat(cp.outliers().upper()).isCloseTo(204.98125, within(1e-9));
    assertThat(cp.outliers().lower()).isCloseTo(197.05125, within(1e-9));
    assertThat(cp.outliers().outerUpper()).isCloseTo(207.955, within(1e-9));
    assertThat(fit.stats().columns().get("y").aboveLimit()).as("values capped").isEqualTo(1);
    assertThat(fit.stats().columns().get("y").aboveOuter()).as("extreme outliers").isEqualTo(1);
    List<Object> out = treated(data, fit, "y");
    assertThat((Double) out.get(7)).as("capped at the fence").isEqualTo(cp.outliers().upper())
        .isCloseTo(204.98125, within(1e-9));
    assertThat(out.subList(0, 7)).containsExactly(199.31, 199.53, 200.19, 200.82, 201.92, 201.95, 202.18);
  }

  @Test
  void lowOnlyDirectionKeepsHighValues(SparkSession spark) {
    Dataset<Row> data = doubles(spark, "y", GRUBBS);
    Sluice.Fit fit = fit(data, settings("defaults.outliers.direction=low"));
    ColumnPlan cp = fit.plan().column("y").orElseThrow();
    assertThat(cp.outliers().upper()).as("no upper limit on a higher-is-better column").isNull();
    assertThat(treated(data, fit, "y").get(7)).isEqualTo(245.57);
  }

  @Test
  void setMissingThenMedianFillUsesValuesAfterTheOutlierStep(SparkSession spark) {
    Dataset<Row> data = doubles(spark, "y", GRUBBS);
    Sluice.Fit fit = fit(data, settings("defaults.outliers.action=set-missing"));
    ColumnPlan cp = fit.plan().column("y").orElseThrow();
    // (D) by hand: without 245.57 the seven values have median 200.82, not the 201.37 of all
    // eight: the extreme does not drag the fill value.
    assertThat(cp.missing().fillNumber()).isCloseTo(200.82, within(1e-12));
    assertThat(treated(data, fit, "y").get(7)).isEqualTo(200.82);
  }

  @Test
  void meanFillIsTakenAfterCapping(SparkSession spark) {
    Double[] values = {199.31, 199.53, 200.19, 200.82, 201.92, 201.95, 202.18, 245.57, null};
    Dataset<Row> data = doubles(spark, "y", values);
    Sluice.Fit fit = fit(data, settings("defaults.missing.strategy=mean"));
    // (D) by hand: mean of the seven values and the cap 204.98125 = 1610.87125 / 8.
    double expected = (199.31 + 199.53 + 200.19 + 200.82 + 201.92 + 201.95 + 202.18 + 204.98125) / 8;
    assertThat(fit.plan().column("y").orElseThrow().missing().fillNumber()).isCloseTo(expected, within(1e-9));
    assertThat((Double) treated(data, fit, "y").get(8)).isCloseTo(expected, within(1e-9));
  }

  @Test
  void modifiedZFlagsTheExtreme(SparkSession spark) {
    Dataset<Row> data = doubles(spark, "y", GRUBBS);
    Sluice.Fit fit = fit(data, settings("defaults.outliers.method=mad", "defaults.outliers.action=flag"));
    ColumnPlan cp = fit.plan().column("y").orElseThrow();
    // (D) median 201.37, MAD 0.995; limit 3.5 (Iglewicz and Hoaglin, as cited by NIST 1.3.5.17):
    // upper limit 201.37 + 3.5 * 0.995 / 0.6745.
    assertThat(fit.profile().column("y").orElseThrow().mad()).isCloseTo(0.995, within(1e-9));
    assertThat(cp.outliers().upper()).isCloseTo(201.37 + 3.5 * 0.995 / 0.6745, within(1e-9));
    List<Row> rows = Sluice.treat(data, fit.plan()).collectAsList();
    assertThat(column(rows, "y").get(7)).as("flag keeps the value").isEqualTo(245.57);
    assertThat(column(rows, "y__outlier")).containsExactly(false, false, false, false, false, false, false, true);
  }

  @Test
  void zScoreLimitDecides(SparkSession spark) {
    Dataset<Row> data = doubles(spark, "y", GRUBBS);
    // (S) NIST 1.3.5.17.1: G = 2.4687 for 245.57, so |z| > 2 flags it and |z| > 3 does not.
    Sluice.Fit two = fit(data, settings("defaults.outliers.method=zscore", "defaults.outliers.z-limit=2"));
    Sluice.Fit three = fit(data, settings("defaults.outliers.method=zscore", "defaults.outliers.z-limit=3"));
    assertThat(two.stats().columns().get("y").aboveLimit()).isEqualTo(1);
    assertThat(three.stats().columns().get("y").aboveLimit()).isZero();
  }

  @Test
  void invalidValuesBecomeMissingBeforeQuantiles(SparkSession spark) {
    Double[] values = {199.31, 199.53, 200.19, 200.82, 201.92, 201.95, 202.18, 245.57, -99.9, 999.9};
    Dataset<Row> data = doubles(spark, "y", values);
    Sluice.Fit fit = fit(data, settings("defaults.valid-min=0", "defaults.valid-max=500"));
    // The glitch codes are incorrect entries, not outliers: the fences are those of the NIST data.
    assertThat(fit.profile().column("y").orElseThrow().invalid()).isEqualTo(2);
    assertThat(fit.plan().column("y").orElseThrow().outliers().upper()).isCloseTo(204.98125, within(1e-9));
    List<Object> out = treated(data, fit, "y");
    // (D) median of the eight valid values after capping 245.57: (200.82 + 201.92) / 2.
    assertThat(out.get(8)).isEqualTo(out.get(9));
    assertThat((Double) out.get(8)).isCloseTo(201.37, within(1e-9));
  }

  @Test
  void indicatorMarksFilledRows(SparkSession spark) {
    Dataset<Row> data = doubles(spark, "y", 1.0, null, 3.0, Double.NaN);
    Sluice.Fit fit = fit(data, settings("defaults.missing.indicator=true"));
    List<Row> rows = Sluice.treat(data, fit.plan()).collectAsList();
    assertThat(column(rows, "y__missing")).containsExactly(false, true, false, true);
    assertThat(column(rows, "y")).containsExactly(1.0, 2.0, 3.0, 2.0);
  }
}
