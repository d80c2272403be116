package dev.sluice.treat;

import static dev.sluice.testing.Fixtures.settings;
import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

import dev.sluice.Sluice;
import dev.sluice.plan.TreatedStats;
import dev.sluice.testing.SharedSpark;
import java.nio.file.Path;
import java.util.List;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.extension.ExtendWith;
import org.junit.jupiter.api.io.TempDir;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

/**
 * Pass 2 reads Parquet as columnar batches and casts values itself; the same rows held in memory
 * are read as rows through Spark's casts. Both must give the same treated statistics (reference:
 * the row path): counts and quartiles exactly, sums to rounding.
 */
@ExtendWith(SharedSpark.class)
class ColumnarPassTest {
  @TempDir Path tmp;

  @ParameterizedTest
  @ValueSource(strings = {"cap", "set-missing"})
  void columnarAndRowPassesGiveTheSameTreatedStatistics(String action, SparkSession spark) {
    String dir = tmp.resolve("t").toString();
    spark.sql("SELECT CAST(id % 97 AS INT) AS i, CASE WHEN id % 13 = 0 THEN NULL ELSE id / 7.0 END AS d,"
        + " CAST(id * id % 1009 AS DECIMAL(20,4)) AS dec, CAST(id % 5 AS FLOAT) AS f,"
        + " CASE WHEN id % 50 = 0 THEN 1e6 ELSE CAST(id % 31 AS DOUBLE) END AS spiky"
        + " FROM range(6000)").repartition(3).write().parquet(dir);
    Dataset<Row> parquet = spark.read().parquet(dir);
    Dataset<Row> inMemory = spark.createDataFrame(parquet.collectAsList(), parquet.schema());
    assertThat(dev.sluice.profile.Batches.of(parquet)).as("Parquet is read as batches").isPresent();
    assertThat(dev.sluice.profile.Batches.of(inMemory)).as("rows in memory are read as rows").isEmpty();
    String[] conf = {"defaults.outliers.action=" + action, "defaults.scaling=standard"};
    TreatedStats columnar = Sluice.fit(parquet, settings(conf), List.of()).stats();
    TreatedStats rows = Sluice.fit(inMemory, settings(conf), List.of()).stats();
    assertThat(columnar.columns().keySet()).containsExactly("i", "d", "dec", "f", "spiky");
    for (String c : columnar.columns().keySet()) {
      TreatedStats.ColumnStats a = columnar.columns().get(c);
      TreatedStats.ColumnStats b = rows.columns().get(c);
      assertThat(a.present()).as(c).isEqualTo(b.present());
      assertThat(List.of(a.belowInner(), a.aboveInner(), a.belowOuter(), a.aboveOuter(), a.belowLimit(), a.aboveLimit()))
          .as(c).isEqualTo(List.of(b.belowInner(), b.aboveInner(), b.belowOuter(), b.aboveOuter(), b.belowLimit(), b.aboveLimit()));
      assertThat(a.min()).as(c).isEqualTo(b.min());
      assertThat(a.max()).as(c).isEqualTo(b.max());
      assertThat(a.median()).as(c).isEqualTo(b.median());
      assertThat(a.mean()).as(c).isCloseTo(b.mean(), within(1e-12 * Math.abs(b.mean())));
      assertThat(a.stddev()).as(c).isCloseTo(b.stddev(), within(1e-12 * b.stddev()));
    }
    assertThat(columnar.columns().get("spiky").aboveLimit()).as("the planted spikes").isPositive();
    double[][] ra = columnar.pearson().correlation(new double[] {Double.NaN, Double.NaN, Double.NaN, Double.NaN, Double.NaN});
    double[][] rb = rows.pearson().correlation(new double[] {Double.NaN, Double.NaN, Double.NaN, Double.NaN, Double.NaN});
    for (int j = 0; j < ra.length; j++) {
      for (int k = 0; k < ra.length; k++) {
        assertThat(ra[j][k]).isCloseTo(rb[j][k], within(1e-12));
      }
    }
  }
}
