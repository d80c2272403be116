package dev.sluice;

import static dev.sluice.testing.Fixtures.column;
import static dev.sluice.testing.Fixtures.doubles;
import static dev.sluice.testing.Fixtures.settings;
import static org.assertj.core.api.Assertions.assertThat;

import dev.sluice.plan.ColumnPlan;
import dev.sluice.testing.SharedSpark;
import java.util.List;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.RowFactory;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.StructType;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.ExtendWith;

/** The written edge-case policy, one test per case (see README, "Edge cases"). */
@ExtendWith(SharedSpark.class)
class EdgeCaseTest {
  private static Sluice.Fit fit(Dataset<Row> data, String... overrides) {
    return Sluice.fit(data, settings(overrides), List.of());
  }

  @Test
  void constantColumnHasZeroIqrNoLimitsAndScalesToZero(SparkSession spark) {
    Dataset<Row> data = doubles(spark, "c", 5.0, 5.0, 5.0, 5.0);
    Sluice.Fit f = fit(data, "defaults.scaling=standard");
    ColumnPlan cp = f.plan().column("c").orElseThrow();
    assertThat(cp.outliers().active()).isFalse();
    assertThat(cp.outliers().reason()).startsWith("IQR is zero");
    assertThat(cp.scaling().zeroSpread()).isTrue();
    assertThat(column(Sluice.treat(data, f.plan()).collectAsList(), "c")).containsOnly(0.0);
  }

  @Test
  void allNullColumnIsDroppedAndSaysWhy(SparkSession spark) {
    Dataset<Row> data = spark.createDataFrame(
        List.of(RowFactory.create(1.0, null), RowFactory.create(2.0, null), RowFactory.create(3.0, null)),
        new StructType().add("a", DataTypes.DoubleType).add("b", DataTypes.DoubleType));
    Sluice.Fit f = fit(data);
    ColumnPlan b = f.plan().column("b").orElseThrow();
    assertThat(b.kept()).isFalse();
    assertThat(b.dropReason()).contains("null rate 1.0000");
    assertThat(Sluice.treat(data, f.plan()).columns()).containsExactly("a");
  }

  @Test
  void allNanColumnCountsNanApartAndHasNoStatistics(SparkSession spark) {
    Dataset<Row> data = doubles(spark, "n", Double.NaN, Double.NaN, Double.NaN);
    Sluice.Fit f = fit(data, "defaults.missing.drop-null-rate=1.0");
    var p = f.profile().column("n").orElseThrow();
    assertThat(p.nan()).isEqualTo(3);
    assertThat(p.nulls()).isZero();
    assertThat(p.usable()).isZero();
    assertThat(Double.isNaN(p.median())).isTrue();
    assertThat(f.plan().column("n").orElseThrow().missing().fillNumber()).isNull();
  }

  @Test
  void infiniteValuesAreMissingNotExtremes(SparkSession spark) {
    Dataset<Row> data = doubles(spark, "x", 1.0, 2.0, 3.0, Double.POSITIVE_INFINITY, Double.NEGATIVE_INFINITY);
    Sluice.Fit f = fit(data);
    var p = f.profile().column("x").orElseThrow();
    assertThat(p.infinite()).isEqualTo(2);
    assertThat(p.max()).isEqualTo(3.0);
    assertThat(column(Sluice.treat(data, f.plan()).collectAsList(), "x")).containsExactly(1.0, 2.0, 3.0, 2.0, 2.0);
  }

  @Test
  void singleRowTableIsProfiledAndKeptAsIs(SparkSession spark) {
    Dataset<Row> data = doubles(spark, "x", 42.0);
    Sluice.Fit f = fit(data, "defaults.scaling=standard");
    var p = f.profile().column("x").orElseThrow();
    assertThat(p.median()).isEqualTo(42.0);
    assertThat(Double.isNaN(p.stddev())).as("n - 1 = 0: no standard deviation").isTrue();
    assertThat(f.plan().column("x").orElseThrow().scaling().zeroSpread()).isTrue();
    assertThat(column(Sluice.treat(data, f.plan()).collectAsList(), "x")).containsExactly(0.0);
  }

  @Test
  void emptyTableGivesAPlanAndNoRows(SparkSession spark) {
    Dataset<Row> data = doubles(spark, "x", new Double[0]);
    Sluice.Fit f = fit(data);
    assertThat(f.profile().rows()).isZero();
    assertThat(f.plan().column("x").orElseThrow().outliers().reason()).startsWith("no usable values");
    assertThat(Sluice.treat(data, f.plan()).count()).isZero();
  }

  @Test
  void requiredColumnSendsRowsToQuarantineInsteadOfFilling(SparkSession spark) {
    Dataset<Row> data = doubles(spark, "x", 1.0, null, 3.0);
    Sluice.Fit f = fit(data, "columns.x.role=required");
    assertThat(Sluice.treat(data, f.plan()).count()).isEqualTo(2);
    List<Row> q = Sluice.quarantine(data, f.plan()).collectAsList();
    assertThat(q).hasSize(1);
    assertThat(column(q, "quarantine_stage")).containsExactly("required");
    assertThat(column(q, "quarantine_column")).containsExactly("x");
    assertThat(column(q, "quarantine_value")).containsExactly("null");
    assertThat(column(q, "x")).as("original value kept").containsExactly((Object) null);
  }

  @Test
  void awkwardColumnNamesAreQuoted(SparkSession spark) {
    StructType schema = new StructType()
        .add("gross.weight", DataTypes.DoubleType)
        .add("air `temp`", DataTypes.DoubleType)
        .add("température", DataTypes.DoubleType);
    List<Row> rows = List.of(RowFactory.create(1.0, 2.0, 3.0), RowFactory.create(null, 4.0, 5.0),
        RowFactory.create(3.0, 6.0, 7.0));
    Dataset<Row> data = spark.createDataFrame(rows, schema);
    Sluice.Fit f = fit(data, "defaults.missing.indicator=true");
    Dataset<Row> t = Sluice.treat(data, f.plan());
    assertThat(t.columns()).containsExactly("gross.weight", "gross.weight__missing", "air `temp`",
        "air `temp`__missing", "température", "température__missing");
    assertThat(column(t.collectAsList(), "gross.weight")).containsExactly(1.0, 2.0, 3.0);
  }

  @Test
  void integerAndDecimalColumnsAreTreatedAsDoubles(SparkSession spark) {
    Dataset<Row> data = spark.sql(
        "SELECT CAST(id AS INT) AS i, CAST(id AS DECIMAL(38,18)) AS d, CAST(id AS SHORT) AS s FROM range(1, 8)");
    Sluice.Fit f = fit(data);
    assertThat(f.profile().column("d").orElseThrow().median()).isEqualTo(4.0);
    assertThat(f.profile().column("i").orElseThrow().q1()).isEqualTo(2.5);
    assertThat(Sluice.treat(data, f.plan()).schema().apply("s").dataType()).isEqualTo(DataTypes.DoubleType);
  }

  /**
   * Values near Double.MAX_VALUE: a plain sum of these five overflows and their squares are
   * infinite. Reference figures computed exactly with java.math.BigDecimal: mean 1.5e308,
   * sample standard deviation sqrt(0.1e616 / 4) = 1.5811388300841898e307. y = x / 2 exactly, so
   * the Pearson correlation of x and y is 1 by definition.
   */
  @Test
  void valuesNearDoubleMaxKeepFiniteCorrectMomentsAndCorrelation(SparkSession spark) {
    double[] x = {1.7e308, 1.6e308, 1.5e308, 1.4e308, 1.3e308};
    double[][] rows = new double[x.length][];
    for (int i = 0; i < x.length; i++) {
      rows[i] = new double[] {x[i], x[i] / 2};
    }
    Dataset<Row> data = dev.sluice.testing.Fixtures.doubleTable(spark, List.of("x", "y"), rows);
    Sluice.Fit f = fit(data, "defaults.scaling=standard", "defaults.outliers.method=none");
    var p = f.profile().column("x").orElseThrow();
    assertThat(p.mean()).isCloseTo(1.5e308, org.assertj.core.data.Percentage.withPercentage(1e-10));
    assertThat(p.stddev()).isCloseTo(1.5811388300841898e307, org.assertj.core.data.Percentage.withPercentage(1e-10));
    assertThat(f.plan().collinearity().pearson().get(0).get(1)).isEqualTo(1.0);
    var scaling = f.plan().column("x").orElseThrow().scaling();
    assertThat(scaling.centre()).isCloseTo(1.5e308, org.assertj.core.data.Percentage.withPercentage(1e-10));
    // z of the largest value: 0.2e308 / 1.5811388300841898e307 = 1.2649110640673518 (BigDecimal).
    List<Object> z = column(Sluice.treat(data, f.plan()).collectAsList(), "x");
    assertThat((Double) z.get(0)).isCloseTo(1.2649110640673518, org.assertj.core.data.Offset.offset(1e-9));
  }

  @Test
  void aColumnWithNoUsableValuesGivesNoQuartilesOnALargeTableToo(SparkSession spark) {
    // Over max-held-values rows the quartile search starts from a pilot; with nothing usable
    // in it or in the column, the quartiles are undefined rather than an error.
    Double[] values = new Double[3_000];
    java.util.Arrays.fill(values, 1.0);
    values[7] = null;
    values[8] = Double.NaN;
    Dataset<Row> data = doubles(spark, "x", values);
    Sluice.Fit f = fit(data, "quantiles.max-held-values=1000", "quantiles.pilot-rows=1000",
        "columns.x.valid-min=2");
    var p = f.profile().column("x").orElseThrow();
    assertThat(p.quantileMethod()).isEqualTo("exact-type7");
    assertThat(p.usable()).isZero();
    assertThat(p.invalid()).isEqualTo(2_998);
    assertThat(Double.isNaN(p.median())).isTrue();
  }

  @Test
  void aCategoricalColumnWithTooManyDistinctValuesHasNoModeAndIsNotFilled(SparkSession spark) {
    // 100,001 distinct labels plus one gap: one past the 100,000 values counted exactly.
    Dataset<Row> data = spark.range(100_002).selectExpr(
        "CASE WHEN id = 5 THEN NULL ELSE concat('lot-', CAST(id AS STRING)) END AS lot_label");
    Sluice.Fit f = fit(data);
    var p = f.profile().column("lot_label").orElseThrow();
    assertThat(p.topValue()).isNull();
    assertThat(p.nulls()).isEqualTo(1);
    // The HyperLogLog estimate (lgK 12, relative standard error about 1.6 %, DataSketches).
    assertThat(p.distinct()).isBetween(95_000L, 105_000L);
    var missing = f.plan().column("lot_label").orElseThrow().missing();
    assertThat(missing.fillText()).isNull();
    assertThat(missing.reason()).startsWith("too many distinct values");
  }
}
