package dev.sluice.profile;

import dev.sluice.stats.CoMoments;
import dev.sluice.stats.NumericSteps;
import java.io.Serializable;
import java.util.ArrayList;
import java.util.List;

/**
 * Pass 1's share of pass 2: the co-moments of the treated columns after the outlier step, taken
 * before the outlier limits are known, so that a run can skip pass 2.
 *
 * <p>Each column has a band of values, from the pilot, that surely holds its lower limit, and one
 * that surely holds its upper limit. A valid value below the lower band is surely beyond the limit:
 * capped, it becomes the limit, a constant known only later, so it enters the co-moments in the
 * constant state BELOW (ABOVE likewise); removed, it is missing. A value between the bands is
 * surely kept as it is. A row with a value inside a band cannot be placed yet: its raw values are
 * kept aside by its partition, up to a limit per partition, and stored beside the partition's
 * accumulator in Spark's block store ({@link KeptRows}); they are treated there once the limits
 * are known. Past that limit the attempt fails and pass 2 runs as usual.
 */
final class EarlyTreatment implements Serializable {
  private static final long serialVersionUID = 1L;
  /** Not a state: the row is kept aside (see {@link #place}). */
  private static final byte ASIDE = -1;
  private final NumericSteps[] validity;
  private final NumericSteps.Action[] mode;
  /** Per column: values below lowEdge are surely below the lower limit, values from lowTop up surely not. */
  private final double[] lowEdge;
  private final double[] lowTop;
  /** Per column: values above highEdge are surely above the upper limit, values up to highBottom surely not. */
  private final double[] highBottom;
  private final double[] highEdge;
  private final int limit;

  final CoMoments comoments;
  /** This partition's rows kept aside, until {@link #takeRows}. */
  final List<double[]> pending = new ArrayList<>();
  /** Rows kept aside, over every part merged into this one. */
  long aside;
  /** Some partition had more rows to keep aside than its limit. */
  boolean overflowed;
  private transient double[] values;
  private transient byte[] states;
  /** Scratch of {@link #addColumns}: each column's states, the rows kept aside, the rows placed. */
  private transient byte[][] columnStates;
  private transient boolean[] asideRow;
  private transient int[] placedRows;
  /** Scratch of {@link #placeColumn}: the rows whose entry is not simply kept. */
  private transient int[] otherRows;

  /**
   * @param lowBand per column {low, high} of the lower limit's band, or null for no lower limit
   * @param limit rows with a value inside a band kept aside by one partition, at most
   */
  EarlyTreatment(NumericSteps[] validity, NumericSteps.Action[] mode, double[][] lowBand, double[][] highBand,
      CoMoments comoments, int limit) {
    int p = validity.length;
    this.validity = validity;
    this.mode = mode;
    this.lowEdge = new double[p];
    this.lowTop = new double[p];
    this.highBottom = new double[p];
    this.highEdge = new double[p];
    for (int s = 0; s < p; s++) {
      lowEdge[s] = lowBand[s] == null ? Double.NEGATIVE_INFINITY : lowBand[s][0];
      lowTop[s] = lowBand[s] == null ? Double.NEGATIVE_INFINITY : lowBand[s][1];
      highBottom[s] = highBand[s] == null ? Double.POSITIVE_INFINITY : highBand[s][0];
      highEdge[s] = highBand[s] == null ? Double.POSITIVE_INFINITY : highBand[s][1];
    }
    this.comoments = comoments;
    this.limit = limit;
  }

  private EarlyTreatment(EarlyTreatment o) {
    this.validity = o.validity;
    this.mode = o.mode;
    this.lowEdge = o.lowEdge;
    this.lowTop = o.lowTop;
    this.highBottom = o.highBottom;
    this.highEdge = o.highEdge;
    this.limit = o.limit;
    this.comoments = o.comoments.emptyCopy();
  }

  /** Per column, what it assumed the outlier step does. */
  NumericSteps.Action[] actions() {
    return mode.clone();
  }

  /**
   * Per column {lowEdge, lowTop, highBottom, highEdge}: values below lowEdge were taken as below
   * the lower limit, values from lowTop to highBottom as within the limits, values above highEdge
   * as above the upper limit (infinite edges: no limit on that side).
   */
  double[][] bands() {
    double[][] b = new double[mode.length][];
    for (int s = 0; s < mode.length; s++) {
      b[s] = new double[] {lowEdge[s], lowTop[s], highBottom[s], highEdge[s]};
    }
    return b;
  }

  EarlyTreatment emptyCopy() {
    return new EarlyTreatment(this);
  }

  /** One row of the columns' raw values (NaN for null). */
  void add(double[] raw) {
    int p = raw.length;
    if (values == null) {
      values = new double[p];
      states = new byte[p];
    }
    for (int s = 0; s < p; s++) {
      double v = validity[s].valid(raw[s]);
      byte state = place(s, v);
      if (state == ASIDE) {
        keepAside(raw);
        return;
      }
      values[s] = v;
      states[s] = state;
    }
    comoments.add(values, states);
  }

  /**
   * Adds rows 0 .. n - 1 of a batch given column by column ({@code raw[s][r]}, NaN for null): the
   * same co-moments, rows kept aside and counts as {@link #add} on each row in order, with loops
   * down each column instead of a call per row.
   */
  void addColumns(double[][] raw, int n) {
    int p = raw.length;
    if (columnStates == null || columnStates[0].length < n) {
      int size = Math.max(n, 4096);
      columnStates = new byte[p][size];
      asideRow = new boolean[size];
      placedRows = new int[size];
      otherRows = new int[size];
    }
    java.util.Arrays.fill(asideRow, 0, n, false);
    for (int s = 0; s < p; s++) {
      placeColumn(s, raw[s], columnStates[s], n);
    }
    int placed = 0;
    double[] row = new double[p];
    for (int r = 0; r < n; r++) {
      if (!asideRow[r]) {
        placedRows[placed++] = r;
        continue;
      }
      for (int s = 0; s < p; s++) {
        row[s] = raw[s][r];
      }
      keepAside(row);
    }
    // A value in state VALUE is its raw value: the validity step keeps a valid value as it is.
    comoments.addColumns(raw, columnStates, placedRows, placed);
  }

  /**
   * {@link #place} of the valid value of each of the first n entries of column s, into {@code
   * states}; a row with an entry inside a band is marked in {@link #asideRow}.
   */
  private void placeColumn(int s, double[] raw, byte[] states, int n) {
    NumericSteps steps = validity[s];
    boolean leave = mode[s] == NumericSteps.Action.LEAVE;
    // Raw values in [kept, keptTop] are finite, valid and kept as they are: the common case, and
    // the only one tested for most values. The rest go through place.
    double kept = Math.max(-Double.MAX_VALUE, steps.validMin());
    double keptTop = Math.min(Double.MAX_VALUE, steps.validMax());
    if (!leave) {
      kept = Math.max(kept, Math.max(lowTop[s], lowEdge[s]));
      keptTop = Math.min(keptTop, Math.min(highBottom[s], highEdge[s]));
    }
    // Without a branch: every entry is first a value, and the others are listed for place.
    int[] others = otherRows;
    int count = 0;
    for (int r = 0; r < n; r++) {
      double x = raw[r];
      states[r] = CoMoments.VALUE;
      others[count] = r;
      count += x >= kept & x <= keptTop ? 0 : 1;
    }
    for (int i = 0; i < count; i++) {
      int r = others[i];
      byte state = place(s, steps.valid(raw[r]));
      if (state == ASIDE) {
        asideRow[r] = true;
      }
      states[r] = state;
    }
  }

  /** Whether {@link #add} would keep this row aside: one of its valid values is inside a band. */
  boolean inBand(double[] raw) {
    for (int s = 0; s < raw.length; s++) {
      if (place(s, validity[s].valid(raw[s])) == ASIDE) {
        return true;
      }
    }
    return false;
  }

  /**
   * Where a value of column s after the validity step (NaN: missing) goes: its state in the
   * co-moments, or {@link #ASIDE} when it lies inside a band and the row must wait for the limits.
   */
  private byte place(int s, double v) {
    if (Double.isNaN(v)) {
      return CoMoments.MISSING;
    }
    if (mode[s] == NumericSteps.Action.LEAVE) {
      return CoMoments.VALUE;
    }
    if (v < lowEdge[s]) {
      return mode[s] == NumericSteps.Action.CAP ? CoMoments.BELOW : CoMoments.MISSING;
    }
    if (v > highEdge[s]) {
      return mode[s] == NumericSteps.Action.CAP ? CoMoments.ABOVE : CoMoments.MISSING;
    }
    return v < lowTop[s] || v > highBottom[s] ? ASIDE : CoMoments.VALUE;
  }

  /** Rows {@link #add} may keep aside before it gives up. */
  int limit() {
    return limit;
  }

  private void keepAside(double[] raw) {
    if (pending.size() < limit) {
      pending.add(raw.clone());
      aside++;
    } else {
      overflowed = true;
    }
  }

  /**
   * Adds the other part's co-moments and counts. Rows kept aside stay with the partition that
   * kept them ({@link #takeRows}), so that they never travel to the driver.
   */
  EarlyTreatment merge(EarlyTreatment o) {
    comoments.merge(o.comoments);
    overflowed |= o.overflowed;
    aside += o.aside;
    return this;
  }

  /** This partition's rows kept aside, removed from this object: one block, row after row. */
  Rows takeRows() {
    int p = validity.length;
    double[] flat = new double[pending.size() * p];
    for (int r = 0; r < pending.size(); r++) {
      System.arraycopy(pending.get(r), 0, flat, r * p, p);
    }
    pending.clear();
    return new Rows(p, flat);
  }

  /** Raw values of rows kept aside, {@code p} per row. */
  record Rows(int p, double[] values) implements Serializable {
    /** Co-moments of these rows after {@code steps}, in an accumulator like {@code empty}. */
    CoMoments treated(NumericSteps[] steps, CoMoments empty) {
      CoMoments m = empty.emptyCopy();
      double[] row = new double[p];
      for (int at = 0; at < values.length; at += p) {
        for (int s = 0; s < p; s++) {
          row[s] = steps[s].treated(values[at + s]);
        }
        m.add(row);
      }
      return m;
    }
  }
}
