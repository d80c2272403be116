package dev.sluice.profile;

import java.io.Serializable;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Iterator;
import java.util.List;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.catalyst.InternalRow;
import org.apache.spark.sql.vectorized.ColumnarBatch;

/**
 * Runs a plain-Java accumulator over every row of a projection of a table, in one Spark job: each
 * partition fills its own accumulator, and the accumulators are merged in a tree on the way to the
 * driver, as MLlib's own summarizers do.
 *
 * <p>Why not a Spark aggregate: the statistics here (exact order statistics, co-moments of many
 * columns, a canonical row sample) are vector accumulators that Spark's aggregate framework can
 * only run through its object-based path, where every value is boxed. The projection below the
 * loop is still Catalyst: columns are cast and pruned by Spark and read from its binary rows.
 */
public final class RowScan {
  /**
   * Partitions above which accumulators are merged in two levels: below, the driver merges them
   * all itself, which saves a shuffle of every accumulator.
   */
  static final int TREE_FROM = 64;

  private RowScan() {}

  /** A per-partition accumulator: filled one row at a time, then merged with others. */
  public interface Accumulator<A extends Accumulator<A>> extends Serializable {
    /** Adds one row of the projection. The row object may be reused by Spark after the call. */
    void add(InternalRow row);

    /** Folds another partition's accumulator into this one and returns this. */
    A merge(A other);
  }

  /** Makes an empty accumulator; sent to every task. */
  public interface Empty<A> extends Serializable {
    A make();
  }

  /** The rows of a projection as Spark's own binary rows, for a loop in Java. */
  public static JavaRDD<InternalRow> rows(Dataset<Row> data, List<Column> projection) {
    Dataset<Row> projected = projection.isEmpty()
        ? data.select(org.apache.spark.sql.functions.lit(true))
        : data.select(projection.toArray(new Column[0]));
    return projected.queryExecution().toRdd().toJavaRDD();
  }

  /** One pass: every row of {@code rows} added to accumulators made by {@code empty}, merged. */
  public static <A extends Accumulator<A>> A fold(JavaRDD<InternalRow> rows, Empty<A> empty) {
    return merged(parts(rows, empty), empty);
  }

  /** Each partition's accumulator over its rows, not merged (nothing runs until it is used). */
  static <A extends Accumulator<A>> JavaRDD<A> parts(JavaRDD<InternalRow> rows, Empty<A> empty) {
    return rows.mapPartitions((Iterator<InternalRow> it) -> {
      A acc = empty.make();
      while (it.hasNext()) {
        acc.add(it.next());
      }
      return List.of(acc).iterator();
    });
  }

  /** Adds one columnar batch to an accumulator; sent to every task. */
  public interface BatchAdder<A> extends Serializable {
    void add(A acc, ColumnarBatch batch);
  }

  /**
   * One pass over columnar batches (see {@link Batches}): every batch of {@code batches} added to
   * accumulators made by {@code empty}, merged as {@link #fold} merges them.
   */
  public static <A extends Accumulator<A>> A foldBatches(
      JavaRDD<ColumnarBatch> batches, Empty<A> empty, BatchAdder<A> adder) {
    return merged(batchParts(batches, empty, adder), empty);
  }

  /** Each partition's accumulator over its batches, not merged. */
  static <A extends Accumulator<A>> JavaRDD<A> batchParts(
      JavaRDD<ColumnarBatch> batches, Empty<A> empty, BatchAdder<A> adder) {
    return batches.mapPartitions((Iterator<ColumnarBatch> it) -> {
      A acc = empty.make();
      while (it.hasNext()) {
        adder.add(acc, it.next());
      }
      return List.of(acc).iterator();
    });
  }

  /** The partitions' accumulators merged in a tree on the way to the driver (empty: none). */
  static <A extends Accumulator<A>> A merged(JavaRDD<A> parts, Empty<A> empty) {
    if (parts.getNumPartitions() == 0) {
      return empty.make();
    }
    return parts.treeReduce((a, b) -> a.merge(b), depth(parts));
  }

  /** The depth of a tree merge: a tree only from {@link #TREE_FROM} partitions on. */
  static int depth(JavaRDD<?> rows) {
    return rows.getNumPartitions() > TREE_FROM ? 2 : 1;
  }

  /**
   * A pilot sample: the first rows of up to {@code parts} partitions spread evenly over the table,
   * about {@code wanted} rows in all, as doubles (NaN for null), one array per column of the
   * projection. Reads only the start of the partitions it samples.
   */
  public static double[][] pilot(JavaRDD<InternalRow> rows, int columns, int wanted, int parts) {
    return pilot(rows, columns, -1, wanted, parts).values();
  }

  /**
   * A pilot's values, one array per column, and per row the LONG at the projection's position
   * {@code keyAt} (empty when there is none).
   */
  public record Pilot(double[][] values, long[] keys) {}

  /**
   * As {@link #pilot(JavaRDD, int, int, int)}, also reading each row's LONG at {@code keyAt} (a
   * group key's hash; -1: none).
   */
  public static Pilot pilot(JavaRDD<InternalRow> rows, int columns, int keyAt, int wanted, int parts) {
    int total = rows.getNumPartitions();
    double[][] out = new double[columns][];
    if (total == 0 || wanted <= 0) {
      for (int j = 0; j < columns; j++) {
        out[j] = new double[0];
      }
      return new Pilot(out, new long[0]);
    }
    int k = Math.min(parts, total);
    int[] ids = new int[k];
    for (int i = 0; i < k; i++) {
      ids[i] = k == 1 ? 0 : (int) Math.round((double) i * (total - 1) / (k - 1));
    }
    int each = (wanted + k - 1) / k;
    // Column-major blocks: a few long arrays serialize in bulk, where a small array per row would
    // cost the task and the driver an object each.
    List<Object[]>[] taken = rows.mapPartitions((Iterator<InternalRow> it) -> {
      double[][] got = new double[columns][each];
      long[] keys = new long[keyAt >= 0 ? each : 0];
      int m = 0;
      while (m < each && it.hasNext()) {
        InternalRow r = it.next();
        for (int j = 0; j < columns; j++) {
          got[j][m] = r.isNullAt(j) ? Double.NaN : r.getDouble(j);
        }
        if (keyAt >= 0) {
          keys[m] = r.getLong(keyAt);
        }
        m++;
      }
      if (m < each) {
        for (int j = 0; j < columns; j++) {
          got[j] = Arrays.copyOf(got[j], m);
        }
        keys = Arrays.copyOf(keys, keyAt >= 0 ? m : 0);
      }
      return java.util.Collections.singletonList(new Object[] {got, keys, m}).iterator();
    }).collectPartitions(ids);
    int n = 0;
    for (List<Object[]> part : taken) {
      for (Object[] block : part) {
        n += (Integer) block[2];
      }
    }
    for (int j = 0; j < columns; j++) {
      out[j] = new double[n];
    }
    long[] keys = new long[keyAt >= 0 ? n : 0];
    int i = 0;
    for (List<Object[]> part : taken) {
      for (Object[] block : part) {
        double[][] values = (double[][]) block[0];
        int m = (Integer) block[2];
        for (int j = 0; j < columns; j++) {
          System.arraycopy(values[j], 0, out[j], i, m);
        }
        if (keyAt >= 0) {
          System.arraycopy((long[]) block[1], 0, keys, i, m);
        }
        i += m;
      }
    }
    return new Pilot(out, keys);
  }
}
