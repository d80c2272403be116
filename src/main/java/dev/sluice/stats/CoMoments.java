package dev.sluice.stats;

import java.io.Serializable;
import java.util.Arrays;

/**
 * Mergeable sums of p columns that may hold missing values, from which the covariance and Pearson
 * correlation of the columns <em>after</em> constant imputation can be computed exactly, for
 * imputation values chosen only after the data has been read.
 *
 * <p>Each value is centred by a per-column centre given at construction (the pass-1 median) and
 * scaled by an exact power of two ({@link PowerScale}; 1 for ordinary magnitudes). For a pair of
 * columns j, k the rows fall into four groups: both present, only j present, only k present,
 * neither present. After imputing c_j and c_k the last three groups have one or two constant
 * coordinates, so the pair's sums follow from the counts, sums, sums of squares and sums of
 * products of the present values alone:
 *
 * <pre>
 *   sum u_j u_k = A_jk + c'_k (S_j - B_jk) + c'_j (S_k - B_kj) + c'_j c'_k (N - n_j - n_k + P_jk)
 * </pre>
 *
 * (A, B, P the sums of products, sums and counts where both are present; S_j, n_j where j is
 * present; c'_j the centred imputation value).
 *
 * <p>The sums are plain sums of centred values, as in the Gram-matrix route of Spark's own
 * correlation, because they cost no division per cell. A missing entry counts as u = 0 with
 * presence m = 0, so one dense triangle of products sum u_j u_k over every row already holds the
 * sums of products where both are present. The sums over "both present" rows of u_j, u_j^2 and
 * m_j follow as the column totals minus the same sums over the rows where k is missing, which a
 * row adds only for its missing entries (3 p cells each). A row thus costs p(p + 1) / 2 products,
 * added a block of rows at a time with several partial sums so that the loops run at the
 * processor's throughput, plus 3 p per missing entry. The column totals of u are added with the
 * block too, and the totals of u^2 are the triangle's diagonal. Centring on the median keeps the
 * cancellation in sum u^2 - (sum u)^2 / n small: |mean - median| is at most one standard
 * deviation for any distribution, so the relative error of a variance stays within a small
 * multiple of n times the unit roundoff, and usually near its square root. A centre many standard
 * deviations away from the data loses accuracy as the square of that distance. Memory is about
 * 4 p^2 numbers.
 *
 * <p>Edge cases: NaN marks a missing entry; infinite entries and centres are rejected; no rows or
 * one row give NaN covariances. Merging requires the same centres and scales and adds the sums.
 */
public final class CoMoments implements Serializable {
  private static final long serialVersionUID = 4L;
  /** An entry that holds its value. */
  public static final byte VALUE = 0;
  /** Constant states: the entry's value is a constant per column and state, given only when the
   * sums are read. MISSING takes the fill value; BELOW and ABOVE the lower and upper outlier limit. */
  public static final byte MISSING = 1;
  public static final byte BELOW = 2;
  public static final byte ABOVE = 3;
  /** Number of constant states. */
  public static final int STATES = 3;

  private final int p;
  private final double[] centres;
  /** Power-of-two factors applied to each column's deviations (see {@link PowerScale}). */
  private final double[] scales;
  private long rows;
  /**
   * Over every row: the sum of u (u = 0 where missing) and the count of present values. The sum
   * of u^2 is the triangle's diagonal.
   */
  private final double[] sumU;
  private final double[] present;
  /** Over every row: sum u_j u_k, upper triangle (j <= k) of a p x p array. */
  private final double[] gram;
  /**
   * Per constant state s (index s - 1), cell (k, j) = [k * p + j], over the rows where column k is
   * in state s: the sums of u_j and u_j^2 and the count of rows where j holds a value.
   */
  private final double[][] stateU;
  private final double[][] stateU2;
  private final double[][] statePresent;
  /**
   * Per pair of constant states (s, t) (index (s - 1) * STATES + t - 1), cell (k, j): the rows where
   * column k is in state s and column j in state t (on the diagonal: the rows where k is in s).
   */
  private final double[][] stateCount;
  /**
   * Rows waiting for the product triangle, column-major (block[j][r]), added a block at a time.
   * Flushed before the sums are read, merged or serialized.
   */
  private transient double[][] block;
  /** One row's deviations on the row path ({@link #add(double[], byte[])}), for its constants. */
  private transient double[] u;
  private transient byte[] missingStates;
  /**
   * Scratch of {@link #addColumns}: per column, the batch's rows where it is in a constant state
   * and their number; per constant state, the rows where one column is in it.
   */
  private transient int[][] constantRows;
  private transient int[] constantCount;
  private transient int[][] stateRows;
  private transient int pending;
  /**
   * Rows per block: as many as keep the block near 20 KB, so that it stays in the processor's
   * first-level cache while the triangle reads it; longer loops cost less per row (on 10 columns,
   * 256 rows a block took about 10 % less time per row than 64).
   */
  private final int blockRows;

  /** @throws IllegalArgumentException for no centres or a non-finite centre */
  public CoMoments(double[] centres) {
    this(centres, ones(centres.length));
  }

  /**
   * Co-moments of the deviations {@code (x_j - centres[j]) * scales[j]}. The scales are exact
   * powers of two that keep sums of products of very large values finite; correlations do not
   * depend on them and covariances are returned in the columns' own units.
   *
   * @throws IllegalArgumentException for no centres, a non-finite centre, or scales that are not
   *     positive powers of two or do not match the centres in number
   */
  public CoMoments(double[] centres, double[] scales) {
    if (scales.length != centres.length) {
      throw new IllegalArgumentException(
          "Cannot scale " + centres.length + " columns with " + scales.length + " factors");
    }
    for (double f : scales) {
      if (!(f > 0) || !Double.isFinite(f) || Math.scalb(1.0, Math.getExponent(f)) != f) {
        throw new IllegalArgumentException("Cannot scale deviations by " + f + ": not a power of two");
      }
    }
    if (centres.length == 0) {
      throw new IllegalArgumentException("Cannot keep co-moments of no columns");
    }
    for (double c : centres) {
      if (!Double.isFinite(c)) {
        throw new IllegalArgumentException("Cannot centre a column on " + c);
      }
    }
    this.p = centres.length;
    this.centres = centres.clone();
    this.scales = scales.clone();
    this.sumU = new double[p];
    this.present = new double[p];
    this.gram = new double[p * p];
    this.stateU = new double[STATES][p * p];
    this.stateU2 = new double[STATES][p * p];
    this.statePresent = new double[STATES][p * p];
    this.stateCount = new double[STATES * STATES][p * p];
    this.blockRows = Math.max(64, Math.min(256, 2560 / p));
  }

  /** An empty accumulator with the same centres and scales (each task of a pass starts from one). */
  public CoMoments emptyCopy() {
    return new CoMoments(centres, scales);
  }

  /**
   * The sums of the columns {@code keep} only, in that order: the same figures as if only those
   * columns had been added (a row's entries in other columns never enter a kept pair's sums).
   */
  public CoMoments subset(int[] keep) {
    flush();
    int q = keep.length;
    double[] c = new double[q];
    double[] f = new double[q];
    for (int a = 0; a < q; a++) {
      c[a] = centres[keep[a]];
      f[a] = scales[keep[a]];
    }
    CoMoments out = new CoMoments(c, f);
    out.rows = rows;
    for (int a = 0; a < q; a++) {
      int j = keep[a];
      out.sumU[a] = sumU[j];
      out.present[a] = present[j];
      for (int b = 0; b < q; b++) {
        int k = keep[b];
        out.gram[a * q + b] = gram[Math.min(j, k) * p + Math.max(j, k)];
        for (int s = 0; s < STATES; s++) {
          out.stateU[s][a * q + b] = stateU[s][j * p + k];
          out.stateU2[s][a * q + b] = stateU2[s][j * p + k];
          out.statePresent[s][a * q + b] = statePresent[s][j * p + k];
        }
        for (int st = 0; st < STATES * STATES; st++) {
          out.stateCount[st][a * q + b] = stateCount[st][j * p + k];
        }
      }
    }
    return out;
  }

  /** The power-of-two factor column j's deviations are scaled by. */
  public double scale(int j) {
    return scales[j];
  }

  public int dimension() {
    return p;
  }

  /**
   * Adds one row; NaN in {@code values} marks a missing entry. The array is not retained.
   *
   * @throws IllegalArgumentException for a row of the wrong length or with an infinite entry
   */
  public void add(double[] values) {
    if (values.length != p) {
      throw new IllegalArgumentException(
          "Cannot add a row of " + values.length + " values to " + p + " columns");
    }
    if (missingStates == null) {
      missingStates = new byte[p];
    }
    for (int j = 0; j < p; j++) {
      missingStates[j] = Double.isNaN(values[j]) ? MISSING : VALUE;
    }
    add(values, missingStates);
  }

  /**
   * Adds one row whose entries are values ({@code states[j] == VALUE}, taken from {@code values})
   * or in a constant state (MISSING, BELOW, ABOVE; the value is ignored). The arrays are not
   * retained.
   *
   * @throws IllegalArgumentException for arrays of the wrong length, an unknown state, or an
   *     infinite or NaN value held as a value
   */
  public void add(double[] values, byte[] states) {
    if (values.length != p || states.length != p) {
      throw new IllegalArgumentException(
          "Cannot add a row of " + values.length + " values to " + p + " columns");
    }
    for (int j = 0; j < p; j++) {
      // Checked before anything is added, so that a refused row leaves no trace.
      if (states[j] == VALUE && !Double.isFinite(values[j])) {
        throw new IllegalArgumentException("Cannot add the value " + values[j] + " in column " + j);
      }
      if (states[j] < 0 || states[j] > STATES) {
        throw new IllegalArgumentException("Cannot add an entry in state " + states[j] + " in column " + j);
      }
    }
    if (block == null) {
      block = new double[p][blockRows];
    }
    if (u == null) {
      u = new double[p];
    }
    int constants = 0;
    for (int j = 0; j < p; j++) {
      byte state = states[j];
      double d = 0.0;
      if (state == VALUE) {
        double x = values[j];
        d = x * scales[j] - centres[j] * scales[j];
        present[j] += 1.0;
      } else {
        constants++;
      }
      u[j] = d;
      block[j][pending] = d;
    }
    if (constants > 0) {
      addConstants(states);
    }
    rows++;
    pending++;
    if (pending == blockRows) {
      flush();
    }
  }

  /**
   * Adds rows given column by column: entry j of row r is {@code values[j][r]} in state {@code
   * states[j][r]}, as {@link #add(double[], byte[])} takes a row. The rows added are {@code
   * which[0 .. count - 1]}, in that order. The sums come out exactly as if each of those rows had
   * been added with {@link #add(double[], byte[])} in the same order (the same additions, in the
   * same order, into each sum), but a batch of rows costs much less: the per-row checks and calls
   * become loops down each column. This is a per-value path: the entries are not checked, so a
   * caller passes only finite values in state VALUE and known states (the value of an entry in a
   * constant state is ignored, whatever it is).
   *
   * @throws IllegalArgumentException for arrays of the wrong number of columns
   */
  public void addColumns(double[][] values, byte[][] states, int[] which, int count) {
    if (values.length != p || states.length != p) {
      throw new IllegalArgumentException(
          "Cannot add rows of " + values.length + " columns to " + p + " columns");
    }
    if (block == null) {
      block = new double[p][blockRows];
    }
    if (constantRows == null || constantRows[0].length < count) {
      int size = Math.max(count, 4096);
      constantRows = new int[p][size];
      stateRows = new int[STATES][size];
      constantCount = new int[p];
    }
    java.util.Arrays.fill(constantCount, 0);
    int done = 0;
    while (done < count) {
      int m = Math.min(blockRows - pending, count - done);
      for (int j = 0; j < p; j++) {
        centre(j, values[j], states[j], which, done, m);
      }
      rows += m;
      pending += m;
      done += m;
      if (pending == blockRows) {
        flush();
      }
    }
    addConstantColumns(values, states);
  }

  /**
   * Block entries of column j for rows which[from .. from + m - 1], at {@code pending}: the centred,
   * scaled value, or 0 for an entry in a constant state, whose row is appended to the column's
   * {@link #constantRows}. Without a branch: every row is written to the list, and the count moves
   * only for a constant.
   */
  private void centre(int j, double[] x, byte[] st, int[] which, int from, int m) {
    double[] b = block[j];
    double scale = scales[j];
    double shift = centres[j] * scales[j];
    int[] list = constantRows[j];
    int before = constantCount[j];
    int constants = before;
    for (int t = 0; t < m; t++) {
      int r = which[from + t];
      int state = st[r];
      b[pending + t] = masked(x[r] * scale - shift, state);
      list[constants] = r;
      constants += -state >>> 31;
    }
    constantCount[j] = constants;
    // Counts are whole numbers far below 2^53: added at once, they come out as one at a time.
    present[j] += m - (constants - before);
  }

  /**
   * {@link #addConstants} for the batch's rows in a constant state, column by column: for each
   * column k and constant state s, the rows where k is in s, then every column j's sums over those
   * rows in their order. Each sum gets the same additions in the same order as row by row, with the
   * sum in a register rather than read and written back per row.
   */
  private void addConstantColumns(double[][] values, byte[][] states) {
    int[] sizes = new int[STATES];
    for (int k = 0; k < p; k++) {
      byte[] sk = states[k];
      int[] list = constantRows[k];
      int size = constantCount[k];
      if (size == 0) {
        continue;
      }
      java.util.Arrays.fill(sizes, 0);
      for (int i = 0; i < size; i++) {
        int r = list[i];
        int s = sk[r] - 1;
        stateRows[s][sizes[s]++] = r;
      }
      for (int s = 1; s <= STATES; s++) {
        for (int from = 0; from < sizes[s - 1]; from += STATE_CHUNK) {
          int[] chunk = from == 0 ? stateRows[s - 1]
              : java.util.Arrays.copyOfRange(stateRows[s - 1], from, sizes[s - 1]);
          addState(k, s, chunk, Math.min(STATE_CHUNK, sizes[s - 1] - from), values, states);
        }
      }
    }
  }

  /** Most rows {@link #addState} takes at once: its counts are 16-bit fields of one long. */
  private static final int STATE_CHUNK = (1 << 16) - 1;

  /**
   * The sums of every column over the rows {@code list[0 .. size - 1]} (at most {@link
   * #STATE_CHUNK}), where column k is in state s; two columns at a time, so that four sums are in
   * flight. Each entry's state is counted in a field of 16 bits: {@code 1L << (16 * state)}.
   */
  private void addState(int k, int s, int[] list, int size, double[][] values, byte[][] states) {
    int base = k * p;
    double[] su = stateU[s - 1];
    double[] su2 = stateU2[s - 1];
    int j = 0;
    for (; j + 1 < p; j += 2) {
      double[] x0 = values[j];
      double[] x1 = values[j + 1];
      byte[] st0 = states[j];
      byte[] st1 = states[j + 1];
      double scale0 = scales[j];
      double scale1 = scales[j + 1];
      double shift0 = centres[j] * scales[j];
      double shift1 = centres[j + 1] * scales[j + 1];
      double a0 = su[base + j];
      double a1 = su[base + j + 1];
      double b0 = su2[base + j];
      double b1 = su2[base + j + 1];
      long counts0 = 0;
      long counts1 = 0;
      for (int t = 0; t < size; t++) {
        int r = list[t];
        int state0 = st0[r];
        int state1 = st1[r];
        double d0 = masked(x0[r] * scale0 - shift0, state0);
        double d1 = masked(x1[r] * scale1 - shift1, state1);
        a0 += d0;
        a1 += d1;
        b0 += d0 * d0;
        b1 += d1 * d1;
        counts0 += 1L << (state0 << 4);
        counts1 += 1L << (state1 << 4);
      }
      su[base + j] = a0;
      su[base + j + 1] = a1;
      su2[base + j] = b0;
      su2[base + j + 1] = b1;
      addStateCounts(s, base + j, counts0);
      addStateCounts(s, base + j + 1, counts1);
    }
    if (j < p) {
      double[] x = values[j];
      byte[] st = states[j];
      double scale = scales[j];
      double shift = centres[j] * scales[j];
      double a = su[base + j];
      double b = su2[base + j];
      long counts = 0;
      for (int t = 0; t < size; t++) {
        int r = list[t];
        int state = st[r];
        double d = masked(x[r] * scale - shift, state);
        a += d;
        b += d * d;
        counts += 1L << (state << 4);
      }
      su[base + j] = a;
      su2[base + j] = b;
      addStateCounts(s, base + j, counts);
    }
  }

  /**
   * d for an entry in state VALUE, else 0.0 (whatever d is, NaN included), without a branch: the
   * deviation is computed for every entry and its bits masked (states are 0 to 3).
   */
  private static double masked(double d, int state) {
    long keep = (-state >>> 31) - 1L;
    return Double.longBitsToDouble(Double.doubleToRawLongBits(d) & keep);
  }

  /** Adds counts packed by {@link #addState} to cell {@code cell} of state s's counts. */
  private void addStateCounts(int s, int cell, long counts) {
    statePresent[s - 1][cell] += counts & 0xFFFF;
    int row = (s - 1) * STATES;
    for (int t = 1; t <= STATES; t++) {
      stateCount[row + t - 1][cell] += (counts >>> (16 * t)) & 0xFFFF;
    }
  }

  /** The sums over the rows where a column is in a constant state, for this row's such entries. */
  private void addConstants(byte[] states) {
    for (int k = 0; k < p; k++) {
      int s = states[k];
      if (s == VALUE) {
        continue;
      }
      int base = k * p;
      double[] su = stateU[s - 1];
      double[] su2 = stateU2[s - 1];
      double[] sp = statePresent[s - 1];
      for (int j = 0; j < p; j++) {
        double d = u[j];
        su[base + j] += d;
        su2[base + j] += d * d;
        if (states[j] == VALUE) {
          sp[base + j] += 1.0;
        } else {
          stateCount[(s - 1) * STATES + states[j] - 1][base + j] += 1.0;
        }
      }
    }
  }

  /**
   * Adds the pending rows' products to the triangle, two columns against two at a time: four sums
   * from four loads per row, where one pair at a time needs two loads per product. The blocks on
   * the diagonal also add the columns' sums of u.
   */
  private void flush() {
    if (pending == 0) {
      return;
    }
    int j = 0;
    for (; j + 1 < p; j += 2) {
      addDiagonal(j, pending);
      int k = j + 2;
      for (; k + 1 < p; k += 2) {
        addTwoByTwo(j, k, pending);
      }
      if (k < p) {
        addTwoByOne(j, k, pending);
      }
    }
    if (j < p) {
      double[] a = block[j];
      double s = 0;
      double s2 = 0;
      for (int r = 0; r < pending; r++) {
        s += a[r];
        s2 += a[r] * a[r];
      }
      sumU[j] += s;
      gram[j * p + j] += s2;
    }
    pending = 0;
  }

  /** Cells (j, j), (j, j + 1) and (j + 1, j + 1), and the sums of u of columns j and j + 1. */
  private void addDiagonal(int j, int n) {
    double[] a0 = block[j];
    double[] a1 = block[j + 1];
    double s0 = 0;
    double s1 = 0;
    double s00 = 0;
    double s01 = 0;
    double s11 = 0;
    for (int r = 0; r < n; r++) {
      double x0 = a0[r];
      double x1 = a1[r];
      s0 += x0;
      s1 += x1;
      s00 += x0 * x0;
      s01 += x0 * x1;
      s11 += x1 * x1;
    }
    sumU[j] += s0;
    sumU[j + 1] += s1;
    gram[j * p + j] += s00;
    gram[j * p + j + 1] += s01;
    gram[(j + 1) * p + j + 1] += s11;
  }

  /** Cells (j, k), (j, k + 1), (j + 1, k), (j + 1, k + 1) of the upper triangle, for k > j + 1. */
  private void addTwoByTwo(int j, int k, int n) {
    double[] a0 = block[j];
    double[] a1 = block[j + 1];
    double[] b0 = block[k];
    double[] b1 = block[k + 1];
    double s00 = 0;
    double s01 = 0;
    double s10 = 0;
    double s11 = 0;
    for (int r = 0; r < n; r++) {
      double x0 = a0[r];
      double x1 = a1[r];
      double y0 = b0[r];
      double y1 = b1[r];
      s00 += x0 * y0;
      s01 += x0 * y1;
      s10 += x1 * y0;
      s11 += x1 * y1;
    }
    gram[j * p + k] += s00;
    gram[j * p + k + 1] += s01;
    gram[(j + 1) * p + k] += s10;
    gram[(j + 1) * p + k + 1] += s11;
  }

  /** Cells (j, k) and (j + 1, k), for the last column k when the columns after j are odd. */
  private void addTwoByOne(int j, int k, int n) {
    double[] a0 = block[j];
    double[] a1 = block[j + 1];
    double[] b = block[k];
    double s0 = 0;
    double s1 = 0;
    for (int r = 0; r < n; r++) {
      s0 += a0[r] * b[r];
      s1 += a1[r] * b[r];
    }
    gram[j * p + k] += s0;
    gram[(j + 1) * p + k] += s1;
  }

  private void writeObject(java.io.ObjectOutputStream out) throws java.io.IOException {
    flush();
    out.defaultWriteObject();
  }

  /**
   * Adds the other accumulator's sums into this one and returns this.
   *
   * @throws IllegalArgumentException when the other has different centres or scales
   */
  public CoMoments merge(CoMoments other) {
    if (!Arrays.equals(centres, other.centres) || !Arrays.equals(scales, other.scales)) {
      throw new IllegalArgumentException("Cannot merge co-moments kept around different centres");
    }
    flush();
    other.flush();
    rows += other.rows;
    addInto(sumU, other.sumU);
    addInto(present, other.present);
    addInto(gram, other.gram);
    for (int i = 0; i < STATES; i++) {
      addInto(stateU[i], other.stateU[i]);
      addInto(stateU2[i], other.stateU2[i]);
      addInto(statePresent[i], other.statePresent[i]);
    }
    for (int i = 0; i < STATES * STATES; i++) {
      addInto(stateCount[i], other.stateCount[i]);
    }
    return this;
  }

  public long rows() {
    return rows;
  }

  /**
   * The sample covariance matrix (n - 1) of the columns after each missing entry of column j is
   * replaced by {@code imputed[j]}. A NaN imputation value means the column is not imputed: its
   * covariances are then taken over the rows where the pair is present (pairwise complete), the
   * other column of the pair counting as present wherever it is imputed. Fewer than two such rows
   * give NaN. Rows added with BELOW or ABOVE entries need {@link #covariance(double[][])}.
   *
   * @throws IllegalArgumentException for a vector of the wrong length or an infinite value
   */
  public double[][] covariance(double[] imputed) {
    return covariance(missingOnly(imputed));
  }

  /**
   * The sample covariance matrix with each entry of column j in constant state s replaced by
   * {@code constants[j][s - 1]} (MISSING, BELOW, ABOVE). A NaN constant leaves the rows where the
   * column is in that state out of that column's pairs, as a NaN imputation value does.
   *
   * @throws IllegalArgumentException for arrays of the wrong shape or an infinite constant
   */
  public double[][] covariance(double[][] constants) {
    double[][] c = centred(constants);
    flush();
    double[][] result = new double[p][p];
    for (int j = 0; j < p; j++) {
      for (int k = j; k < p; k++) {
        result[j][k] = pair(j, k, c).covariance() / scales[j] / scales[k];
        result[k][j] = result[j][k];
      }
    }
    return result;
  }

  /**
   * Pearson correlation from {@link #covariance}, clamped to [-1, 1]; NaN for a pair where either
   * column has zero variance. The diagonal is 1 (NaN for a zero-variance column). In the pairwise
   * complete case each pair's variances are taken over the same rows as its covariance.
   */
  public double[][] correlation(double[] imputed) {
    return correlation(missingOnly(imputed));
  }

  /** Pearson correlation with constant states, as {@link #covariance(double[][])} takes them. */
  public double[][] correlation(double[][] constants) {
    double[][] c = centred(constants);
    flush();
    double[][] result = new double[p][p];
    for (int j = 0; j < p; j++) {
      result[j][j] = Double.isNaN(pair(j, j, c).correlation()) ? Double.NaN : 1.0;
      for (int k = j + 1; k < p; k++) {
        result[j][k] = pair(j, k, c).correlation();
        result[k][j] = result[j][k];
      }
    }
    return result;
  }

  /** Constants for rows that only hold values and missing entries. */
  private double[][] missingOnly(double[] imputed) {
    if (imputed.length != p) {
      throw new IllegalArgumentException(
          "Cannot impute " + imputed.length + " values into " + p + " columns");
    }
    double[][] c = new double[p][STATES];
    for (int j = 0; j < p; j++) {
      java.util.Arrays.fill(c[j], Double.NaN);
      c[j][MISSING - 1] = imputed[j];
    }
    return c;
  }

  /** The constants as centred, scaled deviations, checked. */
  private double[][] centred(double[][] constants) {
    if (constants.length != p) {
      throw new IllegalArgumentException(
          "Cannot impute constants for " + constants.length + " columns into " + p);
    }
    double[][] c = new double[p][STATES];
    for (int j = 0; j < p; j++) {
      if (constants[j].length != STATES) {
        throw new IllegalArgumentException("Expected " + STATES + " constants for column " + j);
      }
      for (int s = 0; s < STATES; s++) {
        double v = constants[j][s];
        if (Double.isInfinite(v)) {
          throw new IllegalArgumentException("Cannot impute the infinite value " + v);
        }
        c[j][s] = v * scales[j] - centres[j] * scales[j];
      }
    }
    return c;
  }

  /** Sums over the rows that count for the pair (j, k), constants c centred as deviations. */
  private Sums pair(int j, int k, double[][] c) {
    int kj = k * p + j;
    int jk = j * p + k;
    Sums sums = new Sums();
    // Both hold values: column totals less their sums over the rows where the other is constant.
    double nBoth = present[j];
    double sjBoth = sumU[j];
    double skBoth = sumU[k];
    double sjjBoth = gram[j * p + j];
    double skkBoth = gram[k * p + k];
    for (int s = 0; s < STATES; s++) {
      nBoth -= statePresent[s][kj];
      sjBoth -= stateU[s][kj];
      skBoth -= stateU[s][jk];
      sjjBoth -= stateU2[s][kj];
      skkBoth -= stateU2[s][jk];
    }
    double sjkBoth = gram[Math.min(j, k) * p + Math.max(j, k)];
    sums.add(nBoth, sjBoth, skBoth, sjjBoth, skkBoth, sjkBoth);
    if (j == k) {
      for (int s = 0; s < STATES; s++) {
        double cj = c[j][s];
        double n = stateCount[s * STATES + s][jk];
        if (!Double.isNaN(cj) && n > 0) {
          sums.add(n, n * cj, n * cj, n * cj * cj, n * cj * cj, n * cj * cj);
        }
      }
      return sums;
    }
    for (int s = 0; s < STATES; s++) {
      double ck = c[k][s];
      if (!Double.isNaN(ck)) {
        // j holds a value, k is in state s.
        double n = statePresent[s][kj];
        double sj = stateU[s][kj];
        double sjj = stateU2[s][kj];
        sums.add(n, sj, n * ck, sjj, n * ck * ck, ck * sj);
      }
      double cj = c[j][s];
      if (!Double.isNaN(cj)) {
        double n = statePresent[s][jk];
        double sk = stateU[s][jk];
        double skk = stateU2[s][jk];
        sums.add(n, n * cj, sk, n * cj * cj, skk, cj * sk);
      }
      for (int t = 0; t < STATES; t++) {
        double ckt = c[k][t];
        if (!Double.isNaN(cj) && !Double.isNaN(ckt)) {
          // j in state s, k in state t.
          double n = stateCount[s * STATES + t][jk];
          sums.add(n, n * cj, n * ckt, n * cj * cj, n * ckt * ckt, n * cj * ckt);
        }
      }
    }
    return sums;
  }

  /** Running totals of one pair: count, sums, sums of squares and of products. */
  private static final class Sums {
    private double n;
    private double sj;
    private double sk;
    private double sjj;
    private double skk;
    private double sjk;

    void add(double gn, double gsj, double gsk, double gsjj, double gskk, double gsjk) {
      n += gn;
      sj += gsj;
      sk += gsk;
      sjj += gsjj;
      skk += gskk;
      sjk += gsjk;
    }

    /** Sample covariance (n - 1); NaN for fewer than two rows. */
    double covariance() {
      return n < 2 ? Double.NaN : (sjk - sj * sk / n) / (n - 1);
    }

    /** Pearson correlation clamped to [-1, 1]; NaN for fewer than two rows or a zero variance. */
    double correlation() {
      double ssj = sjj - sj * sj / n;
      double ssk = skk - sk * sk / n;
      if (n < 2 || !(ssj > 0.0) || !(ssk > 0.0)) {
        return Double.NaN;
      }
      double r = (sjk - sj * sk / n) / (Math.sqrt(ssj) * Math.sqrt(ssk));
      return Math.max(-1.0, Math.min(1.0, r));
    }
  }

  private static void addInto(double[] into, double[] from) {
    for (int i = 0; i < into.length; i++) {
      into[i] += from[i];
    }
  }

  private static double[] ones(int n) {
    double[] one = new double[n];
    Arrays.fill(one, 1.0);
    return one;
  }
}
