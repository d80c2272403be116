package dev.sluice.stats;

import java.io.Serializable;

/**
 * Count, mean vector and co-moment matrix (sums of products of deviations) of the rows that have
 * no missing entry, by the multivariate Welford update. The co-moments sit in the upper triangle
 * (j <= k) of a flat row-major p x p array.
 */
final class CompleteRows implements Serializable {
  private static final long serialVersionUID = 1L;

  private final int p;
  long count;
  final double[] mean;
  final double[] comoment;
  private transient double[] deviation;

  CompleteRows(int p) {
    this.p = p;
    mean = new double[p];
    comoment = new double[p * p];
  }

  /** Adds one row of shifted values, none of them NaN; allocates nothing after the first call. */
  void add(double[] row) {
    double[] d = deviations();
    count++;
    for (int j = 0; j < p; j++) {
      d[j] = row[j] - mean[j];
      mean[j] += d[j] / count;
    }
    double weight = (count - 1) / (double) count;
    for (int j = 0; j < p; j++) {
      double dj = d[j] * weight;
      int base = j * p;
      for (int k = j; k < p; k++) {
        comoment[base + k] += dj * d[k];
      }
    }
  }

  /** Chan et al.'s combination with the other part. */
  void merge(CompleteRows other) {
    if (other.count == 0) {
      return;
    }
    long total = count + other.count;
    double share = (double) other.count / total;
    double weight = count * share;
    double[] d = deviations();
    for (int j = 0; j < p; j++) {
      d[j] = other.mean[j] - mean[j];
    }
    for (int j = 0; j < p; j++) {
      for (int k = j; k < p; k++) {
        comoment[j * p + k] += other.comoment[j * p + k] + d[j] * d[k] * weight;
      }
      mean[j] += d[j] * share;
    }
    count = total;
  }

  /** The co-moment of columns j and k in either order. */
  double comoment(int j, int k) {
    return comoment[Math.min(j, k) * p + Math.max(j, k)];
  }

  private double[] deviations() {
    if (deviation == null) {
      deviation = new double[p];
    }
    return deviation;
  }
}
