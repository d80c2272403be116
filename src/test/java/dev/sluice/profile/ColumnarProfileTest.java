package dev.sluice.profile;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

import dev.sluice.config.Role;
import dev.sluice.config.Settings;
import dev.sluice.testing.Fixtures;
import dev.sluice.testing.SharedSpark;
import java.nio.file.Path;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.functions;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.ExtendWith;
import org.junit.jupiter.api.io.TempDir;

/**
 * Pass 1 reads Parquet as columnar batches and casts and hashes values itself; it must give
 * exactly the profile the row path gives through Spark's own casts and xxhash64, for every type
 * it reads (reference: the row path, Catalyst's casts and hash).
 */
@ExtendWith(SharedSpark.class)
class ColumnarProfileTest {
  @TempDir Path tmp;

  @Test
  void thePilotReadsOneWaveOfPartitionsOrMoreWithGroups(SparkSession spark) {
    // Not an outside reference: the policy of Profiler.pilotPartitions. The shared session sets
    // spark.default.parallelism to 4 (without it, local[2] would give 2: its cores); with groups
    // the pilot reads up to 16 partitions.
    Dataset<Row> data = spark.range(10).toDF();
    assertThat(spark.sparkContext().defaultParallelism()).isEqualTo(4);
    assertThat(Profiler.pilotPartitions(data, false)).isEqualTo(4);
    assertThat(Profiler.pilotPartitions(data, true)).isEqualTo(Profiler.PILOT_PARTITIONS).isEqualTo(16);
  }

  @Test
  void columnarAndRowPathsGiveTheSameProfile(SparkSession spark) {
    String dir = tmp.resolve("t").toString();
    spark.sql("SELECT id, CAST(id % 7 AS TINYINT) AS b, CAST(id % 300 AS SMALLINT) AS s,"
        + " CAST(id * 3 AS INT) AS i, id * 1000003 AS l, CAST(id / 7.0 AS FLOAT) AS f,"
        + " CAST(id / 3.0 AS DOUBLE) AS d, CAST(id / 9 AS DECIMAL(38,18)) AS dec,"
        + " CASE WHEN id % 11 = 0 THEN NULL ELSE CAST(id % 13 AS DOUBLE) END AS gaps,"
        + " CASE WHEN id % 5 = 0 THEN 'Ünïcode-' || CAST(id % 17 AS STRING) ELSE 'lot-' || CAST(id % 41 AS STRING) END AS label,"
        + " CASE WHEN id % 6 = 0 THEN NULL ELSE 'grade-' || CAST(id % 4 AS STRING) END AS grade,"
        + " id % 3 = 0 AS flag, DATE'2026-10-01' + CAST(id % 28 AS INT) AS day,"
        + " TIMESTAMP'2026-10-01 08:00:00' + make_interval(0, 0, 0, 0, 0, CAST(id % 600 AS INT), 0) AS at,"
        + " 'PL-' || CAST(id AS STRING) AS pallet, named_struct('a', id) AS nested,"
        + " CASE WHEN id % 4 = 0 THEN CAST('NaN' AS DOUBLE) WHEN id % 9 = 0 THEN CAST('Infinity' AS DOUBLE) ELSE id END AS odd"
        + " FROM range(5000)").repartition(3).write().parquet(dir);
    Dataset<Row> data = spark.read().parquet(dir);
    Settings settings = Fixtures.settings("columns.pallet.role=identifier", "columns.d.valid-max=1000");
    Map<String, Role> roles = new HashMap<>();
    for (String c : data.columns()) {
      roles.put(c, c.equals("pallet") ? Role.IDENTIFIER : Role.TREAT);
    }
    ProfileLayout layout = ProfileLayout.of(data.schema(), roles);
    assertThat(layout.columnar()).isTrue();
    assertThat(Batches.of(data.select(layout.raw().toArray(new org.apache.spark.sql.Column[0]))))
        .as("Parquet offers columnar batches").isPresent();
    TableProfile columnar = Profiler.profile(data, settings, roles, true);
    TableProfile rows = Profiler.profile(data, settings, roles, false);
    // Counts, quartiles, distinct values and texts are exact: equal. Means and standard deviations
    // are sums whose order depends on which task finishes first: equal to rounding.
    assertThat(columnar.columns().stream().map(ColumnarProfileTest::withoutMoments).toList())
        .isEqualTo(rows.columns().stream().map(ColumnarProfileTest::withoutMoments).toList());
    for (int i = 0; i < rows.columns().size(); i++) {
      ColumnProfile a = columnar.columns().get(i);
      ColumnProfile b = rows.columns().get(i);
      if (!Double.isNaN(b.mean())) {
        assertThat(a.mean()).as(a.name()).isCloseTo(b.mean(), within(1e-12 * Math.abs(b.mean()) + 1e-300));
        assertThat(a.stddev()).as(a.name()).isCloseTo(b.stddev(), within(1e-12 * b.stddev() + 1e-300));
      }
    }
    // Arrays.deepEquals compares doubles by their bits: NaN (a missing value) equals NaN.
    assertThat(java.util.Arrays.deepEquals(columnar.sample().rows(), rows.sample().rows())).isTrue();
    assertThat(columnar.sample().weights()).isEqualTo(rows.sample().weights());
    // The checks above compare something: every kind of column was profiled.
    assertThat(columnar.column("label").orElseThrow().topValue()).isNotNull();
    assertThat(columnar.column("grade").orElseThrow().nulls()).isEqualTo(834);
    // Rows by the set of columns null in them: the same on both paths, and as Spark's own
    // group-by of the null flags counts them (reference).
    assertThat(columnar.togetherColumns()).isEqualTo(rows.togetherColumns()).contains("gaps", "grade", "label");
    assertThat(columnar.together().mostCommon(100)).isEqualTo(rows.together().mostCommon(100));
    int gaps = columnar.togetherColumns().indexOf("gaps");
    int grade = columnar.togetherColumns().indexOf("grade");
    Map<Long, Long> expected = new HashMap<>();
    for (Row r : data.groupBy(functions.col("gaps").isNull().as("g"), functions.col("grade").isNull().as("c"))
        .count().collectAsList()) {
      long mask = (r.getBoolean(0) ? 1L << gaps : 0L) | (r.getBoolean(1) ? 1L << grade : 0L);
      if (mask != 0) {
        expected.put(mask, r.getLong(2));
      }
    }
    Map<Long, Long> counted = new HashMap<>();
    columnar.together().mostCommon(100).forEach(e -> counted.put(e.getKey(), e.getValue()));
    assertThat(counted).isEqualTo(expected).hasSize(3);
    assertThat(columnar.column("pallet").orElseThrow().distinct()).isEqualTo(5000);
    assertThat(columnar.column("odd").orElseThrow().nan()).isPositive();
    assertThat(columnar.column("day").orElseThrow().maxText()).isEqualTo("2026-10-28");
  }

  @Test
  void rowsWithOneTwoOrMoreNullColumnsAreCountedAsSparksGroupByCountsThem(SparkSession spark) {
    String dir = tmp.resolve("nulls").toString();
    // Four nullable measured columns whose nulls fall with different periods: rows with none, one,
    // two, three and four of them null, in many combinations.
    spark.sql("SELECT CASE WHEN id % 3 = 0 THEN NULL ELSE id * 0.5 END AS a,"
        + " CASE WHEN id % 5 = 1 THEN NULL ELSE id * 1.5 END AS b,"
        + " CASE WHEN id % 7 < 2 THEN NULL ELSE id - 3.0 END AS c,"
        + " CASE WHEN id % 4 = 2 THEN NULL ELSE 1000.0 - id END AS d FROM range(6000)")
        .repartition(2).write().parquet(dir);
    Dataset<Row> data = spark.read().parquet(dir);
    Map<String, Role> roles = new HashMap<>();
    for (String c : data.columns()) {
      roles.put(c, Role.TREAT);
    }
    TableProfile profile = Profiler.profile(data, Fixtures.settings(), roles, true);
    List<String> names = profile.togetherColumns();
    assertThat(names).containsExactlyInAnyOrder("a", "b", "c", "d");
    // Reference: Spark's own group-by of the null flags.
    Map<Long, Long> expected = new HashMap<>();
    for (Row r : data.groupBy(functions.col("a").isNull(), functions.col("b").isNull(),
        functions.col("c").isNull(), functions.col("d").isNull()).count().collectAsList()) {
      long mask = 0;
      for (int k = 0; k < 4; k++) {
        mask |= r.getBoolean(k) ? 1L << names.indexOf(String.valueOf((char) ('a' + k))) : 0L;
      }
      if (mask != 0) {
        expected.put(mask, r.getLong(4));
      }
    }
    Map<Long, Long> counted = new HashMap<>();
    profile.together().mostCommon(100).forEach(e -> counted.put(e.getKey(), e.getValue()));
    assertThat(counted).isEqualTo(expected);
    assertThat(expected.keySet().stream().mapToInt(Long::bitCount).max().orElse(0)).isEqualTo(4);
    assertThat(expected.keySet().stream().filter(m -> Long.bitCount(m) == 2).count()).isEqualTo(6);
    // The row path counts the same.
    assertThat(Profiler.profile(data, Fixtures.settings(), roles, false).together().mostCommon(100))
        .isEqualTo(profile.together().mostCommon(100));
  }

  private static ColumnProfile withoutMoments(ColumnProfile c) {
    return new ColumnProfile(c.name(), c.type(), c.kind(), c.role(), c.rows(), c.nulls(), c.nan(),
        c.infinite(), c.invalid(), c.usable(), c.min(), c.max(), Double.NaN, Double.NaN, c.q1(),
        c.median(), c.q3(), c.quantileMethod(), c.rankError(), c.mad(), c.distinct(), c.topValue(),
        c.topCount(), c.minText(), c.maxText());
  }

  @Test
  void dictionaryEncodedTextIsTalliedOncePerValue(SparkSession spark) {
    // Reference: Spark's own group-by count of the same column.
    String dir = tmp.resolve("dict").toString();
    spark.sql("SELECT CASE WHEN id % 6 = 0 THEN NULL ELSE 'grade-' || CAST(id % 4 AS STRING) END AS grade"
        + " FROM range(10000)").coalesce(1).write().parquet(dir);
    Dataset<Row> data = spark.read().parquet(dir);
    Map<String, Long> expected = new HashMap<>();
    data.groupBy("grade").count().collectAsList()
        .forEach(r -> expected.put(r.isNullAt(0) ? null : r.getString(0), r.getLong(1)));
    expected.remove(null);
    java.util.List<String> tallied = Batches.of(data).orElseThrow().mapPartitions(batches -> {
      Batches.Tally tally = new Batches.Tally();
      Map<String, Long> counts = new HashMap<>();
      int encoded = 0;
      while (batches.hasNext()) {
        org.apache.spark.sql.vectorized.ColumnarBatch b = batches.next();
        int k = tally.of(b.column(0), org.apache.spark.sql.types.DataTypes.StringType, b.numRows());
        if (k < 0) {
          continue;
        }
        encoded++;
        for (int i = 0; i < k; i++) {
          counts.merge(b.column(0).getUTF8String(tally.firstRow[i]).toString(), (long) tally.count[i], Long::sum);
        }
      }
      java.util.List<String> out = new java.util.ArrayList<>();
      counts.forEach((v, c) -> out.add(v + "=" + c));
      out.add("encoded batches: " + (encoded > 0));
      return out.iterator();
    }).collect();
    java.util.List<String> want = new java.util.ArrayList<>();
    expected.forEach((v, c) -> want.add(v + "=" + c));
    want.add("encoded batches: true");
    assertThat(tallied).containsExactlyInAnyOrderElementsOf(want);
    // Not text: read row by row.
    assertThat(new Batches.Tally().of(
        new org.apache.spark.sql.execution.vectorized.OnHeapColumnVector(4, org.apache.spark.sql.types.DataTypes.IntegerType),
        org.apache.spark.sql.types.DataTypes.IntegerType, 4)).isEqualTo(-1);
  }

  @Test
  void aFilteredTableIsReadAsRows(SparkSession spark) {
    String dir = tmp.resolve("f").toString();
    spark.range(100).selectExpr("CAST(id AS DOUBLE) AS x").write().parquet(dir);
    Dataset<Row> filtered = spark.read().parquet(dir).filter("x > 10");
    assertThat(Batches.of(filtered.select("x"))).as("a filter above the scan").isEmpty();
  }
}
