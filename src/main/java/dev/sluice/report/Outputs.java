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
import org.apache.hadoop.conf.Configuration;
import org.apache.hadoop.fs.FileSystem;
import org.apache.hadoop.fs.Path;
import org.apache.parquet.example.data.Group;
import org.apache.parquet.example.data.simple.SimpleGroupFactory;
import org.apache.parquet.hadoop.ParquetWriter;
import org.apache.parquet.hadoop.example.ExampleParquetWriter;
import org.apache.parquet.hadoop.metadata.CompressionCodecName;
import org.apache.parquet.hadoop.util.HadoopOutputFile;
import org.apache.parquet.schema.LogicalTypeAnnotation;
import org.apache.parquet.schema.MessageType;
import org.apache.parquet.schema.PrimitiveType.PrimitiveTypeName;
import org.apache.parquet.schema.Types;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.RowFactory;
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

  /**
   * Writes {@code rows} as a one-file Parquet table at {@code dir} (replacing it), with an empty
   * {@code _SUCCESS} marker once the file is complete. The tables are a row per column or pair, so
   * the driver writes them itself with Parquet's own writer rather than through a Spark job (whose
   * planning and scheduling took longer than the writing). The file carries Spark's schema, so
   * Spark reads back the same types and nullability as from its own writer.
   */
  public static void parquet(SparkSession spark, String dir, Map<String, Class<?>> columns,
      List<Map<String, Object>> rows) {
    Configuration conf = spark.sparkContext().hadoopConfiguration();
    Path path = new Path(dir);
    try {
      FileSystem fs = path.getFileSystem(conf);
      if (fs.exists(path) && !fs.delete(path, true)) {
        throw new IOException("Cannot replace " + dir);
      }
      fs.mkdirs(path);
      MessageType schema = parquetSchema(columns);
      SimpleGroupFactory groups = new SimpleGroupFactory(schema);
      try (ParquetWriter<Group> writer = ExampleParquetWriter
          .builder(HadoopOutputFile.fromPath(new Path(path, "part-00000.snappy.parquet"), conf))
          .withConf(conf)
          .withType(schema)
          .withCompressionCodec(CompressionCodecName.SNAPPY)
          .withExtraMetaData(Map.of(SPARK_SCHEMA_KEY, schemaOf(columns).json()))
          .build()) {
        for (Map<String, Object> r : rows) {
          Group g = groups.newGroup();
          int i = 0;
          for (Map.Entry<String, Class<?>> c : columns.entrySet()) {
            Object v = r.get(c.getKey());
            if (v != null) {
              append(g, i, c.getValue(), v);
            }
            i++;
          }
          writer.write(g);
        }
      }
      fs.create(new Path(path, "_SUCCESS"), true).close();
    } catch (IOException e) {
      throw new UncheckedIOException("Cannot write " + dir, e);
    }
  }

  /** The key under which Spark's own Parquet writer stores a file's Spark schema. */
  private static final String SPARK_SCHEMA_KEY = "org.apache.spark.sql.parquet.row.metadata";

  static MessageType parquetSchema(Map<String, Class<?>> columns) {
    Types.MessageTypeBuilder b = Types.buildMessage();
    columns.forEach((name, type) -> {
      if (type == Long.class) {
        b.optional(PrimitiveTypeName.INT64).named(name);
      } else if (type == Double.class) {
        b.optional(PrimitiveTypeName.DOUBLE).named(name);
      } else if (type == Boolean.class) {
        b.optional(PrimitiveTypeName.BOOLEAN).named(name);
      } else {
        b.optional(PrimitiveTypeName.BINARY).as(LogicalTypeAnnotation.stringType()).named(name);
      }
    });
    return b.named("spark_schema");
  }

  private static void append(Group g, int field, Class<?> type, Object v) {
    if (type == Long.class) {
      g.append(g.getType().getFieldName(field), ((Number) v).longValue());
    } else if (type == Double.class) {
      g.append(g.getType().getFieldName(field), ((Number) v).doubleValue());
    } else if (type == Boolean.class) {
      g.append(g.getType().getFieldName(field), (Boolean) v);
    } else {
      g.append(g.getType().getFieldName(field), String.valueOf(v));
    }
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
