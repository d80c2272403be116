package dev.sluice.profile;

import static org.apache.spark.sql.functions.lit;

import dev.sluice.config.QuantileSketch;
import dev.sluice.stats.QuantileGrid;
import org.apache.datasketches.kll.KllSketch;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.functions;

/**
 * Which quantile function a run uses and at which probabilities.
 *
 * <p>Exact: Spark's {@code percentile}, Hyndman and Fan type 7 (linear interpolation between order
 * statistics). Approximate, with the GK sketch: Spark's {@code percentile_approx}
 * (Greenwald-Khanna), which returns a sample value whose normalized rank is within {@code
 * relativeError} of the one asked for, always. With the KLL sketch: Spark's {@code
 * kll_sketch_agg_double} and {@code kll_sketch_get_quantile_double} (Apache DataSketches), with
 * the smallest {@code k} whose published single-sided rank error is at most {@code relativeError};
 * that bound holds with 99 % confidence, and the sketch's random compaction makes the result vary
 * slightly from run to run.
 *
 * <p>The probabilities are Q1, median, Q3 followed by the grid 0, 1/G, ..., 1.
 */
public record QuantileSpec(boolean exact, double relativeError, int gridSize, QuantileSketch sketch) {
  public static final String EXACT = "exact-type7";
  public static final String APPROX = "approx-gk";
  public static final String APPROX_KLL = "approx-kll";
  /** The largest k Spark's kll_sketch_agg functions accept. */
  static final int KLL_MAX_K = 65535;

  public QuantileSpec(boolean exact, double relativeError, int gridSize) {
    this(exact, relativeError, gridSize, QuantileSketch.GK);
  }

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
    if (sketch == QuantileSketch.KLL) {
      // An empty KLL sketch cannot be queried: no values give null, as percentile_approx does.
      Column quantiles = functions.call_function("kll_sketch_get_quantile_double",
          functions.call_function("kll_sketch_agg_double", values, lit(kllK())), probs);
      return functions.when(functions.count(values).gt(0), quantiles);
    }
    return functions.percentile_approx(values, probs, lit(accuracy()));
  }

  /** The smallest KLL k whose single-sided normalized rank error is at most the relative error. */
  public int kllK() {
    return kllK(relativeError);
  }

  static int kllK(double relativeError) {
    int lo = 8;
    int hi = KLL_MAX_K;
    if (KllSketch.getNormalizedRankError(hi, false) > relativeError) {
      throw new IllegalArgumentException(
          "The KLL sketch cannot reach a rank error of " + relativeError + " (k at most " + hi + ")");
    }
    while (lo < hi) {
      int mid = (lo + hi) >>> 1;
      if (KllSketch.getNormalizedRankError(mid, false) <= relativeError) {
        hi = mid;
      } else {
        lo = mid + 1;
      }
    }
    return lo;
  }

  /** Spark's accuracy parameter: 1 / relative error. */
  public int accuracy() {
    return (int) Math.ceil(1.0 / relativeError);
  }

  public String method() {
    return exact ? EXACT : sketch == QuantileSketch.KLL ? APPROX_KLL : APPROX;
  }

  public double rankError() {
    return exact ? 0.0 : relativeError;
  }
}
