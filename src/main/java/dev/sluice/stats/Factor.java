package dev.sluice.stats;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * An incremental Cholesky factorization of a correlation matrix that sets aside exactly dependent
 * columns as it goes: the columns are taken in order, and at step j the squared pivot divided by
 * r_jj is 1 - R_j^2 of column j regressed on the independent columns before it. Under {@link
 * Collinearity#SINGULAR_TOLERANCE} the column is dependent, and back substitution gives the
 * coefficients that name what it depends on. O(p^3) in all, one pass.
 */
final class Factor {
  /** A regression coefficient this small relative to the largest does not name its column. */
  private static final double NEGLIGIBLE_COEFFICIENT = 1e-6;

  final List<Integer> independent = new ArrayList<>();
  /** Dependent column -> the independent columns it is a combination of, in input order. */
  final Map<Integer, List<Integer>> dependent = new LinkedHashMap<>();
  /** Rows of the lower-triangular factor L of the independent columns. */
  private final List<double[]> rows = new ArrayList<>();

  private Factor() {}

  static Factor of(double[][] r, List<Integer> columns) {
    Factor f = new Factor();
    for (int j : columns) {
      f.add(r, j);
    }
    return f;
  }

  private void add(double[][] r, int j) {
    int k = independent.size();
    double[] y = new double[k + 1];
    double explained = 0.0;
    for (int a = 0; a < k; a++) {
      double sum = r[j][independent.get(a)];
      double[] la = rows.get(a);
      for (int b = 0; b < a; b++) {
        sum -= la[b] * y[b];
      }
      y[a] = sum / la[a];
      explained += y[a] * y[a];
    }
    double rest = r[j][j] - explained;
    if (rest / r[j][j] < Collinearity.SINGULAR_TOLERANCE) {
      dependent.put(j, namesOf(backSubstitute(y, k)));
      return;
    }
    y[k] = Math.sqrt(rest);
    rows.add(y);
    independent.add(j);
  }

  /** Solves L^T beta = y: the coefficients of the regression on the independent columns. */
  private double[] backSubstitute(double[] y, int k) {
    double[] beta = new double[k];
    for (int a = k - 1; a >= 0; a--) {
      double sum = y[a];
      for (int b = a + 1; b < k; b++) {
        sum -= rows.get(b)[a] * beta[b];
      }
      beta[a] = sum / rows.get(a)[a];
    }
    return beta;
  }

  private List<Integer> namesOf(double[] beta) {
    double largest = 0.0;
    for (double b : beta) {
      largest = Math.max(largest, Math.abs(b));
    }
    List<Integer> on = new ArrayList<>();
    for (int a = 0; a < beta.length; a++) {
      if (Math.abs(beta[a]) > NEGLIGIBLE_COEFFICIENT * largest) {
        on.add(independent.get(a));
      }
    }
    return on;
  }

  /** The inverse of the independent columns' matrix, (L L^T)^-1 = L^-T L^-1. */
  double[][] inverse() {
    int n = rows.size();
    double[][] linv = new double[n][n];
    for (int i = 0; i < n; i++) {
      linv[i][i] = 1.0 / rows.get(i)[i];
      for (int j = 0; j < i; j++) {
        double sum = 0.0;
        for (int m = j; m < i; m++) {
          sum -= rows.get(i)[m] * linv[m][j];
        }
        linv[i][j] = sum / rows.get(i)[i];
      }
    }
    double[][] inv = new double[n][n];
    for (int i = 0; i < n; i++) {
      for (int j = 0; j <= i; j++) {
        double sum = 0.0;
        for (int m = i; m < n; m++) {
          sum += linv[m][i] * linv[m][j];
        }
        inv[i][j] = sum;
        inv[j][i] = sum;
      }
    }
    return inv;
  }
}
