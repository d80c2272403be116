package dev.sluice.report;

import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.SerializationFeature;
import com.fasterxml.jackson.databind.MapperFeature;
import com.fasterxml.jackson.databind.json.JsonMapper;
import com.univocity.parsers.csv.CsvWriter;
import com.univocity.parsers.csv.CsvWriterSettings;
import java.io.IOException;
import java.io.OutputStream;
import java.io.OutputStreamWriter;
import java.io.UncheckedIOException;
import java.io.Writer;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import org.apache.hadoop.fs.FileSystem;
import org.apache.hadoop.fs.Path;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.RowFactory;
import org.apache.spark.sql.SaveMode;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.types.DataType;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.StructField;
import org.apache.spark.sql.types.StructType;

/**
 * Writes the small outputs (tables of a row per column, JSON records) to the output directory on
 * any Hadoop filesystem.
 */
public final class Outputs {
  /** Sorted keys and indentation: a plan file reads well in a diff. */
  public static final ObjectMapper JSON = JsonMapper.builder()
      .enable(SerializationFeature.INDENT_OUTPUT)
      .enable(SerializationFeature.ORDER_MAP_ENTRIES_BY_KEYS)
      .enable(MapperFeature.SORT_PROPERTIES_ALPHABETICALLY)
      .build();

  private Outputs() {}

  /** Writes {@code rows} as a one-file Parquet table at {@code dir} (replacing it). */
  public static void parquet(SparkSession spark, String dir, Map<String, Class<?>> columns,
      List<Map<String, Object>> rows) {
    dataset(spark, columns, rows).coalesce(1).write().mode(SaveMode.Overwrite).parquet(dir);
  }

  /** {@code rows} as a small DataFrame with the given columns, in their order. */
  public static Dataset<Row> dataset(SparkSession spark, Map<String, Class<?>> columns,
      List<Map<String, Object>> rows) {
    List<Row> data = new ArrayList<>();
    for (Map<String, Object> r : rows) {
      data.add(RowFactory.create(columns.keySet().stream().map(r::get).toArray()));
    }
    return spark.createDataFrame(data, schemaOf(columns));
  }

  static StructType schemaOf(Map<String, Class<?>> columns) {
    List<StructField> fields = new ArrayList<>();
    columns.forEach((name, type) -> fields.add(DataTypes.createStructField(name, sqlType(type), true)));
    return DataTypes.createStructType(fields);
  }

  private static DataType sqlType(Class<?> type) {
    if (type == Long.class) {
      return DataTypes.LongType;
    }
    if (type == Double.class) {
      return DataTypes.DoubleType;
    }
    if (type == Boolean.class) {
      return DataTypes.BooleanType;
    }
    return DataTypes.StringType;
  }

  /** Writes {@code rows} as RFC 4180 CSV with a header; an empty field is a null value. */
  public static void csv(SparkSession spark, String file, Map<String, Class<?>> columns,
      List<Map<String, Object>> rows) {
    CsvWriterSettings settings = new CsvWriterSettings();
    settings.setQuoteEscapingEnabled(true);
    // Keep text as it is: a column named " padded " must stay that name.
    settings.setIgnoreLeadingWhitespaces(false);
    settings.setIgnoreTrailingWhitespaces(false);
    settings.setHeaders(columns.keySet().toArray(new String[0]));
    try (OutputStream os = create(spark, file);
        Writer w = new OutputStreamWriter(os, StandardCharsets.UTF_8)) {
      CsvWriter csv = new CsvWriter(w, settings);
      csv.writeHeaders();
      for (Map<String, Object> r : rows) {
        csv.writeRow(columns.keySet().stream().map(k -> text(r.get(k))).toArray());
      }
      csv.flush();
    } catch (IOException e) {
      throw new UncheckedIOException("Cannot write " + file, e);
    }
  }

  private static Object text(Object v) {
    return v == null ? null : String.valueOf(v);
  }

  /** Writes {@code value} as indented JSON with sorted keys. */
  public static void json(SparkSession spark, String file, Object value) {
    try (OutputStream os = create(spark, file)) {
      JSON.writeValue(os, value);
    } catch (IOException e) {
      throw new UncheckedIOException("Cannot write " + file, e);
    }
  }

  /** Writes {@code text} as UTF-8 to {@code file} (replacing it). */
  public static void text(SparkSession spark, String file, String text) {
    try (OutputStream os = create(spark, file)) {
      os.write(text.getBytes(java.nio.charset.StandardCharsets.UTF_8));
    } catch (IOException e) {
      throw new UncheckedIOException("Cannot write " + file, e);
    }
  }

  private static OutputStream create(SparkSession spark, String file) throws IOException {
    Path p = new Path(file);
    FileSystem fs = p.getFileSystem(spark.sparkContext().hadoopConfiguration());
    return fs.create(p, true);
  }
}
