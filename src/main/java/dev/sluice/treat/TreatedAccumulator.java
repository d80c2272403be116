package dev.sluice.treat;

import dev.sluice.plan.TreatedStats;
import dev.sluice.profile.RowScan;
import dev.sluice.stats.CoMoments;
import dev.sluice.stats.Frequencies;
import dev.sluice.stats.NumericSteps;
import dev.sluice.stats.OrderWindows;
import dev.sluice.stats.ScaledMoments;
import dev.sluice.profile.Batches;
import org.apache.spark.sql.catalyst.InternalRow;
import org.apache.spark.sql.types.DataType;
import org.apache.spark.sql.vectorized.ColumnarBatch;

/**
 * Pass 2 over one partition. Column k of the projection is treated column k as DOUBLE; each value
 * goes through the validity and outlier steps, then feeds the column's moments, its quartile
 * windows and mode counts where the plan needs them, the counts beyond each fence, and the row of
 * co-moments.
 */
final class TreatedAccumulator implements RowScan.Accumulator<TreatedAccumulator> {
  private static final long serialVersionUID = 1L;
  /** Distinct treated values counted for a mode, at most. */
  static final int COUNTED_VALUES = 1_000_000;
  /** Positions in a column's limits: inner, outer and action limits, lower then upper. */
  private static final int LIMITS = 6;

  private final NumericSteps[] steps;
  private final double[][] limits;
  private final boolean[] mode;
  private final int[] corrIndex;

  final ScaledMoments[] moments;
  final long[][] beyond;
  final OrderWindows[] windows;
  final Frequencies<Double>[] modes;
  final CoMoments comoments;
  private transient double[] corrRow;
  private transient double[][] treated;
  private transient double[] raw;
  private transient boolean[] nulls;

  /**
   * @param limits per column: inner lower, inner upper, outer lower, outer upper, action lower,
   *     action upper (infinite where there is none)
   * @param windows per column, the first windows of its quartile search, or null
   * @param corrIndex per column, its position in the co-moments, or -1
   * @param comoments an empty accumulator of the co-moments, or null
   */
  @SuppressWarnings("unchecked")
  TreatedAccumulator(NumericSteps[] steps, double[][] limits, OrderWindows[] windows, boolean[] mode,
      int[] corrIndex, CoMoments comoments) {
    int p = steps.length;
    this.steps = steps;
    this.limits = limits;
    this.mode = mode;
    this.corrIndex = corrIndex;
    this.moments = new ScaledMoments[p];
    this.beyond = new long[p][LIMITS];
    this.windows = new OrderWindows[p];
    this.modes = new Frequencies[p];
    for (int k = 0; k < p; k++) {
      moments[k] = new ScaledMoments();
      this.windows[k] = windows[k] == null ? null : windows[k].emptyCopy();
      modes[k] = mode[k] ? new Frequencies<>(COUNTED_VALUES) : null;
    }
    this.comoments = comoments == null ? null : comoments.emptyCopy();
  }

  TreatedAccumulator emptyCopy() {
    return new TreatedAccumulator(steps, limits, windows, mode, corrIndex, comoments);
  }

  @Override
  public void add(InternalRow row) {
    double[] corr = corrRow();
    for (int k = 0; k < steps.length; k++) {
      double t = row.isNullAt(k) ? Double.NaN : treat(k, row.getDouble(k));
      if (corrIndex[k] >= 0 && corr != null) {
        corr[corrIndex[k]] = t;
      }
    }
    if (comoments != null) {
      comoments.add(corr);
    }
  }

  /**
   * Adds a columnar batch of the treated columns as stored, in the same order: the same figures as
   * {@link #add} gives for the same rows (the casts are Spark's, see {@code profile.Batches}).
   */
  void addBatch(ColumnarBatch batch, DataType[] types) {
    int n = batch.numRows();
    int p = steps.length;
    if (treated == null || treated[0].length < n) {
      treated = new double[Math.max(1, p)][Math.max(n, 4096)];
      raw = new double[Math.max(n, 4096)];
      nulls = new boolean[Math.max(n, 4096)];
    }
    for (int k = 0; k < p; k++) {
      Batches.doubles(batch.column(k), types[k], n, raw, nulls);
      double[] t = treated[k];
      for (int r = 0; r < n; r++) {
        t[r] = nulls[r] ? Double.NaN : treat(k, raw[r]);
      }
    }
    if (comoments == null) {
      return;
    }
    double[] corr = corrRow();
    for (int r = 0; r < n; r++) {
      for (int k = 0; k < p; k++) {
        if (corrIndex[k] >= 0) {
          corr[corrIndex[k]] = treated[k][r];
        }
      }
      comoments.add(corr);
    }
  }

  /** Steps 2 and 3 on one non-null value of column k, counted; the treated value or NaN. */
  private double treat(int k, double x) {
    double v = steps[k].valid(x);
    if (Double.isNaN(v)) {
      return v;
    }
    double[] l = limits[k];
    long[] b = beyond[k];
    for (int i = 0; i < LIMITS; i += 2) {
      if (v < l[i]) {
        b[i]++;
      }
      if (v > l[i + 1]) {
        b[i + 1]++;
      }
    }
    double t = steps[k].afterOutliers(v);
    if (!Double.isNaN(t)) {
      moments[k].add(t);
      if (windows[k] != null) {
        windows[k].add(t);
      }
      if (modes[k] != null) {
        modes[k].add(t + 0.0);
      }
    }
    return t;
  }

  private double[] corrRow() {
    if (comoments != null && corrRow == null) {
      corrRow = new double[comoments.dimension()];
    }
    return corrRow;
  }

  @Override
  public TreatedAccumulator merge(TreatedAccumulator o) {
    for (int k = 0; k < steps.length; k++) {
      moments[k].merge(o.moments[k]);
      for (int i = 0; i < LIMITS; i++) {
        beyond[k][i] += o.beyond[k][i];
      }
      if (windows[k] != null) {
        windows[k].merge(o.windows[k]);
      }
      if (modes[k] != null) {
        modes[k].merge(o.modes[k]);
      }
    }
    if (comoments != null) {
      comoments.merge(o.comoments);
    }
    return this;
  }

  /** The figures of column k, with its quartiles found by the search. */
  TreatedStats.ColumnStats stats(int k, double[] q) {
    ScaledMoments m = moments[k];
    Double top = modes[k] == null ? null : modes[k].top();
    long[] b = beyond[k];
    return new TreatedStats.ColumnStats(m.count(), m.mean(), m.stddev(), m.min(), m.max(),
        q[0], q[1], q[2], top == null ? Double.NaN : top, b[0], b[1], b[2], b[3], b[4], b[5]);
  }
}
