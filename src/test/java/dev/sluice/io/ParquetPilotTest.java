package dev.sluice.io;

import static org.apache.spark.sql.functions.col;
import static org.assertj.core.api.Assertions.assertThat;

import dev.sluice.testing.SharedSpark;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import org.apache.parquet.hadoop.metadata.BlockMetaData;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.types.DataType;
import org.apache.spark.sql.types.StructField;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.ExtendWith;
import org.junit.jupiter.api.io.TempDir;

/**
 * The pilot rows read from the first pages of a few row groups, against Spark's own reading of the
 * same rows of the same files, each column cast to DOUBLE as Spark's pilot casts it (the
 * reference). The rows are found by their position in their file (Spark's
 * {@code _metadata.row_index}), from the row groups' sizes in the footers.
 */
@ExtendWith(SharedSpark.class)
class ParquetPilotTest {
  @TempDir Path tmp;

  private static final List<String> NUMERIC = List.of("a.b c", "f", "i", "l", "s", "b");

  /**
   * Two files of several row groups each, with pages of a few hundred values: a pilot that takes
   * fewer rows than a group holds reads only its first pages. Nulls in two columns.
   */
  private Dataset<Row> table(SparkSession spark) {
    String dir = tmp.resolve("table").toString();
    spark.sql("SELECT CASE WHEN id % 7 = 0 THEN NULL ELSE CAST(id AS DOUBLE) * 0.5 - 9000 END AS `a.b c`,"
            + " CAST(id / 3 AS FLOAT) AS f,"
            + " CASE WHEN id % 11 = 3 THEN NULL ELSE CAST(id % 1000 - 500 AS INT) END AS i,"
            + " id * 1000003 AS l, CAST(id % 300 AS SHORT) AS s, CAST(id % 100 - 50 AS BYTE) AS b,"
            + " CAST(id AS STRING) AS t, CAST(id / 8 AS DECIMAL(10, 2)) AS d"
            + " FROM range(0, 40000, 1, 2)")
        .write().option("parquet.block.size", 65536).option("parquet.page.size", 2048)
        .parquet(dir);
    return spark.read().parquet(dir);
  }

  @Test
  void readsTheFirstRowsOfTheFirstMiddleAndLastRowGroupsAsSparkReadsThem(SparkSession spark) {
    Dataset<Row> data = table(spark);
    ParquetFooters.Files files = ParquetFooters.read(data).orElseThrow();
    // Every row group of both files, in path order: (file, first row in the file, rows).
    List<long[]> groups = new ArrayList<>();
    for (int f = 0; f < files.footers().size(); f++) {
      long start = 0;
      for (BlockMetaData b : files.footers().get(f).getBlocks()) {
        groups.add(new long[] {f, start, b.getRowCount()});
        start += b.getRowCount();
      }
    }
    assertThat(groups.size()).as("row groups").isGreaterThan(6);
    long smallest = groups.stream().mapToLong(g -> g[2]).min().orElseThrow();
    int each = (int) (smallest / 2);
    double[][] pilot = ParquetPilot.read(files, NUMERIC, types(data, NUMERIC), 3 * each, 3).orElseThrow();

    List<long[]> chosen = List.of(groups.get(0), groups.get((int) Math.round((groups.size() - 1) / 2.0)),
        groups.get(groups.size() - 1));
    double[][] expected = new double[NUMERIC.size()][0];
    for (long[] g : chosen) {
      double[][] rows = sparkRows(spark, files.paths().get((int) g[0]).toString(), g[1], each);
      for (int j = 0; j < expected.length; j++) {
        double[] joined = Arrays.copyOf(expected[j], expected[j].length + each);
        System.arraycopy(rows[j], 0, joined, expected[j].length, each);
        expected[j] = joined;
      }
    }
    for (int j = 0; j < NUMERIC.size(); j++) {
      // Equal bit for bit, NaN for a null.
      assertThat(pilot[j]).as(NUMERIC.get(j)).isEqualTo(expected[j]);
    }
    assertThat(pilot[0]).contains(Double.NaN);
  }

  @Test
  void leavesToSparkWhatItCannotReadAsSparkDoes(SparkSession spark) {
    Dataset<Row> data = table(spark);
    ParquetFooters.Files files = ParquetFooters.read(data).orElseThrow();
    // Decimal and text columns are cast by Spark; their stored form is not the value.
    assertThat(ParquetPilot.read(files, List.of("f", "d"), types(data, List.of("f", "d")), 1000, 2)).isEmpty();
    assertThat(ParquetPilot.read(files, List.of("t"), types(data, List.of("t")), 1000, 2)).isEmpty();
    // A Spark type other than the stored one (INT64 read as DOUBLE).
    assertThat(ParquetPilot.read(files, List.of("l"), types(data, List.of("a.b c")), 1000, 2)).isEmpty();
    // Not in the files.
    assertThat(ParquetPilot.read(files, List.of("nowhere"), types(data, List.of("f")), 1000, 2)).isEmpty();
    // Two row groups cannot give all 40,000 rows: Spark's pilot reads on through the partitions.
    assertThat(ParquetPilot.read(files, List.of("f"), types(data, List.of("f")), 40_000, 2)).isEmpty();
    assertThat(ParquetPilot.read(files, List.of("f"), types(data, List.of("f")), 200, 2)).isPresent();
  }

  private static List<DataType> types(Dataset<Row> data, List<String> names) {
    List<DataType> out = new ArrayList<>();
    for (String n : names) {
      StructField f = data.schema().apply(n);
      out.add(f.dataType());
    }
    return out;
  }

  /** Spark's reading of rows [start, start + n) of one file, each column cast to DOUBLE. */
  private static double[][] sparkRows(SparkSession spark, String file, long start, int n) {
    Dataset<Row> d = spark.read().parquet(file);
    Column at = col("_metadata.row_index");
    List<Column> cols = new ArrayList<>();
    for (String c : NUMERIC) {
      cols.add(col("`" + c + "`").cast("double"));
    }
    List<Row> rows = d.where(at.geq(start).and(at.lt(start + n))).orderBy(at)
        .select(cols.toArray(new Column[0])).collectAsList();
    assertThat(rows).hasSize(n);
    double[][] out = new double[NUMERIC.size()][n];
    for (int r = 0; r < n; r++) {
      for (int j = 0; j < NUMERIC.size(); j++) {
        out[j][r] = rows.get(r).isNullAt(j) ? Double.NaN : rows.get(r).getDouble(j);
      }
    }
    return out;
  }
}
