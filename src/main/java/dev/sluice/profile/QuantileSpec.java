package dev.sluice.profile;

import static org.apache.spark.sql.functions.lit;

import dev.sluice.stats.QuantileGrid;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.functions;

/**
 * Which quantile function a run uses and at which probabilities.
 *
 * <p>Exact: Spark's {@code percentile}, Hyndman and Fan type 7 (linear interpolation between order
 * statistics). Approximate: Spark's {@code percentile_approx} (Greenwald-Khanna), which returns a
 * sample value whose normalized rank is within {@code relativeError} of the one asked for.
 *
 * <p>The probabilities are Q1, median, Q3 followed by the grid 0, 1/G, ..., 1.
 */
public record QuantileSpec(boolean exact, double relativeError, int gridSize) {
  public static final String EXACT = "exact-type7";
  public static final String APPROX = "approx-gk";

  public double[] probabilities() {
    double[] grid = QuantileGrid.evenProbabilities(gridSize);
    double[] out = new double[grid.length + 3];
    out[0] = 0.25;
    out[1] = 0.5;
    out[2] = 0.75;
    System.arraycopy(grid, 0, out, 3, grid.length);
    return out;
  }

  /** Quartiles only, for the treated-value statistics of pass 2. */
  public Column quartiles(Column values) {
    return of(values, new double[] {0.25, 0.5, 0.75});
  }

  public Column all(Column values) {
    return of(values, probabilities());
  }

  public Column of(Column values, double[] ps) {
    Column probs = lit(ps);
    if (exact) {
      return functions.percentile(values, probs);
    }
    return functions.percentile_approx(values, probs, lit(accuracy()));
  }

  /** Spark's accuracy parameter: 1 / relative error. */
  public int accuracy() {
    return (int) Math.ceil(1.0 / relativeError);
  }

  public String method() {
    return exact ? EXACT : APPROX;
  }

  public double rankError() {
    return exact ? 0.0 : relativeError;
  }
}
