package dev.sluice.stats;

import java.io.Serializable;
import java.util.Arrays;

/**
 * Mergeable moments of p columns that may hold missing values, from which the covariance and
 * Pearson correlation of the columns <em>after</em> constant imputation can be computed exactly,
 * for imputation values chosen only after the data has been read.
 *
 * <p>Each value is shifted by a per-column centre given at construction (for instance a
 * first-pass median) before it is used. For a pair of columns j, k the rows fall into four
 * groups: both present, only j present, only k present, neither present. After imputing c_j and
 * c_k the last three groups have one or two constant coordinates, so the pair's sums of products
 * follow from the per-group counts, means and co-moments of the present values alone, combined by
 * Chan et al.'s pairwise formula at query time. This is algebraically the same as
 *
 * <pre>
 *   sum u_j u_k = A_jk + c'_k (S_j - B_jk) + c'_j (S_k - B_kj) + c'_j c'_k (N - n_j - n_k + P_jk)
 * </pre>
 *
 * (A, B, P the sums of products, sums and counts where both are present; S_j, n_j where j is
 * present; c'_j the shifted imputation value) but keeps means and deviations instead of raw sums,
 * so a poor centre costs only the digits lost in x - centre, not the square of them.
 *
 * <p>Rows without a missing entry, the common case, update one dense mean vector and co-moment
 * matrix (p(p + 1) / 2 multiply-adds, no allocation). A row with a missing entry updates, for each
 * ordered pair (j, k) with j present, the count, mean and squared deviations of x_j over the rows
 * where k is also present or where k is missing, and the co-moment where both are present (p^2
 * cells, one division each). Memory is about 8 p^2 numbers.
 *
 * <p>Edge cases: NaN marks a missing entry; infinite entries and centres are rejected; no rows or
 * one row give NaN covariances. Merging requires the same centres and is cell-by-cell (Chan et
 * al.'s combination, which for counts and sums is plain addition).
 */
public final class CoMoments implements Serializable {
  private static final long serialVersionUID = 1L;

  private final int p;
  private final double[] centres;
  /** Power-of-two factors applied to each column's deviations (see {@link PowerScale}). */
  private final double[] scales;
  private long rows;
  private final CompleteRows complete;
  /** Cell (j, k): x_j over incomplete rows with j and k present; (j, j): rows with j present. */
  private final CellMoments both;
  /** Cell (j, k), j < k: co-moment of x_j and x_k over incomplete rows with both present. */
  private final double[] bothComoment;
  /** Cell (j, k): x_j over the rows with j present and k missing. */
  private final CellMoments alone;
  private transient double[] shifted;

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
    this.scales = scales.clone();
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
    this.complete = new CompleteRows(p);
    this.both = new CellMoments(p * p);
    this.bothComoment = new double[p * p];
    this.alone = new CellMoments(p * p);
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
    double[] s = shiftedBuffer();
    boolean anyMissing = false;
    for (int j = 0; j < p; j++) {
      if (Double.isInfinite(values[j])) {
        throw new IllegalArgumentException("Cannot add the infinite value " + values[j] + " in column " + j);
      }
      s[j] = values[j] * scales[j] - centres[j] * scales[j];
      anyMissing |= Double.isNaN(s[j]);
    }
    rows++;
    if (anyMissing) {
      addIncomplete(s);
    } else {
      complete.add(s);
    }
  }

  /**
   * Adds the other accumulator's sums into this one and returns this.
   *
   * @throws IllegalArgumentException when the other has different centres
   */
  public CoMoments merge(CoMoments other) {
    if (!Arrays.equals(centres, other.centres) || !Arrays.equals(scales, other.scales)) {
      throw new IllegalArgumentException("Cannot merge co-moments kept around different centres");
    }
    rows += other.rows;
    complete.merge(other.complete);
    mergeBothComoments(other);
    both.merge(other.both);
    alone.merge(other.alone);
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

  private void addIncomplete(double[] s) {
    for (int j = 0; j < p; j++) {
      if (Double.isNaN(s[j])) {
        continue;
      }
      both.add(j * p + j, s[j]);
      for (int k = 0; k < p; k++) {
        if (Double.isNaN(s[k])) {
          alone.add(j * p + k, s[j]);
        } else if (j < k) {
          addBothPresent(j, k, s[j], s[k]);
        }
      }
    }
  }

  private void addBothPresent(int j, int k, double xj, double xk) {
    int cell = j * p + k;
    double dj = both.add(cell, xj);
    double dk = both.add(k * p + j, xk);
    long n = both.count[cell];
    bothComoment[cell] += dj * dk * ((n - 1) / (double) n);
  }

  /** Must run before {@code both} is merged: it needs both sides' means. */
  private void mergeBothComoments(CoMoments other) {
    for (int j = 0; j < p; j++) {
      for (int k = j + 1; k < p; k++) {
        int cell = j * p + k;
        long nb = other.both.count[cell];
        if (nb == 0) {
          continue;
        }
        long na = both.count[cell];
        double dj = other.both.mean[cell] - both.mean[cell];
        double dk = other.both.mean[k * p + j] - both.mean[k * p + j];
        bothComoment[cell] += other.bothComoment[cell] + dj * dk * ((double) na * nb / (na + nb));
      }
    }
  }

  /** Combines the groups of rows that count for the pair (j, k) under this imputation. */
  private PairSum pair(int j, int k, double[] imputed) {
    int jk = j * p + k;
    int kj = k * p + j;
    PairSum sum = new PairSum();
    sum.add(complete.count, complete.mean[j], complete.mean[k],
        complete.comoment(j, j), complete.comoment(k, k), complete.comoment(j, k));
    double co = j == k ? both.m2[jk] : bothComoment[Math.min(jk, kj)];
    sum.add(both.count[jk], both.mean[jk], both.mean[kj], both.m2[jk], both.m2[kj], co);
    double cj = imputed[j] * scales[j] - centres[j] * scales[j];
    double ck = imputed[k] * scales[k] - centres[k] * scales[k];
    boolean fillJ = !Double.isNaN(cj);
    boolean fillK = !Double.isNaN(ck);
    if (fillK && j != k) {
      sum.add(alone.count[jk], alone.mean[jk], ck, alone.m2[jk], 0.0, 0.0);
    }
    if (fillJ && j != k) {
      sum.add(alone.count[kj], cj, alone.mean[kj], 0.0, alone.m2[kj], 0.0);
    }
    if (fillJ && fillK) {
      sum.add(neitherPresent(j, k), cj, ck, 0.0, 0.0, 0.0);
    }
    return sum;
  }

  /** N - n_j - n_k + P_jk; for j == k simply the rows where j is missing. */
  private long neitherPresent(int j, int k) {
    long presentJ = complete.count + both.count[j * p + j];
    if (j == k) {
      return rows - presentJ;
    }
    long presentK = complete.count + both.count[k * p + k];
    long presentBoth = complete.count + both.count[j * p + k];
    return rows - presentJ - presentK + presentBoth;
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

  private static double[] ones(int n) {
    double[] one = new double[n];
    Arrays.fill(one, 1.0);
    return one;
  }

  private double[] shiftedBuffer() {
    if (shifted == null) {
      shifted = new double[p];
    }
    return shifted;
  }
}
