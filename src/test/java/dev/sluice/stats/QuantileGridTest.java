package dev.sluice.stats;

import dev.sluice.testing.ReferenceData;
import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;
import static org.assertj.core.api.Assertions.within;

import java.util.Arrays;
import java.util.Random;
import org.apache.commons.math3.stat.correlation.PearsonsCorrelation;
import org.apache.commons.math3.stat.correlation.SpearmansCorrelation;
import org.apache.commons.math3.stat.descriptive.rank.Percentile;
import org.apache.commons.math3.stat.descriptive.rank.Percentile.EstimationType;
import org.junit.jupiter.api.Test;

class QuantileGridTest {
  private static final double INF = Double.POSITIVE_INFINITY;

  /** A type 7 grid holding every order statistic: probabilities (k - 1) / (n - 1). */
  static QuantileGrid fullGrid(double[] data) {
    double[] values = data.clone();
    Arrays.sort(values);
    return new QuantileGrid(QuantileGrid.evenProbabilities(values.length - 1), values);
  }

  private static double[] midRanks(double[] data) {
    QuantileGrid grid = fullGrid(data);
    return Arrays.stream(data).map(grid::midRank).toArray();
  }

  // Spearman's rho on NIST StRD Longley (REFERENCES.md S, as in Commons Math's tests, checked
  // against R): y-x1 0.982352941176471, x3-x4 -0.3411764705882353. Pearson by Commons Math.
  @Test
  void pearsonOfMidRanksIsSpearmanOnLongley() {
    double[][] rows = ReferenceData.longleyRows();
    PearsonsCorrelation pearson = new PearsonsCorrelation();
    double yx1 = pearson.correlation(midRanks(ReferenceData.column(rows, 0)), midRanks(ReferenceData.column(rows, 1)));
    double x3x4 = pearson.correlation(midRanks(ReferenceData.column(rows, 3)), midRanks(ReferenceData.column(rows, 4)));

    assertThat(yx1).isCloseTo(0.982352941176471, within(1e-14));
    assertThat(x3x4).isCloseTo(-0.3411764705882353, within(1e-14));
  }

  // Reference: Commons Math SpearmansCorrelation (natural ranking, ties averaged) on generated data
  // with many ties.
  @Test
  void pearsonOfMidRanksIsSpearmanWithTies() {
    Random random = new Random(20240611L);
    double[] a = random.ints(60, 0, 7).asDoubleStream().toArray();
    double[] b = new double[a.length];
    for (int i = 0; i < a.length; i++) {
      b[i] = Math.floor(a[i] / 2) + random.nextInt(3);
    }
    double expected = new SpearmansCorrelation().correlation(a, b);
    assertThat(new PearsonsCorrelation().correlation(midRanks(a), midRanks(b))).isCloseTo(expected, within(1e-13));
  }

  // Reference: Commons Math Percentile R_7; a full order-statistic grid interpolates exactly as
  // type 7 does.
  @Test
  void quantileOfFullGridIsType7() {
    double[] data = new Random(99L).doubles(37, -3, 9).toArray();
    QuantileGrid grid = fullGrid(data);
    for (double p : new double[] {0.001, 0.05, 0.25, 0.4, 0.5, 0.77, 0.95, 1.0}) {
      double r7 = new Percentile().withEstimationType(EstimationType.R_7).evaluate(data, 100 * p);
      assertThat(grid.quantile(p)).as("p = %s", p).isCloseTo(r7, within(1e-12));
    }
  }

  // Hand-derived from the definition: grid p = 0, .5, 1 over values 0, 10, 20 is the line p = x / 20.
  @Test
  void interpolatesBetweenGridPoints() {
    QuantileGrid grid = new QuantileGrid(new double[] {0.0, 0.5, 1.0}, new double[] {0, 10, 20});
    assertThat(grid.quantile(0.25)).isCloseTo(5.0, within(1e-15));
    assertThat(grid.quantile(0.5)).isEqualTo(10.0);
    assertThat(grid.midRank(5.0)).isCloseTo(0.25, within(1e-15));
    assertThat(grid.midRank(15.0)).isCloseTo(0.75, within(1e-15));
    assertThat(grid.midRank(-1.0)).isZero();
    assertThat(grid.midRank(0.0)).isZero();
    assertThat(grid.midRank(20.0)).isEqualTo(1.0);
    assertThat(grid.midRank(21.0)).isEqualTo(1.0);
    assertThat(grid.midRank(Double.NaN)).isNaN();
  }

  // Hand-derived: values 1, 2, 2, 2, 3 at p = 0, .25, .5, .75, 1 are flat at 2 over [.25, .75],
  // so the mid-rank of 2 is .5; 1.5 lies halfway up the first segment, p = .125.
  @Test
  void flatStretchTakesItsMidpoint() {
    QuantileGrid grid = new QuantileGrid(QuantileGrid.evenProbabilities(4), new double[] {1, 2, 2, 2, 3});
    assertThat(grid.midRank(2.0)).isCloseTo(0.5, within(1e-15));
    assertThat(grid.midRank(1.5)).isCloseTo(0.125, within(1e-15));
    assertThat(grid.midRank(2.5)).isCloseTo(0.875, within(1e-15));
  }

  @Test
  void constantColumnHasMidRankOneHalf() {
    QuantileGrid grid = new QuantileGrid(QuantileGrid.evenProbabilities(3), new double[] {4, 4, 4, 4});
    assertThat(grid.midRank(4.0)).isEqualTo(0.5);
  }

  // Hand-derived from the javadoc on the line p = x / 20 capped to [5, 15]: mid-rank of the upper
  // point mass (0.75 + 1) / 2, of the lower point mass 0.25 / 2.
  @Test
  void midRankAfterCapUsesThePointMassesAtTheLimits() {
    QuantileGrid grid = new QuantileGrid(new double[] {0.0, 0.5, 1.0}, new double[] {0, 10, 20});
    assertThat(grid.midRankAfterCap(17.0, 5.0, 15.0)).isCloseTo(0.875, within(1e-15));
    assertThat(grid.midRankAfterCap(15.0, 5.0, 15.0)).isCloseTo(0.875, within(1e-15));
    assertThat(grid.midRankAfterCap(2.0, 5.0, 15.0)).isCloseTo(0.125, within(1e-15));
    assertThat(grid.midRankAfterCap(10.0, 5.0, 15.0)).isCloseTo(0.5, within(1e-15));
    assertThat(grid.midRankAfterCap(2.0, -INF, INF)).isCloseTo(0.1, within(1e-15));
    assertThat(grid.midRankAfterCap(2.0, -INF, 15.0)).isCloseTo(0.1, within(1e-15));
  }

  @Test
  void midRankAfterCapRejectsCrossedLimits() {
    QuantileGrid grid = new QuantileGrid(new double[] {0.0, 1.0}, new double[] {0, 1});
    assertThatThrownBy(() -> grid.midRankAfterCap(0.5, 0.7, 0.2)).isInstanceOf(IllegalArgumentException.class);
    assertThatThrownBy(() -> grid.midRankAfterCap(0.5, Double.NaN, 0.2)).isInstanceOf(IllegalArgumentException.class);
  }

  @Test
  void evenProbabilitiesEndExactlyAtOne() {
    assertThat(QuantileGrid.evenProbabilities(4)).containsExactly(0.0, 0.25, 0.5, 0.75, 1.0);
    assertThat(QuantileGrid.evenProbabilities(1)).containsExactly(0.0, 1.0);
    double[] many = QuantileGrid.evenProbabilities(999);
    assertThat(many[999]).isEqualTo(1.0);
    assertThatThrownBy(() -> QuantileGrid.evenProbabilities(0)).isInstanceOf(IllegalArgumentException.class);
  }

  @Test
  void arraysAreCopiedInAndOut() {
    double[] ps = {0.0, 1.0};
    double[] vs = {1.0, 2.0};
    QuantileGrid grid = new QuantileGrid(ps, vs);
    vs[1] = 100.0;
    grid.values()[0] = -100.0;
    assertThat(grid.values()).containsExactly(1.0, 2.0);
    assertThat(grid.probabilities()).containsExactly(0.0, 1.0);
  }

  @Test
  void rejectsInvalidGrids() {
    assertGridRejected(new double[] {0.0, 1.0}, new double[] {1.0});
    assertGridRejected(new double[] {0.0}, new double[] {1.0});
    assertGridRejected(new double[] {0.1, 1.0}, new double[] {1.0, 2.0});
    assertGridRejected(new double[] {0.0, 0.9}, new double[] {1.0, 2.0});
    assertGridRejected(new double[] {0.0, 0.5, 0.5, 1.0}, new double[] {1.0, 2.0, 3.0, 4.0});
    assertGridRejected(new double[] {0.0, 0.5, 1.0}, new double[] {1.0, 0.5, 3.0});
    assertGridRejected(new double[] {0.0, 0.5, 1.0}, new double[] {1.0, Double.NaN, 3.0});
    assertGridRejected(new double[] {0.0, 0.5, 1.0}, new double[] {1.0, 2.0, INF});
    QuantileGrid grid = new QuantileGrid(new double[] {0.0, 1.0}, new double[] {0, 1});
    assertThatThrownBy(() -> grid.quantile(1.5)).isInstanceOf(IllegalArgumentException.class);
    assertThatThrownBy(() -> grid.quantile(Double.NaN)).isInstanceOf(IllegalArgumentException.class);
  }

  private static void assertGridRejected(double[] ps, double[] vs) {
    assertThatThrownBy(() -> new QuantileGrid(ps, vs)).isInstanceOf(IllegalArgumentException.class);
  }

  /**
   * Reference: Commons Math Percentile (R_7) on the data after the outlier step, done by hand
   * (clamped for cap, filtered for removal). The grid is a coarse 1000-interval one, so the check
   * is on rank: the answer's rank among the remaining values is within 0.002 of the one asked for.
   */
  @Test
  void quantileWithinLimitsMatchesTheTreatedDataOnACoarseGrid() {
    Random random = new Random(11);
    double[] data = new double[20_001];
    for (int i = 0; i < data.length; i++) {
      data[i] = Math.exp(random.nextGaussian());
    }
    Percentile r7 = new Percentile().withEstimationType(EstimationType.R_7);
    double[] ps = QuantileGrid.evenProbabilities(1000);
    double[] vs = new double[ps.length];
    for (int i = 0; i < ps.length; i++) {
      vs[i] = ps[i] == 0 ? Arrays.stream(data).min().getAsDouble() : r7.evaluate(data, ps[i] * 100);
    }
    QuantileGrid grid = new QuantileGrid(ps, vs);
    double lo = 0.4;
    double hi = 2.5;
    double[] removed = Arrays.stream(data).filter(x -> x >= lo && x <= hi).sorted().toArray();
    double[] capped = Arrays.stream(data).map(x -> Math.min(hi, Math.max(lo, x))).sorted().toArray();
    for (double p : new double[] {0.25, 0.5, 0.75}) {
      assertThat(rank(removed, grid.quantileWithin(p, lo, hi, false))).isCloseTo(p, within(0.002));
      assertThat(rank(capped, grid.quantileWithin(p, lo, hi, true))).isCloseTo(p, within(0.002));
    }
    assertThat(grid.quantileWithin(0.5, Double.NEGATIVE_INFINITY, INF, false))
        .isEqualTo(grid.quantile(0.5));
    assertThat(grid.quantileWithin(0.99, lo, hi, true)).isEqualTo(hi);
    assertThatThrownBy(() -> grid.quantileWithin(0.5, 2.0, 1.0, true))
        .isInstanceOf(IllegalArgumentException.class);
  }

  /** Fraction of the sorted values below x, plus half of those equal to it. */
  private static double rank(double[] sorted, double x) {
    long below = Arrays.stream(sorted).filter(v -> v < x).count();
    long equal = Arrays.stream(sorted).filter(v -> v == x).count();
    return (below + equal / 2.0) / sorted.length;
  }
}
