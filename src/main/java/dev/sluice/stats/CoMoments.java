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
 * correlation, because they cost no division per cell and vectorize: a row without a missing
 * entry adds p(p + 1) / 2 products to one dense triangle; a row with a missing entry adds, for
 * each present column j, four contiguous rows of p cells (count, sum, square and product with every
 * other column's presence). Rows are added a block at a time so that the cells stay in the
 * cache. Centring on the median keeps the cancellation in sum u^2 - (sum u)^2 / n
 * small: |mean - median| is at most one standard deviation for any distribution, so the relative
 * error of a variance stays within a small multiple of n times the unit roundoff, and usually near
 * its square root. A centre many standard deviations away from the data loses accuracy as the
 * square of that distance. Memory is about 5 p^2 numbers.
 *
 * <p>Edge cases: NaN marks a missing entry; infinite entries and centres are rejected; no rows or
 * one row give NaN covariances. Merging requires the same centres and scales and adds the sums.
 */
public final class CoMoments implements Serializable {
  private static final long serialVersionUID = 2L;

  private final int p;
  private final double[] centres;
  /** Power-of-two factors applied to each column's deviations (see {@link PowerScale}). */
  private final double[] scales;
  private long rows;
  /** Rows with no missing entry: their count, column sums, and products (upper triangle). */
  private long completeRows;
  private final double[] completeSum;
  private final double[] completeProduct;
  /**
   * Rows with a missing entry; cell (j, k) covers those of them where j and k are both present
   * (for k == j: where j is present): the count, the sum and the sum of squares of x_j, and the
   * sum of x_j x_k.
   */
  private final double[] count;
  private final double[] sum;
  private final double[] square;
  private final double[] product;
  /**
   * Rows waiting to be added, a block at a time: each cell row of the sums then stays in the
   * cache while the whole block is added to it, instead of streaming all 4 p^2 cells per row.
   * Flushed before the sums are read, merged or serialized.
   */
  private transient double[][] pendingU;
  private transient double[][] pendingM;
  private transient boolean[] pendingIncomplete;
  private transient int pending;
  private static final int BLOCK = 32;

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
    this.completeSum = new double[p];
    this.completeProduct = new double[p * p];
    this.count = new double[p * p];
    this.sum = new double[p * p];
    this.square = new double[p * p];
    this.product = new double[p * p];
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
    if (pendingU == null) {
      pendingU = new double[BLOCK][p];
      pendingM = new double[BLOCK][p];
      pendingIncomplete = new boolean[BLOCK];
    }
    double[] u = pendingU[pending];
    double[] m = pendingM[pending];
    boolean anyMissing = false;
    for (int j = 0; j < p; j++) {
      double x = values[j];
      if (Double.isInfinite(x)) {
        throw new IllegalArgumentException("Cannot add the infinite value " + x + " in column " + j);
      }
      if (Double.isNaN(x)) {
        u[j] = 0.0;
        m[j] = 0.0;
        anyMissing = true;
      } else {
        u[j] = x * scales[j] - centres[j] * scales[j];
        m[j] = 1.0;
      }
    }
    rows++;
    pendingIncomplete[pending] = anyMissing;
    pending++;
    if (pending == BLOCK) {
      flush();
    }
  }

  /**
   * Adds the pending rows, cell row by cell row. Missing entries have u = 0 and m = 0, so the
   * inner loops need no branch.
   */
  private void flush() {
    if (pending == 0) {
      return;
    }
    for (int j = 0; j < p; j++) {
      int base = j * p;
      for (int r = 0; r < pending; r++) {
        double[] u = pendingU[r];
        double uj = u[j];
        if (!pendingIncomplete[r]) {
          completeSum[j] += uj;
          for (int k = j; k < p; k++) {
            completeProduct[base + k] += uj * u[k];
          }
          continue;
        }
        double[] m = pendingM[r];
        if (m[j] == 0.0) {
          continue;
        }
        double uj2 = uj * uj;
        for (int k = 0; k < p; k++) {
          double mk = m[k];
          count[base + k] += mk;
          sum[base + k] += uj * mk;
          square[base + k] += uj2 * mk;
          product[base + k] += uj * u[k];
        }
      }
    }
    for (int r = 0; r < pending; r++) {
      if (!pendingIncomplete[r]) {
        completeRows++;
      }
    }
    pending = 0;
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
    completeRows += other.completeRows;
    addInto(completeSum, other.completeSum);
    addInto(completeProduct, other.completeProduct);
    addInto(count, other.count);
    addInto(sum, other.sum);
    addInto(square, other.square);
    addInto(product, other.product);
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
   * give NaN.
   *
   * @throws IllegalArgumentException for a vector of the wrong length or an infinite value
   */
  public double[][] covariance(double[] imputed) {
    checkImputed(imputed);
    flush();
    double[][] result = new double[p][p];
    for (int j = 0; j < p; j++) {
      for (int k = j; k < p; k++) {
        result[j][k] = pair(j, k, imputed).covariance() / scales[j] / scales[k];
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
    checkImputed(imputed);
    flush();
    double[][] result = new double[p][p];
    for (int j = 0; j < p; j++) {
      result[j][j] = Double.isNaN(pair(j, j, imputed).correlation()) ? Double.NaN : 1.0;
      for (int k = j + 1; k < p; k++) {
        result[j][k] = pair(j, k, imputed).correlation();
        result[k][j] = result[j][k];
      }
    }
    return result;
  }

  /** Sums over the rows that count for the pair (j, k) under this imputation. */
  private Sums pair(int j, int k, double[] imputed) {
    int jk = j * p + k;
    int kj = k * p + j;
    int jj = j * p + j;
    int kk = k * p + k;
    double cj = imputed[j] * scales[j] - centres[j] * scales[j];
    double ck = imputed[k] * scales[k] - centres[k] * scales[k];
    boolean fillJ = !Double.isNaN(cj);
    boolean fillK = !Double.isNaN(ck);
    Sums s = new Sums();
    // Both present.
    double nBoth = completeRows + count[jk];
    double sjBoth = completeSum[j] + sum[jk];
    double skBoth = completeSum[k] + sum[kj];
    double sjjBoth = completeProduct[jj] + square[jk];
    double skkBoth = completeProduct[kk] + square[kj];
    double sjkBoth = completeProduct[Math.min(jk, kj)] + product[jk];
    s.add(nBoth, sjBoth, skBoth, sjjBoth, skkBoth, sjkBoth);
    if (j == k) {
      if (fillJ) {
        double none = rows - nBoth;
        s.add(none, none * cj, none * cj, none * cj * cj, none * cj * cj, none * cj * cj);
      }
      return s;
    }
    double nJ = completeRows + count[jj];
    double nK = completeRows + count[kk];
    if (fillK) {
      // j present, k missing and filled with ck.
      double n = nJ - nBoth;
      double sj = completeSum[j] + sum[jj] - sjBoth;
      double sjj = completeProduct[jj] + square[jj] - sjjBoth;
      s.add(n, sj, n * ck, sjj, n * ck * ck, ck * sj);
    }
    if (fillJ) {
      double n = nK - nBoth;
      double sk = completeSum[k] + sum[kk] - skBoth;
      double skk = completeProduct[kk] + square[kk] - skkBoth;
      s.add(n, n * cj, sk, n * cj * cj, skk, cj * sk);
    }
    if (fillJ && fillK) {
      double n = rows - nJ - nK + nBoth;
      s.add(n, n * cj, n * ck, n * cj * cj, n * ck * ck, n * cj * ck);
    }
    return s;
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

  private void checkImputed(double[] imputed) {
    if (imputed.length != p) {
      throw new IllegalArgumentException(
          "Cannot impute " + imputed.length + " values into " + p + " columns");
    }
    for (double c : imputed) {
      if (Double.isInfinite(c)) {
        throw new IllegalArgumentException("Cannot impute the infinite value " + c);
      }
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
