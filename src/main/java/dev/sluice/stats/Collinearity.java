package dev.sluice.stats;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.Comparator;
import java.util.List;
import org.apache.commons.math3.linear.DecompositionSolver;
import org.apache.commons.math3.linear.LUDecomposition;
import org.apache.commons.math3.linear.MatrixUtils;
import org.apache.commons.math3.linear.RealMatrix;
import org.apache.commons.math3.linear.RealVector;

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
    List<Integer> independent = new ArrayList<>();
    List<Dependence> dependences = new ArrayList<>();
    double[] vif = new double[columns.size()];
    Arrays.fill(vif, Double.NaN);
    for (int j : usableColumns(correlation)) {
      List<Integer> on = dependenceOn(j, independent, correlation);
      if (on == null) {
        independent.add(j);
      } else {
        vif[j] = Double.POSITIVE_INFINITY;
        dependences.add(new Dependence(columns.get(j), on.stream().map(columns::get).toList()));
      }
    }
    fillVif(vif, independent, correlation);
    return new VifResult(List.copyOf(columns), vif, List.copyOf(dependences));
  }

  /**
   * Drops the column with the highest VIF (later column on ties), recomputes, and repeats until
   * every remaining VIF is at or under {@code limit}. Returns the dropped columns in order.
   * Columns left out of the VIF (NaN) are never dropped.
   *
   * @throws IllegalArgumentException for a limit under 1 (every VIF is at least 1) or NaN
   */
  public static List<String> suggestDrops(List<String> columns, double[][] correlation, double limit) {
    checkShape(columns, correlation);
    if (!(limit >= 1.0)) {
      throw new IllegalArgumentException("Cannot limit VIF to " + limit + ": the limit must be 1 or more");
    }
    List<Integer> kept = new ArrayList<>();
    for (int i = 0; i < columns.size(); i++) {
      kept.add(i);
    }
    List<String> dropped = new ArrayList<>();
    while (true) {
      double[] vif = vif(kept.stream().map(columns::get).toList(), select(correlation, kept)).vif();
      int worst = highest(vif);
      if (worst < 0 || vif[worst] <= limit) {
        return List.copyOf(dropped);
      }
      dropped.add(columns.get(kept.remove(worst)));
    }
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

  /**
   * The independent columns that column j depends on (non-negligible coefficients of its exact
   * regression on them), or null when 1 - R^2 reaches the tolerance.
   */
  private static List<Integer> dependenceOn(int j, List<Integer> independent, double[][] correlation) {
    if (independent.isEmpty()) {
      return null;
    }
    RealVector target = MatrixUtils.createRealVector(row(correlation, j, independent));
    RealVector beta = solver(correlation, independent).solve(target);
    double unexplained = (correlation[j][j] - beta.dotProduct(target)) / correlation[j][j];
    if (unexplained >= SINGULAR_TOLERANCE) {
      return null;
    }
    double largest = beta.getLInfNorm();
    List<Integer> on = new ArrayList<>();
    for (int i = 0; i < independent.size(); i++) {
      if (Math.abs(beta.getEntry(i)) > NEGLIGIBLE_COEFFICIENT * largest) {
        on.add(independent.get(i));
      }
    }
    return on;
  }

  private static void fillVif(double[] vif, List<Integer> independent, double[][] correlation) {
    if (independent.isEmpty()) {
      return;
    }
    RealMatrix inverse = solver(correlation, independent).getInverse();
    for (int i = 0; i < independent.size(); i++) {
      vif[independent.get(i)] = inverse.getEntry(i, i);
    }
  }

  private static DecompositionSolver solver(double[][] correlation, List<Integer> columns) {
    // The independent set passed the tolerance column by column, so no pivot is near zero.
    return new LUDecomposition(MatrixUtils.createRealMatrix(select(correlation, columns)), 0.0).getSolver();
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

  /** Index of the highest non-NaN value, the later one on ties; -1 when all are NaN. */
  private static int highest(double[] values) {
    int best = -1;
    for (int i = 0; i < values.length; i++) {
      if (!Double.isNaN(values[i]) && (best < 0 || values[i] >= values[best])) {
        best = i;
      }
    }
    return best;
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
