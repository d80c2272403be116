package dev.sluice.stats;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;
import static org.assertj.core.api.Assertions.within;

import java.util.Arrays;
import org.apache.commons.math3.stat.descriptive.DescriptiveStatistics;
import org.apache.commons.math3.stat.descriptive.rank.Median;
import org.junit.jupiter.api.Test;

class FencesTest {
  /** NIST e-Handbook 1.3.5.17.1, Grubbs' test example data (sorted as printed). */
  static final double[] GRUBBS = {199.31, 199.53, 200.19, 200.82, 201.92, 201.95, 202.18, 245.57};
  static final double SUSPECT = 245.57;

  private static final double INF = Double.POSITIVE_INFINITY;

  // REFERENCES.md (D) from the NIST Grubbs data, type 7: Q1 200.025, Q3 202.0075, upper inner fence
  // 204.98125, upper outer fence 207.955, so 245.57 is an extreme outlier. Fences after NIST
  // e-Handbook 7.1.6 (k = 1.5 inner, 3 outer; Tukey 1977).
  @Test
  void tukeyFencesOnGrubbsExample() {
    double q1 = Quantiles.type7(GRUBBS, 0.25);
    double q3 = Quantiles.type7(GRUBBS, 0.75);
    assertThat(q1).isCloseTo(200.025, within(1e-9));
    assertThat(q3).isCloseTo(202.0075, within(1e-9));

    Fences inner = Fences.tukey(q1, q3, 1.5);
    Fences outer = Fences.tukey(q1, q3, 3.0);
    assertThat(inner.upper()).isCloseTo(204.98125, within(1e-9));
    assertThat(outer.upper()).isCloseTo(207.955, within(1e-9));
    assertThat(outer.isAbove(SUSPECT)).isTrue();
    assertThat(Arrays.stream(GRUBBS).filter(inner::isAbove)).containsExactly(SUSPECT);
    assertThat(Arrays.stream(GRUBBS).filter(inner::isBelow)).isEmpty();
  }

  // NIST e-Handbook 1.3.5.17.1: G = 2.4687 (printed truncated; z = 2.468765, REFERENCES.md D).
  // Fences at 2.4687 flag the suspect value, fences at 2.4688 do not. Mean and s from Commons Math.
  @Test
  void zScoreFencesBracketGrubbsStatistic() {
    DescriptiveStatistics stats = new DescriptiveStatistics(GRUBBS);
    double mean = stats.getMean();
    double sd = stats.getStandardDeviation();
    assertThat((SUSPECT - mean) / sd).isCloseTo(2.468765, within(5e-7));

    assertThat(Fences.zScore(mean, sd, 2.4687).isAbove(SUSPECT)).isTrue();
    assertThat(Fences.zScore(mean, sd, 2.4688).isAbove(SUSPECT)).isFalse();
    assertThat(Fences.zScore(mean, sd, 2.4687).lower()).isCloseTo(mean - 2.4687 * sd, within(1e-9));
  }

  // NIST e-Handbook 1.3.5.17 (Iglewicz and Hoaglin 1993): M = 0.6745 (x - median) / MAD, |M| > 3.5
  // a potential outlier. REFERENCES.md (D): median 201.37, MAD 0.995, M(245.57) = 29.9627; the
  // other values have |M| at most 1.40, so only the suspect is flagged.
  @Test
  void modifiedZFencesFlagOnlyTheGrubbsSuspect() {
    double median = new Median().evaluate(GRUBBS);
    double mad = new Median().evaluate(Arrays.stream(GRUBBS).map(x -> Math.abs(x - median)).toArray());
    assertThat(median).isCloseTo(201.37, within(1e-9));
    assertThat(mad).isCloseTo(0.995, within(1e-9));

    Fences f = Fences.modifiedZ(median, mad, 3.5);
    assertThat(f.upper()).isCloseTo(201.37 + 3.5 * 0.995 / 0.6745, within(1e-9));
    assertThat(f.lower()).isCloseTo(201.37 - 3.5 * 0.995 / 0.6745, within(1e-9));
    assertThat(Arrays.stream(GRUBBS).filter(x -> f.isAbove(x) || f.isBelow(x))).containsExactly(SUSPECT);
    // M(245.57) = 29.9627 lies between these two limits.
    assertThat(Fences.modifiedZ(median, mad, 29.962).isAbove(SUSPECT)).isTrue();
    assertThat(Fences.modifiedZ(median, mad, 29.963).isAbove(SUSPECT)).isFalse();
  }

  // NIST StRD NumAcc2: Q1 1.1, Q3 1.3 (REFERENCES.md, D), so the inner fences are 0.8 and 1.6.
  @Test
  void tukeyFencesOnNumAcc2() {
    Fences f = Fences.tukey(1.1, 1.3, 1.5);
    assertThat(f.lower()).isCloseTo(0.8, within(1e-12));
    assertThat(f.upper()).isCloseTo(1.6, within(1e-12));
  }

  /** Policy: a zero IQR, sd or MAD collapses the fences onto the value; all else lies beyond. */
  @Test
  void zeroSpreadCollapsesFencesOntoTheValue() {
    assertThat(Fences.tukey(4.0, 4.0, 1.5)).isEqualTo(new Fences(4.0, 4.0));
    assertThat(Fences.zScore(4.0, 0.0, 3.0)).isEqualTo(new Fences(4.0, 4.0));
    assertThat(Fences.modifiedZ(4.0, 0.0, 3.5)).isEqualTo(new Fences(4.0, 4.0));
    Fences f = Fences.tukey(4.0, 4.0, 1.5);
    assertThat(f.isAbove(4.0) || f.isBelow(4.0)).isFalse();
    assertThat(f.isAbove(4.0000001)).isTrue();
  }

  @Test
  void infiniteMultiplierMeansNoFenceEvenWithZeroSpread() {
    assertThat(Fences.tukey(4.0, 4.0, INF)).isEqualTo(new Fences(-INF, INF));
    assertThat(Fences.zScore(0.0, 2.0, INF)).isEqualTo(new Fences(-INF, INF));
  }

  @Test
  void sidesReplaceUnusedLimitsWithInfinity() {
    Fences f = new Fences(-2.0, 3.0);
    assertThat(f.sides(true, true)).isEqualTo(f);
    assertThat(f.sides(true, false)).isEqualTo(new Fences(-2.0, INF));
    assertThat(f.sides(false, true)).isEqualTo(new Fences(-INF, 3.0));
    assertThat(f.sides(false, false)).isEqualTo(new Fences(-INF, INF));
    assertThat(f.sides(false, true).isBelow(-1e300)).isFalse();
  }

  @Test
  void capClampsAndPassesNaN() {
    Fences f = new Fences(-2.0, 3.0);
    assertThat(f.cap(-5.0)).isEqualTo(-2.0);
    assertThat(f.cap(7.0)).isEqualTo(3.0);
    assertThat(f.cap(1.5)).isEqualTo(1.5);
    assertThat(f.cap(Double.NaN)).isNaN();
    assertThat(f.sides(false, true).cap(-INF)).isEqualTo(-INF);
    assertThat(f.isAbove(Double.NaN) || f.isBelow(Double.NaN)).isFalse();
  }

  @Test
  void rejectsNaNAndCrossedLimits() {
    assertThatThrownBy(() -> new Fences(Double.NaN, 1.0)).isInstanceOf(IllegalArgumentException.class)
        .hasMessage("Fence limits must not be NaN: lower = NaN, upper = 1.0");
    assertThatThrownBy(() -> new Fences(2.0, 1.0)).isInstanceOf(IllegalArgumentException.class)
        .hasMessage("Lower fence 2.0 must not exceed upper fence 1.0");
    assertThat(new Fences(-INF, INF).upper()).isEqualTo(INF);
  }

  @Test
  void rejectsBadInputsToTheFactories() {
    assertThatThrownBy(() -> Fences.tukey(2.0, 1.0, 1.5)).isInstanceOf(IllegalArgumentException.class);
    assertThatThrownBy(() -> Fences.tukey(1.0, 2.0, -1.0)).isInstanceOf(IllegalArgumentException.class);
    assertThatThrownBy(() -> Fences.tukey(Double.NaN, 2.0, 1.5)).isInstanceOf(IllegalArgumentException.class);
    assertThatThrownBy(() -> Fences.zScore(0.0, Double.NaN, 3.0)).isInstanceOf(IllegalArgumentException.class);
    assertThatThrownBy(() -> Fences.zScore(0.0, -1.0, 3.0)).isInstanceOf(IllegalArgumentException.class);
    assertThatThrownBy(() -> Fences.zScore(Double.NaN, 1.0, 3.0)).isInstanceOf(IllegalArgumentException.class);
    assertThatThrownBy(() -> Fences.modifiedZ(0.0, 1.0, Double.NaN)).isInstanceOf(IllegalArgumentException.class);
  }

  @Test
  void tukeyRangeHoldsTheFencesOfEveryQuartilePairInsideTheBrackets() {
    // Not an outside reference: the range must hold Tukey's fences (Q1 - k IQR, Q3 + k IQR, the
    // definition above) of quartiles anywhere in the brackets, and its ends must be reached.
    double[] r = Fences.tukeyRange(1.0, 1.2, 3.0, 3.5, 1.5);
    double[] lows = new double[4];
    double[] highs = new double[4];
    int c = 0;
    for (double q1 : new double[] {1.0, 1.2}) {
      for (double q3 : new double[] {3.0, 3.5}) {
        Fences f = Fences.tukey(q1, q3, 1.5);
        lows[c] = f.lower();
        highs[c++] = f.upper();
      }
    }
    for (int i = 0; i < 1000; i++) {
      Fences f = Fences.tukey(1.0 + 0.2 * i / 999, 3.5 - 0.5 * (i % 7) / 6, 1.5);
      assertThat(f.lower()).isBetween(r[0], r[1]);
      assertThat(f.upper()).isBetween(r[2], r[3]);
    }
    assertThat(r[0]).isCloseTo(Arrays.stream(lows).min().getAsDouble(), within(1e-8));
    assertThat(r[1]).isCloseTo(Arrays.stream(lows).max().getAsDouble(), within(1e-8));
    assertThat(r[2]).isCloseTo(Arrays.stream(highs).min().getAsDouble(), within(1e-8));
    assertThat(r[3]).isCloseTo(Arrays.stream(highs).max().getAsDouble(), within(1e-8));
    assertThatThrownBy(() -> Fences.tukeyRange(1.0, 3.0, 3.0, 3.5, 1.5))
        .isInstanceOf(IllegalArgumentException.class);
  }
}
