package dev.sluice.testing;

import dev.sluice.config.Settings;
import dev.sluice.config.SettingsLoader;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Optional;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.RowFactory;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.StructField;
import org.apache.spark.sql.types.StructType;

/** Small literal tables and settings for tests. */
public final class Fixtures {
  private Fixtures() {}

  /** A one-column DOUBLE table; a null element is a null value. */
  public static Dataset<Row> doubles(SparkSession spark, String name, Double... values) {
    StructType schema = DataTypes.createStructType(
        List.of(DataTypes.createStructField(name, DataTypes.DoubleType, true)));
    List<Row> rows = new ArrayList<>();
    for (Double v : values) {
      rows.add(RowFactory.create(v));
    }
    return spark.createDataFrame(rows, schema);
  }

  public static Dataset<Row> doubles(SparkSession spark, String name, double[] values) {
    return doubles(spark, name, Arrays.stream(values).boxed().toArray(Double[]::new));
  }

  /** A table of DOUBLE columns from rows of values (columns in {@code names} order). */
  public static Dataset<Row> doubleTable(SparkSession spark, List<String> names, double[][] rows) {
    List<StructField> fields = new ArrayList<>();
    names.forEach(n -> fields.add(DataTypes.createStructField(n, DataTypes.DoubleType, true)));
    List<Row> data = new ArrayList<>();
    for (double[] r : rows) {
      data.add(RowFactory.create(Arrays.stream(r).boxed().toArray()));
    }
    return spark.createDataFrame(data, DataTypes.createStructType(fields));
  }

  /** reference.conf with the given KEY=VALUE overrides (keys without the sluice. prefix). */
  /** The same rows, as multisets: none of either is missing from the other (Spark's exceptAll). */
  public static void assertSameRows(Dataset<Row> a, Dataset<Row> b) {
    org.assertj.core.api.Assertions.assertThat(a.exceptAll(b).count()).as("rows only in the first").isZero();
    org.assertj.core.api.Assertions.assertThat(b.exceptAll(a).count()).as("rows only in the second").isZero();
  }

  public static Settings settings(String... overrides) {
    return SettingsLoader.load(Optional.empty(), List.of(overrides));
  }

  /** Column {@code name} of a small collected result, row order as given. */
  public static List<Object> column(List<Row> rows, String name) {
    List<Object> out = new ArrayList<>();
    for (Row r : rows) {
      out.add(r.get(r.fieldIndex(name)));
    }
    return out;
  }
}
