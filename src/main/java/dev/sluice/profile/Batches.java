package dev.sluice.profile;

import java.util.Optional;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.catalyst.expressions.XXH64;
import org.apache.spark.sql.execution.ColumnarToRowExec;
import org.apache.spark.sql.execution.InputAdapter;
import org.apache.spark.sql.execution.SparkPlan;
import org.apache.spark.sql.execution.WholeStageCodegenExec;
import org.apache.spark.sql.execution.vectorized.WritableColumnVector;
import org.apache.spark.sql.types.BooleanType;
import org.apache.spark.sql.types.ByteType;
import org.apache.spark.sql.types.DataType;
import org.apache.spark.sql.types.DateType;
import org.apache.spark.sql.types.DecimalType;
import org.apache.spark.sql.types.DoubleType;
import org.apache.spark.sql.types.FloatType;
import org.apache.spark.sql.types.IntegerType;
import org.apache.spark.sql.types.LongType;
import org.apache.spark.sql.types.ShortType;
import org.apache.spark.sql.types.StringType;
import org.apache.spark.sql.types.TimestampNTZType;
import org.apache.spark.sql.types.TimestampType;
import org.apache.spark.sql.vectorized.ColumnVector;
import org.apache.spark.sql.vectorized.ColumnarBatch;
import org.apache.spark.unsafe.types.UTF8String;

/**
 * The table as Spark's columnar batches, when its scan can hand them over directly (Parquet and
 * ORC with Spark's vectorized readers), and the few conversions the loops need from them.
 *
 * <p>A pass over batches skips the conversion of every row into Spark's binary row format and the
 * per-row projection, which is most of what a row loop costs beyond reading. The conversions here
 * give exactly what the row path's Catalyst projection gives: DOUBLE as Spark casts it, text as
 * Spark casts it to a string, and Spark's own xxhash64 (seed 42) of each value, so that both paths
 * produce the same profile, bit for bit (a test checks this).
 */
public final class Batches {
  /** Spark's xxhash64 seed. */
  static final long SEED = 42L;

  private Batches() {}

  /**
   * The batches of {@code raw}, when its physical plan is a columnar scan under nothing but the
   * row conversion Spark adds; empty for anything else (a filter, a row-based source).
   */
  public static Optional<JavaRDD<ColumnarBatch>> of(Dataset<Row> raw) {
    SparkPlan plan = raw.queryExecution().executedPlan();
    while (plan instanceof WholeStageCodegenExec || plan instanceof ColumnarToRowExec
        || plan instanceof InputAdapter) {
      if (plan.children().size() != 1) {
        return Optional.empty();
      }
      plan = plan.children().head();
    }
    if (!plan.supportsColumnar() || plan.output().size() != raw.schema().size()) {
      return Optional.empty();
    }
    return Optional.of(plan.executeColumnar().toJavaRDD());
  }

  /** A type whose values can be read as DOUBLE from a vector. */
  public static boolean numeric(DataType t) {
    return t instanceof ByteType || t instanceof ShortType || t instanceof IntegerType
        || t instanceof LongType || t instanceof FloatType || t instanceof DoubleType
        || t instanceof DecimalType;
  }

  /** A type whose values can be hashed and, for text and booleans, read as text. */
  static boolean hashable(DataType t) {
    return t instanceof StringType || t instanceof BooleanType || t instanceof ByteType
        || t instanceof ShortType || t instanceof IntegerType || t instanceof LongType
        || t instanceof DateType || t instanceof TimestampType || t instanceof TimestampNTZType;
  }

  /**
   * The first n values of a numeric vector as DOUBLE, cast as Spark casts them; a null is
   * {@code nulls[i] = true} (its value slot is NaN). Returns the number of nulls.
   */
  public static int doubles(ColumnVector v, DataType t, int n, double[] out, boolean[] nulls) {
    boolean anyNull = v.hasNull();
    // Spark's own vectors (Parquet's reader fills them) read any slot, a null's included: one loop
    // per type copies every value, and nulls are then marked. Other vectors, and decimals, are read
    // only where not null.
    int count = 0;
    if (!(v instanceof WritableColumnVector) || !copyAll(v, t, n, out)) {
      for (int i = 0; i < n; i++) {
        boolean isNull = anyNull && v.isNullAt(i);
        nulls[i] = isNull;
        out[i] = isNull ? Double.NaN : valueAt(v, t, i);
        count += isNull ? 1 : 0;
      }
      return count;
    }
    if (!anyNull) {
      java.util.Arrays.fill(nulls, 0, n, false);
      return 0;
    }
    for (int i = 0; i < n; i++) {
      boolean isNull = v.isNullAt(i);
      nulls[i] = isNull;
      out[i] = isNull ? Double.NaN : out[i];
      count += isNull ? 1 : 0;
    }
    return count;
  }

  /** Every slot's value as DOUBLE, for the primitive types; false (nothing read) for others. */
  private static boolean copyAll(ColumnVector v, DataType t, int n, double[] out) {
    if (t instanceof DoubleType) {
      for (int i = 0; i < n; i++) {
        out[i] = v.getDouble(i);
      }
    } else if (t instanceof IntegerType) {
      for (int i = 0; i < n; i++) {
        out[i] = v.getInt(i);
      }
    } else if (t instanceof LongType) {
      for (int i = 0; i < n; i++) {
        out[i] = v.getLong(i);
      }
    } else if (t instanceof FloatType) {
      for (int i = 0; i < n; i++) {
        out[i] = v.getFloat(i);
      }
    } else if (t instanceof ShortType) {
      for (int i = 0; i < n; i++) {
        out[i] = v.getShort(i);
      }
    } else if (t instanceof ByteType) {
      for (int i = 0; i < n; i++) {
        out[i] = v.getByte(i);
      }
    } else {
      return false;
    }
    return true;
  }

  private static double valueAt(ColumnVector v, DataType t, int i) {
    if (t instanceof DoubleType) {
      return v.getDouble(i);
    }
    if (t instanceof IntegerType) {
      return v.getInt(i);
    }
    if (t instanceof LongType) {
      return v.getLong(i);
    }
    if (t instanceof FloatType) {
      return v.getFloat(i);
    }
    if (t instanceof ShortType) {
      return v.getShort(i);
    }
    if (t instanceof ByteType) {
      return v.getByte(i);
    }
    DecimalType d = (DecimalType) t;
    // Spark's cast of a decimal to DOUBLE is Decimal.toDouble.
    return v.getDecimal(i, d.precision(), d.scale()).toDouble();
  }

  /** Spark's xxhash64 of a non-null value of a {@link #hashable} type. */
  static long hash(ColumnVector v, DataType t, int i) {
    if (t instanceof StringType) {
      return XXH64.hashUTF8String(v.getUTF8String(i), SEED);
    }
    if (t instanceof BooleanType) {
      return XXH64.hashInt(v.getBoolean(i) ? 1 : 0, SEED);
    }
    if (t instanceof LongType || t instanceof TimestampType || t instanceof TimestampNTZType) {
      return XXH64.hashLong(v.getLong(i), SEED);
    }
    if (t instanceof ShortType) {
      return XXH64.hashInt(v.getShort(i), SEED);
    }
    if (t instanceof ByteType) {
      return XXH64.hashInt(v.getByte(i), SEED);
    }
    return XXH64.hashInt(v.getInt(i), SEED); // int, date
  }

  private static final UTF8String TRUE = UTF8String.fromString("true");
  private static final UTF8String FALSE = UTF8String.fromString("false");

  /** A non-null text or boolean value as Spark casts it to a string (a view: copy to keep it). */
  static UTF8String text(ColumnVector v, DataType t, int i) {
    if (t instanceof BooleanType) {
      return v.getBoolean(i) ? TRUE : FALSE;
    }
    return v.getUTF8String(i);
  }

  /**
   * The distinct values of a text vector that Spark's Parquet reader left dictionary-encoded, so
   * that a batch hashes each of them once rather than every row: within one batch the ids refer
   * to one dictionary (a batch never spans column chunks, and a batch whose pages change encoding
   * comes decoded). Reusable from batch to batch; not thread-safe.
   */
  static final class Tally {
    /** Row count of each dictionary id in the current batch (zero again after {@link #of}). */
    private int[] countById = new int[64];
    /** The first row of each distinct value, in order of first appearance. */
    int[] firstRow = new int[0];
    /** The number of non-null rows of each distinct value. */
    int[] count = new int[0];

    /**
     * Tallies the first n rows of {@code v}: returns the number of distinct non-null values, with
     * {@link #firstRow} and {@link #count} filled, or -1 when {@code v} is not dictionary-encoded
     * text (then read it row by row).
     */
    int of(ColumnVector v, DataType t, int n) {
      if (!(t instanceof StringType && v instanceof WritableColumnVector w && w.hasDictionary())) {
        return -1;
      }
      if (firstRow.length < n) {
        firstRow = new int[n];
        count = new int[n];
      }
      WritableColumnVector ids = w.getDictionaryIds();
      boolean anyNull = w.hasNull();
      int distinct = 0;
      for (int r = 0; r < n; r++) {
        if (anyNull && w.isNullAt(r)) {
          continue;
        }
        int id = ids.getDictId(r);
        if (id >= countById.length) {
          countById = java.util.Arrays.copyOf(countById, Math.max(id + 1, 2 * countById.length));
        }
        if (countById[id]++ == 0) {
          firstRow[distinct++] = r;
        }
      }
      for (int k = 0; k < distinct; k++) {
        int id = ids.getDictId(firstRow[k]);
        count[k] = countById[id];
        countById[id] = 0;
      }
      return distinct;
    }
  }
}
