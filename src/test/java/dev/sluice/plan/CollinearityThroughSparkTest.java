package dev.sluice.plan;

import static dev.sluice.testing.Fixtures.settings;
import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

import dev.sluice.Sluice;
import dev.sluice.testing.Fixtures;
import dev.sluice.testing.ReferenceData;
import dev.sluice.testing.SharedSpark;
import java.util.List;
import org.apache.commons.math3.stat.correlation.PearsonsCorrelation;
import org.apache.commons.math3.stat.correlation.SpearmansCorrelation;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.ExtendWith;

/**
 * Correlation and VIF from the pass-2 co-moments, Spearman from the pass-1 row sample, on the Longley data
 * (NIST StRD linear regression dataset "Longley"), against published values.
 */
@ExtendWith(SharedSpark.class)
class CollinearityThroughSparkTest {
  static final List<String> NAMES = List.of("y", "x1", "x2", "x3", "x4", "x5", "x6");

  private static CollinearityFindings findings(SparkSession spark, String... overrides) {
    Dataset<Row> data = Fixtures.doubleTable(spark, NAMES, ReferenceData.longleyRows());
    String[] all = new String[overrides.length + 2];
    all[0] = "defaults.outliers.method=none";
    all[1] = "collinearity.vif-limit=1000000";
    System.arraycopy(overrides, 0, all, 2, overrides.length);
    return Sluice.fit(data, settings(all), List.of()).plan().collinearity();
  }

  private static double at(List<List<Double>> m, List<String> cols, String a, String b) {
    return m.get(cols.indexOf(a)).get(cols.indexOf(b));
  }

  @Test
  void pearsonMatchesPublishedValues(SparkSession spark) {
    CollinearityFindings f = findings(spark);
    // (S) Pearson on Longley as used in Commons Math's own tests, checked there against R.
    assertThat(at(f.pearson(), f.columns(), "y", "x1")).isCloseTo(0.970898525061056, within(1e-12));
    assertThat(at(f.pearson(), f.columns(), "x3", "x4")).isCloseTo(-0.1774206295018783, within(1e-12));
  }

  @Test
  void spearmanMatchesPublishedValues(SparkSession spark) {
    // 16 rows: the row sample holds the whole table, so the ranks are exact.
    CollinearityFindings f = findings(spark);
    // (S) Spearman on Longley as used in Commons Math's tests, checked there against R.
    assertThat(at(f.spearman(), f.columns(), "y", "x1")).isCloseTo(0.982352941176471, within(1e-12));
    assertThat(at(f.spearman(), f.columns(), "x3", "x4")).isCloseTo(-0.3411764705882353, within(1e-12));
  }

  @Test
  void spearmanOnARowSampleIsCloseToTheWholeTable(SparkSession spark) {
    // 20,000 rows of a monotone but non-linear relation with noise, Spearman from a sample of
    // 2,000 rows. Reference: Commons Math SpearmansCorrelation on all rows (D). The standard
    // error of a sample Spearman coefficient is about (1 - rho^2) / sqrt(n) for large n
    // (common practice, Fisher-style approximation): 3 standard errors are allowed.
    java.util.SplittableRandom r = new java.util.SplittableRandom(21);
    double[][] rows = new double[20_000][];
    for (int i = 0; i < rows.length; i++) {
      double x = r.nextGaussian();
      rows[i] = new double[] {x, Math.exp(x) + r.nextGaussian()};
    }
    Dataset<Row> data = Fixtures.doubleTable(spark, List.of("x", "y"), rows);
    CollinearityFindings f = Sluice.fit(data, settings("defaults.outliers.method=none",
        "collinearity.spearman-rows=2000"), List.of()).plan().collinearity();
    double whole = new SpearmansCorrelation().correlation(column(rows, 0), column(rows, 1));
    double se = (1 - whole * whole) / Math.sqrt(2000);
    assertThat(at(f.spearman(), f.columns(), "x", "y")).isCloseTo(whole, within(3 * se))
        .isNotEqualTo(whole);
  }

  @Test
  void vifOfTheSixPredictorsMatchesPublishedValues(SparkSession spark) {
    Dataset<Row> data = Fixtures.doubleTable(spark, NAMES.subList(1, 7), predictors());
    CollinearityFindings f = Sluice.fit(data, settings("defaults.outliers.method=none"), List.of())
        .plan().collinearity();
    // (S) published VIF of the Longley predictors, to 2-3 decimals (../shared/REFERENCES.md).
    double[] published = {135.53, 1788.51, 33.619, 3.589, 399.15, 758.98};
    for (int j = 0; j < 6; j++) {
      assertThat(f.vif().get(j)).as("VIF of x%d", j + 1).isCloseTo(published[j], within(0.01 * Math.max(1, published[j] / 100)));
    }
    // Common practice: VIF over 10 marks collinearity; the greedy drop set must end under it.
    assertThat(f.suggestedDrops()).isNotEmpty().contains("x2");
  }

  @Test
  void pearsonIsUnchangedByScalingAndMatchesCommonsMathAfterImputation(SparkSession spark) {
    double[][] rows = ReferenceData.longleyRows();
    double[][] gappy = new double[rows.length][];
    for (int i = 0; i < rows.length; i++) {
      gappy[i] = rows[i].clone();
    }
    gappy[3][1] = Double.NaN; // becomes missing: NaN is treated as missing
    gappy[9][4] = Double.NaN;
    CollinearityFindings none = findings(spark, data(spark, gappy));
    CollinearityFindings scaled = findings(spark, data(spark, gappy), "defaults.scaling=standard");
    for (int i = 0; i < none.columns().size(); i++) {
      for (int j = 0; j < none.columns().size(); j++) {
        assertThat(scaled.pearson().get(i).get(j)).isCloseTo(none.pearson().get(i).get(j), within(1e-12));
      }
    }
    // Reference: Commons Math on the same data with each gap filled by the median of its
    // column's other values (the default fill), imputed by hand here.
    double[][] filled = fillWithMedians(gappy);
    double[][] ref = new PearsonsCorrelation(filled).getCorrelationMatrix().getData();
    assertThat(at(none.pearson(), none.columns(), "y", "x1")).isCloseTo(ref[0][1], within(1e-12));
    assertThat(at(none.pearson(), none.columns(), "x3", "x4")).isCloseTo(ref[3][4], within(1e-12));
    double rho = new SpearmansCorrelation().correlation(column(filled, 0), column(filled, 1));
    // The whole table is in the row sample: its Spearman after imputation is exact.
    assertThat(at(none.spearman(), none.columns(), "y", "x1")).isCloseTo(rho, within(1e-12));
  }

  private static Dataset<Row> data(SparkSession spark, double[][] rows) {
    return Fixtures.doubleTable(spark, NAMES, rows);
  }

  private static CollinearityFindings findings(SparkSession spark, Dataset<Row> data, String... overrides) {
    String[] all = new String[overrides.length + 1];
    all[0] = "defaults.outliers.method=none";
    System.arraycopy(overrides, 0, all, 1, overrides.length);
    return Sluice.fit(data, settings(all), List.of()).plan().collinearity();
  }

  private static double[][] predictors() {
    double[][] rows = ReferenceData.longleyRows();
    double[][] x = new double[rows.length][6];
    for (int i = 0; i < rows.length; i++) {
      System.arraycopy(rows[i], 1, x[i], 0, 6);
    }
    return x;
  }

  private static double[][] fillWithMedians(double[][] rows) {
    double[][] out = new double[rows.length][];
    for (int i = 0; i < rows.length; i++) {
      out[i] = rows[i].clone();
    }
    for (int j = 0; j < rows[0].length; j++) {
      double[] present = java.util.Arrays.stream(column(rows, j)).filter(v -> !Double.isNaN(v)).toArray();
      double median = new org.apache.commons.math3.stat.descriptive.rank.Percentile()
          .withEstimationType(org.apache.commons.math3.stat.descriptive.rank.Percentile.EstimationType.R_7)
          .evaluate(present, 50);
      for (double[] r : out) {
        if (Double.isNaN(r[j])) {
          r[j] = median;
        }
      }
    }
    return out;
  }

  private static double[] column(double[][] rows, int j) {
    double[] c = new double[rows.length];
    for (int i = 0; i < rows.length; i++) {
      c[i] = rows[i][j];
    }
    return c;
  }
}
