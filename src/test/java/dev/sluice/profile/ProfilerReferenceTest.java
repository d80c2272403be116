package dev.sluice.profile;

import static dev.sluice.testing.Fixtures.doubles;
import static dev.sluice.testing.Fixtures.settings;
import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

import dev.sluice.Sluice;
import dev.sluice.plan.ColumnPlan;
import dev.sluice.testing.Fixtures;
import dev.sluice.testing.ReferenceData;
import dev.sluice.testing.SharedSpark;
import java.util.Arrays;
import java.util.List;
import java.util.SplittableRandom;
import org.apache.commons.math3.stat.descriptive.rank.Percentile;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.ExtendWith;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

/**
 * The pass-1 profile through Spark against outside references: the statistics are plain Java, but
 * the loop that feeds them, the projection and the merge across partitions are checked here.
 */
@ExtendWith(SharedSpark.class)
class ProfilerReferenceTest {
  private static ColumnProfile profile(Dataset<Row> data, String col, String... overrides) {
    return Sluice.fit(data, settings(overrides), List.of()).profile().column(col).orElseThrow();
  }

  @ParameterizedTest
  @ValueSource(strings = {"NumAcc1", "NumAcc2", "NumAcc3", "NumAcc4", "Michelso", "Lew", "Mavro"})
  void meanAndStandardDeviationMatchNistCertifiedValues(String name, SparkSession spark) {
    // (S) NIST StRD univariate summary statistics: certified mean and standard deviation (n - 1),
    // read from the data file's header (the files ship in the Commons Math 3.6.1 tests jar).
    ReferenceData.Strd d = ReferenceData.strd(name);
    ColumnProfile p = profile(doubles(spark, "y", d.data()), "y", "defaults.outliers.method=none");
    assertThat(p.mean()).as("mean of %s", name).isCloseTo(d.certifiedMean(), within(Math.abs(d.certifiedMean()) * 1e-14 + 1e-14));
    // Each decimal input is stored as the nearest double, which bounds the attainable accuracy of
    // the standard deviation on NumAcc3 and NumAcc4 (values near 1e7 with spread 0.1): 1e-7.
    assertThat(p.stddev()).as("sd of %s", name).isCloseTo(d.certifiedStddev(), within(d.certifiedStddev() * 1e-7));
  }

  @Test
  void exactQuartilesAreHyndmanFanType7OnTheNistWaferData(SparkSession spark) {
    // NIST/SEMATECH e-Handbook 7.2.6.2, 12 wafer resistivities (S). Type 7 quartiles (D, derived
    // with Commons Math Percentile R_7; ../shared/REFERENCES.md): 95.11625, 95.1579, 95.181325.
    double[] wafer = {95.1772, 95.1567, 95.1937, 95.1959, 95.1442, 95.0610, 95.1591, 95.1195,
        95.1065, 95.0925, 95.1990, 95.1682};
    ColumnProfile p = profile(doubles(spark, "r", wafer), "r");
    assertThat(p.quantileMethod()).isEqualTo("exact-type7");
    assertThat(p.q1()).isCloseTo(95.11625, within(1e-9));
    assertThat(p.median()).isCloseTo(95.1579, within(1e-9));
    assertThat(p.q3()).isCloseTo(95.181325, within(1e-9));
  }

  @Test
  void numAcc2QuartilesFencesAndScaling(SparkSession spark) {
    // NIST StRD NumAcc2: every quantile type gives Q1 1.1, median 1.2, Q3 1.3 (D), so the Tukey
    // fences are 0.8 and 1.6 and no value lies beyond them.
    double[] data = ReferenceData.strd("NumAcc2").data();
    Dataset<Row> t = doubles(spark, "y", data);
    Sluice.Fit robust = Sluice.fit(t, settings("defaults.scaling=robust"), List.of());
    ColumnPlan cp = robust.plan().column("y").orElseThrow();
    assertThat(cp.outliers().lower()).isCloseTo(0.8, within(1e-12));
    assertThat(cp.outliers().upper()).isCloseTo(1.6, within(1e-12));
    assertThat(cp.scaling().centre()).isCloseTo(1.2, within(1e-12));
    assertThat(cp.scaling().scale()).isCloseTo(0.2, within(1e-12));
    Sluice.Fit minMax = Sluice.fit(t, settings("defaults.scaling=min-max"), List.of());
    List<Row> scaled = Sluice.treat(t, minMax.plan()).collectAsList();
    // min 1.1 and max 1.3 (S, the NumAcc2 data): 1.2 maps to 0.5, 1.1 to 0, 1.3 to 1.
    assertThat(scaled.get(0).getDouble(0)).isCloseTo(0.5, within(1e-9));
    double[] out = scaled.stream().mapToDouble(r -> r.getDouble(0)).toArray();
    assertThat(Arrays.stream(out).min().orElseThrow()).isCloseTo(0.0, within(1e-12));
    assertThat(Arrays.stream(out).max().orElseThrow()).isCloseTo(1.0, within(1e-12));
  }

  @Test
  void largeTableQuartilesAreExactAcrossPartitions(SparkSession spark) {
    // More rows than max-held-values: the search is aimed by a pilot from a few partitions and
    // must still give the exact type 7 quartiles. Reference: Commons Math Percentile R_7 (D).
    SplittableRandom random = new SplittableRandom(7);
    double[] values = new double[20_000];
    for (int i = 0; i < values.length; i++) {
      values[i] = Math.exp(random.nextGaussian());
    }
    Dataset<Row> data = doubles(spark, "x", values).repartition(7);
    ColumnProfile p = profile(data, "x", "quantiles.max-held-values=1000", "quantiles.pilot-rows=1000");
    assertThat(p.quantileMethod()).isEqualTo("exact-type7");
    assertThat(p.rankError()).isZero();
    Percentile r7 = new Percentile().withEstimationType(Percentile.EstimationType.R_7);
    double[] got = {p.q1(), p.median(), p.q3()};
    double[] probs = {25, 50, 75};
    for (int i = 0; i < 3; i++) {
      double exact = r7.evaluate(values, probs[i]);
      assertThat(got[i]).as("quantile %s", probs[i]).isCloseTo(exact, within(1e-12 * exact));
    }
  }

  @Test
  void aWideTableSharesTheHeldValuesAndStaysExact(SparkSession spark) {
    // 40 columns share 4,000 held values: no column can be held whole (each window gets the floor
    // of 1,000 values for 3,000 rows), so every column goes through the pilot and the windows.
    // Reference: Commons Math Percentile R_7 on each column (D).
    SplittableRandom random = new SplittableRandom(29);
    int p = 40;
    double[][] rows = new double[3_000][p];
    for (double[] row : rows) {
      for (int j = 0; j < p; j++) {
        row[j] = j % 2 == 0 ? random.nextGaussian() * (j + 1) : Math.floor(random.nextDouble() * 7);
      }
    }
    List<String> names = new java.util.ArrayList<>();
    for (int j = 0; j < p; j++) {
      names.add("c" + j);
    }
    Dataset<Row> data = Fixtures.doubleTable(spark, names, rows).repartition(3);
    Sluice.Fit f = Sluice.fit(data, settings("quantiles.max-held-values=4000",
        "quantiles.pilot-rows=1000", "defaults.outliers.method=none"), List.of());
    Percentile r7 = new Percentile().withEstimationType(Percentile.EstimationType.R_7);
    for (int j = 0; j < p; j++) {
      double[] col = ReferenceData.column(rows, j);
      ColumnProfile c = f.profile().column("c" + j).orElseThrow();
      assertThat(c.q1()).as("Q1 of c%d", j).isCloseTo(r7.evaluate(col, 25), within(1e-12 * (j + 1)));
      assertThat(c.median()).as("median of c%d", j).isCloseTo(r7.evaluate(col, 50), within(1e-12 * (j + 1)));
      assertThat(c.q3()).as("Q3 of c%d", j).isCloseTo(r7.evaluate(col, 75), within(1e-12 * (j + 1)));
    }
  }

  @Test
  void exactPathMatchesCommonsMathR7OnGeneratedData(SparkSession spark) {
    SplittableRandom random = new SplittableRandom(11);
    double[] values = new double[501];
    for (int i = 0; i < values.length; i++) {
      values[i] = Math.round(random.nextGaussian() * 100) / 10.0; // ties on purpose
    }
    ColumnProfile p = profile(doubles(spark, "x", values), "x");
    Percentile r7 = new Percentile().withEstimationType(Percentile.EstimationType.R_7);
    assertThat(p.q1()).isCloseTo(r7.evaluate(values, 25), within(1e-12));
    assertThat(p.median()).isCloseTo(r7.evaluate(values, 50), within(1e-12));
    assertThat(p.q3()).isCloseTo(r7.evaluate(values, 75), within(1e-12));
  }

  @Test
  void nullNanInfiniteAndInvalidAreCountedApart(SparkSession spark) {
    Dataset<Row> data = doubles(spark, "x", 1.0, 2.0, Double.NaN, null, Double.POSITIVE_INFINITY,
        Double.NEGATIVE_INFINITY, 150.0);
    ColumnProfile p = profile(data, "x", "defaults.valid-max=100");
    assertThat(p.rows()).isEqualTo(7);
    assertThat(p.nulls()).isEqualTo(1);
    assertThat(p.nan()).isEqualTo(1);
    assertThat(p.infinite()).isEqualTo(2);
    assertThat(p.invalid()).isEqualTo(1);
    assertThat(p.usable()).isEqualTo(2);
    assertThat(p.median()).isEqualTo(1.5);
  }

  @Test
  void categoricalColumnGetsDistinctCountAndMostFrequentValue(SparkSession spark) {
    Dataset<Row> data = spark.sql(
        "SELECT * FROM VALUES ('dairy'), ('frozen'), ('dairy'), (NULL), ('dairy') AS t(product_class)");
    ColumnProfile p = profile(data, "product_class");
    assertThat(p.kind()).isEqualTo(ColumnKind.CATEGORICAL);
    assertThat(p.distinct()).isEqualTo(2);
    assertThat(p.topValue()).isEqualTo("dairy");
    assertThat(p.topCount()).isEqualTo(3);
    assertThat(p.nulls()).isEqualTo(1);
    Sluice.Fit f = Sluice.fit(data, settings(), List.of());
    assertThat(Fixtures.column(Sluice.treat(data, f.plan()).collectAsList(), "product_class"))
        .containsExactly("dairy", "frozen", "dairy", "dairy", "dairy");
  }
}
