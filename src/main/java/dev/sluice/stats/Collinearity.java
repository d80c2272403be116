package dev.sluice.stats;

import java.util.List;

/**
 * Variance inflation factors from a correlation matrix, detection of exact linear dependence, and
 * the greedy drop set.
 *
 * <p>VIF_j is the j-th diagonal entry of the inverse correlation matrix, equal to 1 / (1 - R_j^2)
 * where R_j^2 is from regressing column j on the others. A column is taken as an exact linear
 * combination of others when 1 - R_j^2 falls under {@link #SINGULAR_TOLERANCE}; its VIF is then
 * {@code +Infinity} and the result names the columns it depends on.
 */
public final class Collinearity {
  /** Tolerance on 1 - R^2 below which a column counts as an exact linear combination. */
  public static final double SINGULAR_TOLERANCE = 1e-10;

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
   */
  public static VifResult vif(List<String> columns, double[][] correlation) {
    throw new UnsupportedOperationException("todo");
  }

  /**
   * Drops the column with the highest VIF (later column on ties), recomputes, and repeats until
   * every remaining VIF is at or under {@code limit}. Returns the dropped columns in order.
   */
  public static List<String> suggestDrops(List<String> columns, double[][] correlation, double limit) {
    throw new UnsupportedOperationException("todo");
  }

  /** The pairs (i < j) with |r| >= threshold, strongest first, ties in column order. */
  public static List<Pair> strongPairs(List<String> columns, double[][] correlation, double threshold) {
    throw new UnsupportedOperationException("todo");
  }
}
