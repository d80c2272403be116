package dev.sluice.stats;

import java.io.Serializable;

/**
 * Count, mean and sum of squared deviations of one variable in each of many cells, kept in flat
 * arrays and updated by Welford's method; cells merge by Chan et al.'s combination. An empty cell
 * has count 0, mean 0 and m2 0.
 */
final class CellMoments implements Serializable {
  private static final long serialVersionUID = 1L;

  final long[] count;
  final double[] mean;
  final double[] m2;

  CellMoments(int cells) {
    count = new long[cells];
    mean = new double[cells];
    m2 = new double[cells];
  }

  /** Adds x to cell c and returns x's deviation from the cell's mean before the update. */
  double add(int c, double x) {
    long n = ++count[c];
    double d = x - mean[c];
    mean[c] += d / n;
    m2[c] += d * (x - mean[c]);
    return d;
  }

  /** Combines each cell with the other's cell of the same index. */
  void merge(CellMoments other) {
    for (int c = 0; c < count.length; c++) {
      long nb = other.count[c];
      if (nb == 0) {
        continue;
      }
      long total = count[c] + nb;
      double share = (double) nb / total;
      double d = other.mean[c] - mean[c];
      m2[c] += other.m2[c] + d * d * count[c] * share;
      mean[c] += d * share;
      count[c] = total;
    }
  }
}
