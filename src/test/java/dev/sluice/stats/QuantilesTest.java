package dev.sluice.stats;

import dev.sluice.testing.ReferenceData;
import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;
import static org.assertj.core.api.Assertions.within;

import java.util.Arrays;
import java.util.Random;
import org.apache.commons.math3.stat.descriptive.rank.Percentile;
import org.apache.commons.math3.stat.descriptive.rank.Percentile.EstimationType;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;
import org.junit.jupiter.api.Test;

class QuantilesTest {
  /** NIST e-Handbook 7.2.6.2 "Percentiles", worked example: 12 wafer resistivities. */
  static final double[] WAFERS = {
    95.1772, 95.1567, 95.1937, 95.1959, 95.1442, 95.0610,
    95.1591, 95.1195, 95.1065, 95.0925, 95.1990, 95.1682
  };

  private static double[] sorted(double[] values) {
    double[] copy = values.clone();
    Arrays.sort(copy);
    return copy;
  }

  // NIST e-Handbook 7.2.6.2 (S): the 90th percentile by its method (Hyndman-Fan type 6) is
  // 95.1981, printed to 4 decimals.
  @Test
  void type6MatchesNistWaferExample() {
    assertThat(Quantiles.type6(sorted(WAFERS), 0.90)).isCloseTo(95.1981, within(0.00005));
  }

  // Derived (REFERENCES.md, D) from the NIST wafer data by the type 7 definition:
  // Q1 = x3 + 0.75 (x4 - x3) = 95.11625, median = (x6 + x7) / 2 = 95.1579, Q3 = x9 + 0.25 (x10 - x9).
  @Test
  void type7MatchesDerivedWaferQuartiles() {
    double[] s = sorted(WAFERS);
    assertThat(Quantiles.type7(s, 0.25)).isCloseTo(95.11625, within(1e-9));
    assertThat(Quantiles.type7(s, 0.50)).isCloseTo(95.1579, within(1e-9));
    assertThat(Quantiles.type7(s, 0.75)).isCloseTo(95.181325, within(1e-9));
  }

  // Reference: Commons Math 3 Percentile with EstimationType.R_7 / R_6 (Hyndman-Fan types 7 and 6)
  // on generated data, with and without ties. Commons takes p in (0, 100].
  @ParameterizedTest(name = "n = {0}")
  @ValueSource(ints = {1, 2, 3, 4, 7, 10, 50, 101})
  void matchesCommonsMathPercentile(int n) {
    Random random = new Random(7919L * n);
    double[] smooth = random.doubles(n, -50, 50).toArray();
    double[] tied = random.ints(n, 0, 4).asDoubleStream().toArray();
    for (double[] data : new double[][] {smooth, tied}) {
      double[] s = sorted(data);
      for (double p : new double[] {0.001, 0.01, 0.1, 0.25, 1.0 / 3, 0.5, 0.75, 0.9, 0.99, 1.0}) {
        double r7 = new Percentile().withEstimationType(EstimationType.R_7).evaluate(data, 100 * p);
        double r6 = new Percentile().withEstimationType(EstimationType.R_6).evaluate(data, 100 * p);
        assertThat(Quantiles.type7(s, p)).as("type 7 at %s", p).isCloseTo(r7, within(1e-12));
        assertThat(Quantiles.type6(s, p)).as("type 6 at %s", p).isCloseTo(r6, within(1e-12));
      }
    }
  }

  // By both definitions the quantile at p = 0 is the smallest value and at p = 1 the largest.
  @Test
  void extremeProbabilitiesGiveMinimumAndMaximum() {
    double[] s = sorted(WAFERS);
    assertThat(Quantiles.type7(s, 0.0)).isEqualTo(95.0610);
    assertThat(Quantiles.type6(s, 0.0)).isEqualTo(95.0610);
    assertThat(Quantiles.type7(s, 1.0)).isEqualTo(95.1990);
    assertThat(Quantiles.type6(s, 1.0)).isEqualTo(95.1990);
  }

  // NIST StRD NumAcc2 (1.2, then 500 x 1.1 and 500 x 1.3): every quantile type gives Q1 1.1,
  // median 1.2, Q3 1.3 (REFERENCES.md, D).
  @Test
  void numAcc2QuartilesAreDefinitionFree() {
    double[] data = ReferenceData.strd("NumAcc2").data();
    assertThat(Quantiles.type7Of(data, 0.25, 0.5, 0.75)).containsExactly(1.1, 1.2, 1.3);
    double[] s = sorted(data);
    assertThat(new double[] {Quantiles.type6(s, 0.25), Quantiles.type6(s, 0.5), Quantiles.type6(s, 0.75)})
        .containsExactly(1.1, 1.2, 1.3);
  }

  @Test
  void singleValueIsEveryQuantile() {
    assertThat(Quantiles.type7(new double[] {3.25}, 0.37)).isEqualTo(3.25);
    assertThat(Quantiles.type6(new double[] {3.25}, 0.99)).isEqualTo(3.25);
  }

  @Test
  void allEqualValuesGiveThatValue() {
    assertThat(Quantiles.type7Of(new double[] {0.1, 0.1, 0.1, 0.1}, 0.0, 0.3, 0.5, 1.0))
        .containsExactly(0.1, 0.1, 0.1, 0.1);
  }

  @Test
  void type7OfLeavesItsInputUnsorted() {
    double[] data = {3, 1, 2};
    Quantiles.type7Of(data, 0.5);
    assertThat(data).containsExactly(3, 1, 2);
  }

  @Test
  void rejectsEmptyInputAndBadProbabilities() {
    assertThatThrownBy(() -> Quantiles.type7(new double[0], 0.5))
        .isInstanceOf(IllegalArgumentException.class).hasMessage("Cannot take a quantile of no values");
    assertThatThrownBy(() -> Quantiles.type6(new double[0], 0.5)).isInstanceOf(IllegalArgumentException.class);
    for (double p : new double[] {-0.01, 1.01, Double.NaN}) {
      assertThatThrownBy(() -> Quantiles.type7(new double[] {1, 2}, p)).isInstanceOf(IllegalArgumentException.class);
      assertThatThrownBy(() -> Quantiles.type6(new double[] {1, 2}, p)).isInstanceOf(IllegalArgumentException.class);
    }
  }

  @Test
  void type7OfRejectsNaN() {
    assertThatThrownBy(() -> Quantiles.type7Of(new double[] {1, Double.NaN}, 0.5))
        .isInstanceOf(IllegalArgumentException.class).hasMessage("Cannot take quantiles of NaN values");
  }

  @org.junit.jupiter.api.Test
  void aWindowThatHoldsTheOrderStatisticsGivesTheWholeArraysType7() {
    // Reference: type 7 over all twelve NIST wafer values, against windows of them.
    double[] sorted = WAFERS.clone();
    java.util.Arrays.sort(sorted);
    for (double p : new double[] {0.0, 0.25, 0.5, 0.75, 0.9, 1.0}) {
      double whole = Quantiles.type7(sorted, p);
      double h = (sorted.length - 1) * p;
      int from = (int) Math.max(0, Math.floor(h) - 2);
      int to = (int) Math.min(sorted.length, Math.floor(h) + 3);
      double[] window = java.util.Arrays.copyOfRange(sorted, from, to);
      org.assertj.core.api.Assertions.assertThat(Quantiles.type7InWindow(sorted.length, p, from, window))
          .as("p = %s", p).isEqualTo(whole);
    }
    // p = 0.5: h = 5.5 needs order statistics 5 and 6; a window of 2..5 misses the 6th.
    org.assertj.core.api.Assertions.assertThat(
        Quantiles.type7InWindow(12, 0.5, 2, java.util.Arrays.copyOfRange(sorted, 2, 6))).isNaN();
    org.assertj.core.api.Assertions.assertThat(Quantiles.type7InWindow(0, 0.5, 0, new double[0])).isNaN();
  }
}
