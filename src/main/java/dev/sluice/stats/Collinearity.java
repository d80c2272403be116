package dev.sluice.stats;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.Comparator;
import java.util.List;

/**
 * Variance inflation factors from a correlation matrix, detection of exact linear dependence, and
 * the greedy drop set.
 *
 * <p>VIF_j is the j-th diagonal entry of the inverse correlation matrix, equal to 1 / (1 - R_j^2)
 * where R_j^2 is from regressing column j on the others. A column is taken as an exact linear
 * combination of others when 1 - R_j^2 falls under {@link #SINGULAR_TOLERANCE}; its VIF is then
 * {@code +Infinity} and the result names the columns it depends on.
 *
 * <p>Dependence is found by taking the columns in input order and regressing each on the
 * independent ones before it, so of a dependent set the <em>later</em> column is the one named
 * dependent. Edge cases: no columns give an empty result; a single usable column has VIF 1.
 */
public final class Collinearity {
  /** Tolerance on 1 - R^2 below which a column counts as an exact linear combination. */
  public static final double SINGULAR_TOLERANCE = 1e-10;

  /** A regression coefficient this small relative to the largest does not name its column. */
  private static final double NEGLIGIBLE_COEFFICIENT = 1e-6;

  private Collinearity() {}

  /** One exact dependence: {@code column} is a linear combination of {@code on}. */
  public record Dependence(String column, List<String> on) {}

  /**
   * @param vif per column, in input order; +Infinity for an exactly dependent column, NaN for a
   *     column left out because its correlations are NaN (zero variance)
   * @param dependences empty when the matrix is non-singular
   */
  public record VifResult(List<String> columns, double[] vif, List<Dependence> dependences) {
    public boolean singular() {
      return !dependences.isEmpty();
    }
  }

  /** A pair of columns whose |r| reaches the threshold. */
  public record Pair(String a, String b, double r) {}

  /**
   * VIF per column. Columns whose diagonal or any correlation is NaN are left out (VIF NaN). With a
   * singular matrix the dependent columns get +Infinity and the others their VIF computed with the
   * dependent columns removed (which does not change the span the others are regressed on).
   *
   * <p>A NaN diagonal leaves its column out first; then a NaN between two remaining columns leaves
   * out both.
   *
   * @throws IllegalArgumentException when the matrix is not square of the columns' size
   */
  public static VifResult vif(List<String> columns, double[][] correlation) {
    checkShape(columns, correlation);
    double[] vif = new double[columns.size()];
    Arrays.fill(vif, Double.NaN);
    Factor f = Factor.of(correlation, usableColumns(correlation));
    List<Dependence> dependences = new ArrayList<>();
    f.dependent.forEach((j, on) -> {
      vif[j] = Double.POSITIVE_INFINITY;
      dependences.add(new Dependence(columns.get(j), on.stream().map(columns::get).toList()));
    });
    double[][] inverse = f.inverse();
    for (int a = 0; a < f.independent.size(); a++) {
      vif[f.independent.get(a)] = inverse[a][a];
    }
    return new VifResult(List.copyOf(columns), vif, List.copyOf(dependences));
  }

  /**
   * Drops the column with the highest VIF (later column on ties), recomputes, and repeats until
   * every remaining VIF is at or under {@code limit}. Returns the dropped columns in order.
   * Columns left out of the VIF (NaN) are never dropped.
   *
   * <p>Exactly dependent columns have infinite VIF and go first, the latest first; dropping one
   * leaves the others' dependence on earlier independent columns intact. On the non-singular rest
   * each drop updates the inverse matrix in O(p^2) (the inverse of a principal submatrix follows
   * from the full inverse), so the whole search costs one factorization.
   *
   * @throws IllegalArgumentException for a limit under 1 (every VIF is at least 1) or NaN
   */
  public static List<String> suggestDrops(List<String> columns, double[][] correlation, double limit) {
    checkShape(columns, correlation);
    if (!(limit >= 1.0)) {
      throw new IllegalArgumentException("Cannot limit VIF to " + limit + ": the limit must be 1 or more");
    }
    Factor f = Factor.of(correlation, usableColumns(correlation));
    List<String> dropped = new ArrayList<>();
    List<Integer> dependent = new ArrayList<>(f.dependent.keySet());
    dependent.sort(Comparator.reverseOrder());
    dependent.forEach(j -> dropped.add(columns.get(j)));
    List<Integer> kept = new ArrayList<>(f.independent);
    double[][] inverse = f.inverse();
    while (!kept.isEmpty()) {
      int worst = 0;
      for (int a = 1; a < kept.size(); a++) {
        if (inverse[a][a] >= inverse[worst][worst]) {
          worst = a;
        }
      }
      if (inverse[worst][worst] <= limit) {
        break;
      }
      dropped.add(columns.get(kept.remove(worst)));
      inverse = withoutIndex(inverse, worst);
    }
    return List.copyOf(dropped);
  }

  /**
   * The inverse of the matrix with row and column k removed, from the inverse S of the whole:
   * S' = S_(-k,-k) - S_(-k,k) S_(k,-k) / S_kk.
   */
  static double[][] withoutIndex(double[][] s, int k) {
    int n = s.length - 1;
    double[][] out = new double[n][n];
    for (int i = 0, a = 0; i <= n; i++) {
      if (i == k) {
        continue;
      }
      for (int j = 0, b = 0; j <= n; j++) {
        if (j != k) {
          out[a][b++] = s[i][j] - s[i][k] * s[k][j] / s[k][k];
        }
      }
      a++;
    }
    return out;
  }

  /**
   * The pairs (i < j) with |r| >= threshold, strongest first, ties in column order. NaN
   * correlations never qualify.
   *
   * @throws IllegalArgumentException for a NaN threshold
   */
  public static List<Pair> strongPairs(List<String> columns, double[][] correlation, double threshold) {
    checkShape(columns, correlation);
    if (Double.isNaN(threshold)) {
      throw new IllegalArgumentException("Cannot compare correlations with a NaN threshold");
    }
    List<Pair> pairs = new ArrayList<>();
    for (int i = 0; i < columns.size(); i++) {
      for (int j = i + 1; j < columns.size(); j++) {
        double r = correlation[i][j];
        if (Math.abs(r) >= threshold) {
          pairs.add(new Pair(columns.get(i), columns.get(j), r));
        }
      }
    }
    // A stable sort keeps the column order among equal strengths.
    pairs.sort(Comparator.comparingDouble((Pair pair) -> Math.abs(pair.r())).reversed());
    return List.copyOf(pairs);
  }

  /** Leaves out NaN-diagonal columns, then both ends of any NaN correlation among the rest. */
  private static List<Integer> usableColumns(double[][] correlation) {
    List<Integer> candidates = new ArrayList<>();
    for (int i = 0; i < correlation.length; i++) {
      if (!Double.isNaN(correlation[i][i])) {
        candidates.add(i);
      }
    }
    List<Integer> usable = new ArrayList<>();
    for (int i : candidates) {
      boolean clean = candidates.stream().noneMatch(k -> Double.isNaN(correlation[i][k]));
      if (clean) {
        usable.add(i);
      }
    }
    return usable;
  }

  private static double[][] select(double[][] matrix, List<Integer> indices) {
    double[][] result = new double[indices.size()][];
    for (int a = 0; a < indices.size(); a++) {
      result[a] = row(matrix, indices.get(a), indices);
    }
    return result;
  }

  private static double[] row(double[][] matrix, int i, List<Integer> indices) {
    double[] result = new double[indices.size()];
    for (int b = 0; b < indices.size(); b++) {
      result[b] = matrix[i][indices.get(b)];
    }
    return result;
  }

  private static void checkShape(List<String> columns, double[][] correlation) {
    boolean square = correlation.length == columns.size()
        && Arrays.stream(correlation).allMatch(r -> r.length == columns.size());
    if (!square) {
      throw new IllegalArgumentException(
          "Need a " + columns.size() + " x " + columns.size() + " correlation matrix for " + columns);
    }
  }
}
