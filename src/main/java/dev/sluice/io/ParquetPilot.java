package dev.sluice.io;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.util.ArrayList;
import java.util.List;
import java.util.Optional;
import org.apache.hadoop.fs.Path;
import org.apache.parquet.HadoopReadOptions;
import org.apache.parquet.ParquetReadOptions;
import org.apache.parquet.column.ColumnDescriptor;
import org.apache.parquet.column.ColumnReader;
import org.apache.parquet.column.impl.ColumnReadStoreImpl;
import org.apache.parquet.column.page.PageReadStore;
import org.apache.parquet.hadoop.ParquetFileReader;
import org.apache.parquet.hadoop.metadata.BlockMetaData;
import org.apache.parquet.hadoop.metadata.ParquetMetadata;
import org.apache.parquet.hadoop.util.HadoopInputFile;
import org.apache.parquet.internal.filter2.columnindex.ColumnIndexStore;
import org.apache.parquet.internal.filter2.columnindex.RowRanges;
import org.apache.parquet.io.api.Converter;
import org.apache.parquet.io.api.GroupConverter;
import org.apache.parquet.io.api.PrimitiveConverter;
import org.apache.parquet.schema.LogicalTypeAnnotation;
import org.apache.parquet.schema.MessageType;
import org.apache.parquet.schema.PrimitiveType;
import org.apache.parquet.schema.PrimitiveType.PrimitiveTypeName;
import org.apache.parquet.schema.Type;
import org.apache.spark.sql.types.ByteType;
import org.apache.spark.sql.types.DataType;
import org.apache.spark.sql.types.DoubleType;
import org.apache.spark.sql.types.FloatType;
import org.apache.spark.sql.types.IntegerType;
import org.apache.spark.sql.types.LongType;
import org.apache.spark.sql.types.ShortType;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The pilot sample's values read by the driver straight from a plain Parquet read's files: the
 * first rows of a few row groups spread over the table, each column read only as far as the pages
 * that hold those rows (found with the file's offset index). Spark's reader reads a row group's
 * column chunks whole, about 130 MB for a few thousand rows wanted from each.
 *
 * <p>Only for columns stored as Parquet DOUBLE, FLOAT or signed INT32 / INT64 and read by Spark as
 * the matching type, whose values cast to DOUBLE are the stored values widened: the same values
 * Spark's own pilot gives for the same rows. Anything else (another type, a column missing from a
 * file, row groups too small to give the rows wanted) returns empty and Spark takes the pilot.
 */
public final class ParquetPilot {
  private static final Logger LOG = LoggerFactory.getLogger(ParquetPilot.class);
  /** Row groups read at once. */
  private static final int READERS = 16;

  private ParquetPilot() {}

  /** One row group's first {@code rows} rows to read, with the columns' schema in its file. */
  private record Part(int file, int group, int rows, long groupRows, MessageType schema) {}

  /**
   * The first rows of {@code spread} row groups spread evenly over {@code files} (by path, then
   * position in the file), about {@code wanted / spread} from each: per column, in
   * {@code columns} order, the values as DOUBLE, NaN where null.
   *
   * @param types Spark's type for each column
   */
  public static Optional<double[][]> read(ParquetFooters.Files files, List<String> columns,
      List<DataType> types, int wanted, int spread) {
    List<Part> groups = new ArrayList<>();
    long total = 0;
    for (int f = 0; f < files.footers().size(); f++) {
      List<BlockMetaData> blocks = files.footers().get(f).getBlocks();
      for (int b = 0; b < blocks.size(); b++) {
        long n = blocks.get(b).getRowCount();
        if (n > 0) {
          groups.add(new Part(f, b, 0, n, null));
          total += n;
        }
      }
    }
    if (groups.isEmpty() || columns.isEmpty() || wanted <= 0 || spread <= 0) {
      return Optional.empty();
    }
    int k = Math.min(spread, groups.size());
    int each = (wanted + k - 1) / k;
    List<Part> parts = new ArrayList<>();
    long taken = 0;
    for (int i = 0; i < k; i++) {
      Part g = groups.get(k == 1 ? 0 : (int) Math.round((double) i * (groups.size() - 1) / (k - 1)));
      Optional<MessageType> schema = projection(files.footers().get(g.file()), columns, types);
      if (schema.isEmpty()) {
        return Optional.empty();
      }
      int rows = (int) Math.min(each, g.groupRows());
      parts.add(new Part(g.file(), g.group(), rows, g.groupRows(), schema.get()));
      taken += rows;
    }
    if (taken < Math.min(wanted, total)) {
      // Small row groups: Spark's pilot reads on through a partition's files instead.
      return Optional.empty();
    }
    try {
      List<double[][]> read = SideBySide.map(parts, READERS, "sluice-pilot", "Cannot read the pilot rows",
          p -> readPart(files, p, columns));
      double[][] out = new double[columns.size()][(int) taken];
      int at = 0;
      for (double[][] block : read) {
        for (int j = 0; j < out.length; j++) {
          System.arraycopy(block[j], 0, out[j], at, block[j].length);
        }
        at += block[0].length;
      }
      return Optional.of(out);
    } catch (RuntimeException e) {
      // Only a shortcut: Spark takes the pilot instead, and reports a file it cannot read itself.
      LOG.info("Cannot read the pilot rows from the Parquet files ({}); Spark reads them", e.getMessage());
      return Optional.empty();
    }
  }

  /**
   * The file's schema for {@code columns}: top-level, not repeated, with a physical type that
   * Spark's type for the column reads as is; empty when a column is not.
   */
  static Optional<MessageType> projection(ParquetMetadata footer, List<String> columns, List<DataType> types) {
    MessageType schema = footer.getFileMetaData().getSchema();
    List<Type> fields = new ArrayList<>();
    for (int j = 0; j < columns.size(); j++) {
      String name = columns.get(j);
      if (!schema.containsField(name)) {
        return Optional.empty();
      }
      Type t = schema.getType(name);
      if (!t.isPrimitive() || t.isRepetition(Type.Repetition.REPEATED)
          || !matches(t.asPrimitiveType(), types.get(j))) {
        return Optional.empty();
      }
      fields.add(t);
    }
    return Optional.of(new MessageType("pilot", fields));
  }

  private static boolean matches(PrimitiveType t, DataType spark) {
    LogicalTypeAnnotation a = t.getLogicalTypeAnnotation();
    boolean signedInt = a == null
        || a instanceof LogicalTypeAnnotation.IntLogicalTypeAnnotation i && i.isSigned();
    return switch (t.getPrimitiveTypeName()) {
      case DOUBLE -> a == null && spark instanceof DoubleType;
      case FLOAT -> a == null && spark instanceof FloatType;
      case INT32 -> signedInt
          && (spark instanceof IntegerType || spark instanceof ShortType || spark instanceof ByteType);
      case INT64 -> signedInt && spark instanceof LongType;
      default -> false;
    };
  }

  /** One part's values: the pages of its row group that hold its first rows, decoded. */
  private static double[][] readPart(ParquetFooters.Files files, Part part, List<String> columns) {
    Path path = files.paths().get(part.file());
    ParquetMetadata footer = files.footers().get(part.file());
    MessageType schema = part.schema();
    try {
      HadoopInputFile file = HadoopInputFile.fromPath(path, files.hadoop());
      // Plain reads: with vectored reads (Parquet's default), pass 1's time after this pilot varied
      // far more from run to run in a side-by-side measurement (docs/benchmarks.md).
      ParquetReadOptions options = HadoopReadOptions.builder(files.hadoop(), path)
          .withUseHadoopVectoredIo(false).build();
      try (ParquetFileReader reader = ParquetFileReader.open(file, footer, options, file.newStream())) {
        reader.setRequestedSchema(schema);
        PageReadStore pages = part.rows() == part.groupRows() ? reader.readRowGroup(part.group())
            : firstPages(reader, part);
        ColumnReadStoreImpl store = new ColumnReadStoreImpl(pages, new Ignored(schema.getFieldCount()),
            schema, footer.getFileMetaData().getCreatedBy());
        double[][] out = new double[columns.size()][part.rows()];
        for (int j = 0; j < out.length; j++) {
          ColumnDescriptor d = schema.getColumnDescription(new String[] {columns.get(j)});
          values(store.getColumnReader(d), d, out[j]);
        }
        return out;
      }
    } catch (IOException e) {
      throw new UncheckedIOException("Cannot read the pilot rows of " + path, e);
    }
  }

  /** The pages holding the row group's first rows; the whole group without an offset index. */
  private static PageReadStore firstPages(ParquetFileReader reader, Part part) throws IOException {
    try {
      return reader.readFilteredRowGroup(part.group(), RowRanges.createSingle(part.rows()));
    } catch (ColumnIndexStore.MissingOffsetIndexException e) {
      return reader.readRowGroup(part.group());
    }
  }

  /** The column's first {@code out.length} values, widened to DOUBLE; NaN where null. */
  private static void values(ColumnReader c, ColumnDescriptor d, double[] out) {
    int present = d.getMaxDefinitionLevel();
    PrimitiveTypeName type = d.getPrimitiveType().getPrimitiveTypeName();
    for (int r = 0; r < out.length; r++) {
      if (c.getCurrentDefinitionLevel() < present) {
        out[r] = Double.NaN;
      } else {
        out[r] = switch (type) {
          case DOUBLE -> c.getDouble();
          case FLOAT -> c.getFloat();
          case INT32 -> c.getInteger();
          case INT64 -> c.getLong();
          default -> throw new IllegalStateException("Not a pilot column type: " + type);
        };
      }
      c.consume();
    }
  }

  /** Column readers ask the record's converters for their columns; the values are read directly. */
  private static final class Ignored extends GroupConverter {
    private final PrimitiveConverter field = new PrimitiveConverter() {};
    private final int fields;

    Ignored(int fields) {
      this.fields = fields;
    }

    @Override
    public Converter getConverter(int fieldIndex) {
      if (fieldIndex < 0 || fieldIndex >= fields) {
        throw new IllegalArgumentException("No pilot column " + fieldIndex);
      }
      return field;
    }

    @Override
    public void start() {}

    @Override
    public void end() {}
  }
}
