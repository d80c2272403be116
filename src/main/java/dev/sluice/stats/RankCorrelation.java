package dev.sluice.stats;

import java.util.Arrays;

/**
 * Spearman's rank correlation between the columns of weighted rows, such as the rows and weights
 * of a {@link RowSample}.
 *
 * <p>Definition. A row of weight w counts w times. For each column, the present (non-NaN) values
 * get weighted mid-ranks: sorted by value, a group of tied values whose weights sum to g, preceded
 * by values of total weight W, has rank {@code W + (g + 1) / 2} (with unit weights, the usual
 * average rank of ties). Spearman's rho of a pair of columns is the weighted Pearson correlation
 * of these ranks over the rows where both values are present (pairwise complete); the ranks stay
 * the column-wide ones.
 *
 * <p>Edge cases: the diagonal is 1, or NaN for a column whose ranks have zero variance (all its
 * present values equal, or fewer than two present rows). A pair with fewer than two rows present
 * in both, or whose ranks over those rows have zero variance in either column, gives NaN. Zero
 * variance is decided exactly, never by a rounded variance. Results are clamped to [-1, 1]; the
 * matrix is symmetric; equal rank vectors give exactly 1. -0.0 and 0.0 are tied. Infinite values
 * are rejected (the caller removes them); so are weights below 1 and a total weight above 2^52.
 *
 * <p>Numerics. Ranks are kept doubled and centred on the column's weighted mean rank: {@code 2W +
 * g - T} for a column of total present weight T, an integer computed in long arithmetic and exact
 * as a double for any total weight up to 2^52. Missing entries count as 0, so that the sum of w
 * u_j u_k over all rows is the sum over the rows where both are present.
 *
 * <ul>
 *   <li>Two columns without missing values: rho = C / sqrt(V_j V_k), with C = sum w u_j u_k and V
 *       = sum w u^2, the ranks already centred on their weighted mean.
 *   <li>A pair with missing values: over the rows present in both, the weight P, the sums A = sum
 *       w u and Q = sum w u^2 of each column come from the column totals and sums gathered over
 *       the other column's missing rows (or its present rows, if fewer); the covariance is {@code
 *       C - A_j (A_k / P)} and the variances {@code Q - A (A / P)}. With a total weight up to 2^17
 *       every product and partial sum of the doubled ranks is an integer below 2^51, so all these
 *       sums are exact in double, in any order, and only the last few operations round.
 *   <li>Above 2^17 those sums are rounded. They are used when the rows present in both keep at
 *       least 1/256 of each column's V (the subtractions then lose at most about 8 bits);
 *       otherwise, which includes every pair where a column may be constant on those rows, the
 *       pair is computed again in two passes over the rows present in both: each column centred
 *       on its weighted mean over them before multiplying, and zero variance decided on the
 *       integer ranks themselves.
 * </ul>
 *
 * <p>Cost, for p columns and n rows: O(n) per column for the ranks (a radix sort of the values'
 * bits); one multiply-add per row and pair of columns; with missing values, three more per
 * missing (or present, if fewer) entry and column; two passes over the rows for each pair
 * computed again. Memory: p n doubles for the ranks, p n bytes for presence and at most p n / 2
 * ints of row lists, besides the caller's rows, and 4 p^2 doubles of sums.
 */
public final class RankCorrelation {
  /** Largest total weight: doubled ranks up to 2^53 stay exact in a double. */
  public static final long MAX_TOTAL_WEIGHT = 1L << 52;

  /** Largest total weight for which every sum of w u_j u_k is exact in double (T^3 <= 2^51). */
  static final long EXACT_TOTAL_WEIGHT = 1L << 17;

  private RankCorrelation() {}

  /**
   * The p x p matrix of Spearman's rho, p being the length of the rows.
   *
   * @throws IllegalArgumentException for no rows (the column count is then unknown: use
   *     {@link #spearman(int, double[][], long[])}), and as that method
   */
  public static double[][] spearman(double[][] rows, long[] weights) {
    if (rows.length == 0) {
      throw new IllegalArgumentException(
          "Cannot tell the number of columns from no rows; pass the number of columns");
    }
    return spearman(rows[0].length, rows, weights);
  }

  /**
   * The {@code columns} x {@code columns} matrix of Spearman's rho. No rows give a matrix of NaN.
   *
   * @throws IllegalArgumentException for fewer than one column, a row of another length, as many
   *     weights as rows not given, a weight below 1, a total weight above {@link
   *     #MAX_TOTAL_WEIGHT}, or an infinite value
   */
  public static double[][] spearman(int columns, double[][] rows, long[] weights) {
    if (columns < 1) {
      throw new IllegalArgumentException("Cannot rank-correlate " + columns + " columns");
    }
    int n = rows.length;
    if (weights.length != n) {
      throw new IllegalArgumentException(
          "Cannot weight " + n + " rows with " + weights.length + " weights");
    }
    long total = 0;
    double[] w = new double[n];
    for (int i = 0; i < n; i++) {
      if (rows[i].length != columns) {
        throw new IllegalArgumentException(
            "Cannot rank row " + i + " of " + rows[i].length + " values among " + columns + " columns");
      }
      for (int j = 0; j < columns; j++) {
        if (Double.isInfinite(rows[i][j])) {
          // Checked here, on the caller's thread: the columns are ranked on several.
          throw new IllegalArgumentException(
              "Cannot rank the infinite value " + rows[i][j] + " in row " + i + ", column " + j);
        }
      }
      if (weights[i] < 1) {
        throw new IllegalArgumentException("Cannot weight row " + i + " by " + weights[i] + ": weights start at 1");
      }
      if (weights[i] > MAX_TOTAL_WEIGHT - total) {
        throw new IllegalArgumentException(
            "Cannot rank rows of total weight above 2^52 (reached at row " + i + ")");
      }
      total += weights[i];
      w[i] = weights[i];
    }

    int p = columns;
    double[][] u = transpose(rows, p);
    byte[][] present = new byte[p][];
    int[] missing = new int[p];
    boolean[] varies = new boolean[p];
    long[] columnWeight = new long[p];
    // Columns rank apart from each other: a stripe of them per core, each with a ranker of its own.
    int stripes = Math.max(1, Math.min(p, Runtime.getRuntime().availableProcessors()));
    java.util.stream.IntStream.range(0, stripes).parallel().forEach(s -> {
      Ranker ranker = new Ranker(n);
      for (int j = s; j < p; j += stripes) {
        present[j] = new byte[n];
        ranker.rank(u[j], weights, present[j]);
        missing[j] = ranker.missing;
        varies[j] = ranker.groups >= 2;
        columnWeight[j] = ranker.columnWeight;
      }
    });

    double[][] cross = crossProducts(u, w);
    boolean exact = total <= EXACT_TOTAL_WEIGHT;
    boolean anyMissing = Arrays.stream(missing).anyMatch(m -> m > 0);
    Conditional conditional = anyMissing ? new Conditional(u, present, missing, w, columnWeight, cross) : null;

    double[][] rho = new double[p][p];
    Gathered gathered = null;
    for (int j = 0; j < p; j++) {
      rho[j][j] = varies[j] ? 1.0 : Double.NaN;
      for (int k = j + 1; k < p; k++) {
        double r;
        if (!varies[j] || !varies[k]) {
          r = Double.NaN;
        } else if (missing[j] == 0 && missing[k] == 0) {
          r = clamp(cross[j][k] / Math.sqrt(cross[j][j] * cross[k][k]));
        } else {
          r = conditional.rho(j, k, exact);
          if (r == RECOMPUTE) {
            gathered = gathered == null ? new Gathered(n) : gathered;
            r = gathered.rho(u[j], present[j], u[k], present[k], w);
          }
        }
        rho[j][k] = r;
        rho[k][j] = r;
      }
    }
    return rho;
  }

  /** Marks a pair whose rounded sums are too close to cancelling (total weight above 2^17). */
  private static final double RECOMPUTE = Double.NEGATIVE_INFINITY;

  /** The columns of the rows, read a block of columns at a time (one cache line of each row). */
  private static double[][] transpose(double[][] rows, int p) {
    int n = rows.length;
    double[][] columns = new double[p][n];
    for (int from = 0; from < p; from += 8) {
      int to = Math.min(p, from + 8);
      for (int i = 0; i < n; i++) {
        double[] row = rows[i];
        for (int j = from; j < to; j++) {
          columns[j][i] = row[j];
        }
      }
    }
    return columns;
  }

  /** Weighted, doubled, centred mid-ranks of one column at a time, by a radix sort. */
  private static final class Ranker {
    final long[] keys;
    final long[] keysSwap;
    final int[] rowsOf;
    final int[] rowsSwap;
    int missing;
    int groups;
    long columnWeight;

    Ranker(int n) {
      keys = new long[n];
      keysSwap = new long[n];
      rowsOf = new int[n];
      rowsSwap = new int[n];
    }

    /**
     * Replaces the values of a column (finite or NaN) by their doubled centred mid-ranks (0 where
     * missing) and fills present (1 or 0).
     */
    void rank(double[] column, long[] weights, byte[] present) {
      int n = column.length;
      int m = 0;
      long weight = 0;
      for (int i = 0; i < n; i++) {
        double v = column[i];
        if (!Double.isNaN(v)) {
          // -0.0 ranks with 0.0; unsigned order of the keys is numeric order.
          keys[m] = RadixSort.key(v == 0.0 ? 0.0 : v);
          rowsOf[m] = i;
          m++;
          present[i] = 1;
          weight += weights[i];
        }
        column[i] = 0.0;
      }
      missing = n - m;
      columnWeight = weight;
      RadixSort.sort(keys, rowsOf, m, keysSwap, rowsSwap);
      // Groups of equal keys: doubled centred mid-rank 2 (W + (g + 1) / 2) - (T + 1) = 2W + g - T.
      groups = 0;
      long before = 0;
      for (int from = 0; from < m; ) {
        int to = from;
        long g = 0;
        while (to < m && keys[to] == keys[from]) {
          g += weights[rowsOf[to]];
          to++;
        }
        double rank = 2 * before + g - weight;
        for (int t = from; t < to; t++) {
          column[rowsOf[t]] = rank;
        }
        before += g;
        groups++;
        from = to;
      }
    }
  }

  /**
   * cross[j][k] = sum over rows of w u_j u_k for k >= j, each a plain sequential sum over the rows
   * (so cross[j][j] and cross[j][k] of equal columns are the same sum), computed two columns by
   * four at a time so that each loaded value serves several pairs.
   */
  private static double[][] crossProducts(double[][] u, double[] w) {
    int p = u.length;
    int n = w.length;
    double[] zeros = new double[n];
    double[][] padded = Arrays.copyOf(u, (p + 3) / 4 * 4);
    for (int j = p; j < padded.length; j++) {
      padded[j] = zeros;
    }
    double[][] cross = new double[p][p];
    for (int j = 0; j < p; j += 2) {
      double[] a0 = padded[j];
      double[] a1 = j + 1 < p ? padded[j + 1] : zeros;
      for (int k = j / 4 * 4; k < p; k += 4) {
        double[] b0 = padded[k];
        double[] b1 = padded[k + 1];
        double[] b2 = padded[k + 2];
        double[] b3 = padded[k + 3];
        double s00 = 0.0;
        double s01 = 0.0;
        double s02 = 0.0;
        double s03 = 0.0;
        double s10 = 0.0;
        double s11 = 0.0;
        double s12 = 0.0;
        double s13 = 0.0;
        for (int i = 0; i < n; i++) {
          double x0 = w[i] * a0[i];
          double x1 = w[i] * a1[i];
          double y0 = b0[i];
          double y1 = b1[i];
          double y2 = b2[i];
          double y3 = b3[i];
          s00 += x0 * y0;
          s01 += x0 * y1;
          s02 += x0 * y2;
          s03 += x0 * y3;
          s10 += x1 * y0;
          s11 += x1 * y1;
          s12 += x1 * y2;
          s13 += x1 * y3;
        }
        store(cross, j, k, s00, s01, s02, s03);
        store(cross, j + 1, k, s10, s11, s12, s13);
      }
    }
    return cross;
  }

  private static void store(double[][] cross, int j, int k, double s0, double s1, double s2, double s3) {
    int p = cross.length;
    if (j >= p) {
      return;
    }
    double[] s = {s0, s1, s2, s3};
    for (int d = 0; d < 4; d++) {
      if (k + d >= j && k + d < p) {
        cross[j][k + d] = s[d];
      }
    }
  }

  /**
   * Sums over the rows where a second column is present: for each column k with missing values
   * and every column j, the weight of the rows where both are present, and the sums of w u_j and
   * w u_j^2 over them. Each is gathered over k's missing rows and subtracted from the column
   * totals, or over k's present rows when those are fewer. Exact when the total weight is at most
   * 2^17.
   */
  private static final class Conditional {
    final double[][] weight;
    final double[][] sum;
    final double[][] squares;
    final long[] columnWeight;
    final double[][] cross;

    Conditional(double[][] u, byte[][] present, int[] missing, double[] w, long[] columnWeight, double[][] cross) {
      int p = u.length;
      int n = w.length;
      this.columnWeight = columnWeight;
      this.cross = cross;
      weight = new double[p][];
      sum = new double[p][];
      squares = new double[p][];
      int[][] lists = new int[p][];
      boolean[] overMissing = new boolean[p];
      for (int k = 0; k < p; k++) {
        if (missing[k] == 0) {
          continue;
        }
        overMissing[k] = missing[k] <= n - missing[k];
        int[] list = new int[overMissing[k] ? missing[k] : n - missing[k]];
        int length = 0;
        byte[] pk = present[k];
        for (int i = 0; i < n; i++) {
          if ((pk[i] == 0) == overMissing[k]) {
            list[length++] = i;
          }
        }
        lists[k] = list;
        weight[k] = new double[p];
        sum[k] = new double[p];
        squares[k] = new double[p];
      }
      // Column j outer: its ranks stay in the cache while every list is gathered from them.
      for (int j = 0; j < p; j++) {
        double[] uj = u[j];
        byte[] pj = present[j];
        for (int k = 0; k < p; k++) {
          int[] list = lists[k];
          if (list == null) {
            continue;
          }
          double c = 0.0;
          double s = 0.0;
          double q = 0.0;
          for (int i : list) {
            double wu = w[i] * uj[i];
            c += w[i] * pj[i];
            s += wu;
            q += wu * uj[i];
          }
          if (overMissing[k]) {
            // Totals over j's present rows: weight, sum 0 (ranks centred on their mean), squares.
            weight[k][j] = columnWeight[j] - c;
            sum[k][j] = -s;
            squares[k][j] = cross[j][j] - q;
          } else {
            weight[k][j] = c;
            sum[k][j] = s;
            squares[k][j] = q;
          }
        }
      }
    }

    /**
     * Rho of columns j and k over the rows where both are present, or {@link #RECOMPUTE} when
     * the sums are rounded (total weight above 2^17) and the rows present in both keep less than
     * 1/256 of either column's sum of squares: the subtractions could then cancel too many digits.
     */
    double rho(int j, int k, boolean exact) {
      // Sums of column j over the rows where k is present, and of k over the rows where j is.
      double pw = weight[k] == null ? columnWeight[j] : weight[k][j];
      double aj = sum[k] == null ? 0.0 : sum[k][j];
      double qj = squares[k] == null ? cross[j][j] : squares[k][j];
      double ak = sum[j] == null ? 0.0 : sum[j][k];
      double qk = squares[j] == null ? cross[k][k] : squares[j][k];
      if (pw < 2) {
        return Double.NaN; // weights are exact integers: at most one row in common
      }
      double vj = qj - aj * (aj / pw);
      double vk = qk - ak * (ak / pw);
      if (!exact) {
        if (!(256 * vj >= cross[j][j]) || !(256 * vk >= cross[k][k])) {
          return RECOMPUTE;
        }
      } else if (vj < 1 || vk < 1) {
        // Exact sums: a column constant over these rows gives exactly 0; otherwise the weighted
        // sum of squared deviations of doubled ranks is at least 2 (groups at least 2 apart).
        return Double.NaN;
      }
      return clamp((cross[j][k] - aj * (ak / pw)) / Math.sqrt(vj * vk));
    }
  }

  /** Two passes over the rows present in both columns of a pair (total weight above 2^17). */
  private static final class Gathered {
    final double[] bw;
    final double[] ba;
    final double[] bb;

    Gathered(int n) {
      bw = new double[n];
      ba = new double[n];
      bb = new double[n];
    }

    double rho(double[] ua, byte[] pa, double[] ub, byte[] pb, double[] w) {
      int n = w.length;
      // Each row is written at the next free place, which advances only when both are present.
      int m = 0;
      for (int i = 0; i < n; i++) {
        bw[m] = w[i];
        ba[m] = ua[i];
        bb[m] = ub[i];
        m += pa[i] & pb[i];
      }
      if (m < 2) {
        return Double.NaN;
      }
      double a0 = ba[0];
      double b0 = bb[0];
      boolean aVaries = false;
      boolean bVaries = false;
      double sw = 0.0;
      double sa = 0.0;
      double sb = 0.0;
      for (int t = 0; t < m; t++) {
        aVaries |= ba[t] != a0;
        bVaries |= bb[t] != b0;
        sw += bw[t];
        sa += bw[t] * ba[t];
        sb += bw[t] * bb[t];
      }
      // Decided on the integer ranks themselves: rounded sums need not show an exact 0.
      if (!aVaries || !bVaries) {
        return Double.NaN;
      }
      double meanA = sa / sw;
      double meanB = sb / sw;
      double sab = 0.0;
      double saa = 0.0;
      double sbb = 0.0;
      for (int t = 0; t < m; t++) {
        double da = ba[t] - meanA;
        double db = bb[t] - meanB;
        double wda = bw[t] * da;
        sab += wda * db;
        saa += wda * da;
        sbb += bw[t] * db * db;
      }
      return clamp(sab / Math.sqrt(saa * sbb));
    }
  }

  private static double clamp(double r) {
    return Math.max(-1.0, Math.min(1.0, r));
  }
}
