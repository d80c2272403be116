package dev.sluice.stats;

import java.io.Serializable;

/**
 * Mergeable sums of products of p columns that may hold missing values, from which the
 * covariance and Pearson correlation of the columns <em>after</em> constant imputation can be
 * computed exactly, for imputation values chosen only after the data has been read.
 *
 * <p>Each value is shifted by a per-column centre given at construction (for instance a
 * first-pass median) before it is summed, which keeps the sums of products small and accurate.
 * For columns j, k it keeps n_j (present count), S_j (sum of shifted present values), and the
 * p x p matrices P (both present), B (sum of shifted x_j where both present) and A (sum of shifted
 * x_j x_k where both present). With u_j the column imputed with c_j:
 *
 * <pre>
 *   sum u_j u_k = A_jk + c'_k (S_j - B_jk) + c'_j (S_k - B_kj) + c'_j c'_k (N - n_j - n_k + P_jk)
 * </pre>
 *
 * where c'_j is the shifted imputation value. Merging is element-wise addition.
 */
public final class CoMoments implements Serializable {
  private static final long serialVersionUID = 1L;

  public CoMoments(double[] centres) {
    throw new UnsupportedOperationException("todo");
  }

  public int dimension() {
    throw new UnsupportedOperationException("todo");
  }

  /** Adds one row; NaN in {@code values} marks a missing entry. The array is not retained. */
  public void add(double[] values) {
    throw new UnsupportedOperationException("todo");
  }

  /** Adds the other accumulator's sums into this one and returns this. */
  public CoMoments merge(CoMoments other) {
    throw new UnsupportedOperationException("todo");
  }

  public long rows() {
    throw new UnsupportedOperationException("todo");
  }

  /**
   * The sample covariance matrix (n - 1) of the columns after each missing entry of column j is
   * replaced by {@code imputed[j]}. A NaN imputation value means the column is not imputed: its
   * covariances are then taken over the rows where the pair is present (pairwise complete).
   */
  public double[][] covariance(double[] imputed) {
    throw new UnsupportedOperationException("todo");
  }

  /**
   * Pearson correlation from {@link #covariance}, clamped to [-1, 1]; NaN for a pair where either
   * column has zero variance. The diagonal is 1 (NaN for a zero-variance column).
   */
  public double[][] correlation(double[] imputed) {
    throw new UnsupportedOperationException("todo");
  }
}
