package dev.sluice.stats;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;
import static org.assertj.core.api.Assertions.within;

import dev.sluice.testing.ReferenceData;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Collections;
import java.util.List;
import java.util.SplittableRandom;
import org.apache.commons.math3.stat.descriptive.rank.Percentile;
import org.junit.jupiter.api.Test;

/**
 * The exact quantile search, run here without Spark: each "pass" adds the data, split into parts,
 * to copies of the pass's windows and merges them, as the Spark loop does.
 */
class RankSearchTest {
  private static final double[] QUARTILES = {0.25, 0.5, 0.75};

  /** Runs the search to the end over {@code data} split into {@code parts}; returns it. */
  private static RankSearch search(double[] data, double[] pilot, double[] ps, int maxHeld, int parts) {
    RankSearch s = new RankSearch(ps, maxHeld);
    OrderWindows plan = s.firstPlan(pilot, data.length);
    while (true) {
      OrderWindows merged = null;
      for (int k = 0; k < parts; k++) {
        OrderWindows part = plan.emptyCopy();
        for (int i = k; i < data.length; i += parts) {
          part.add(data[i]);
        }
        merged = merged == null ? part : merged.merge(part);
      }
      if (s.absorb(merged)) {
        return s;
      }
      plan = s.nextPlan();
    }
  }

  private static double[] r7(double[] data, double... ps) {
    Percentile p = new Percentile().withEstimationType(Percentile.EstimationType.R_7);
    double[] out = new double[ps.length];
    for (int i = 0; i < ps.length; i++) {
      out[i] = p.evaluate(data, ps[i] * 100);
    }
    return out;
  }

  /**
   * Exactly our sorted-array type 7 (itself checked against Commons Math in QuantilesTest), and
   * within rounding of Commons Math Percentile R_7 (D), which computes the fraction as
   * (1 + h) - floor(1 + h) and may differ in the last bit.
   */
  private static void assertType7(double[] got, double[] data, double... ps) {
    assertThat(got).containsExactly(Quantiles.type7Of(data, ps));
    double[] reference = r7(data, ps);
    for (int i = 0; i < ps.length; i++) {
      assertThat(got[i]).as("p = %s", ps[i])
          .isCloseTo(reference[i], within(1e-12 * Math.max(1.0, Math.abs(reference[i]))));
    }
  }

  private static double[] lognormal(int n, long seed) {
    SplittableRandom r = new SplittableRandom(seed);
    double[] v = new double[n];
    for (int i = 0; i < n; i++) {
      v[i] = Math.exp(r.nextGaussian());
    }
    return v;
  }

  @Test
  void nistWaferQuartilesAreType7() {
    // NIST/SEMATECH e-Handbook 7.2.6.2, 12 wafer resistivities (S). Type 7 quartiles (D, derived
    // with Commons Math Percentile R_7; ../shared/REFERENCES.md): 95.11625, 95.1579, 95.181325.
    double[] wafer = {95.1772, 95.1567, 95.1937, 95.1959, 95.1442, 95.0610, 95.1591, 95.1195,
        95.1065, 95.0925, 95.1990, 95.1682};
    double[] q = search(wafer, new double[0], QUARTILES, 1_000, 3).quantiles();
    assertThat(q[0]).isCloseTo(95.11625, within(1e-9));
    assertThat(q[1]).isCloseTo(95.1579, within(1e-9));
    assertThat(q[2]).isCloseTo(95.181325, within(1e-9));
  }

  @Test
  void numAcc2QuartilesAreTheSameUnderEveryDefinition() {
    // NIST StRD NumAcc2 (S, data); every quantile type gives Q1 1.1, median 1.2, Q3 1.3 (D).
    double[] data = ReferenceData.strd("NumAcc2").data();
    double[] pilot = Arrays.copyOf(data, 100);
    RankSearch s = search(data, pilot, QUARTILES, 1_000, 4);
    assertThat(s.quantiles()).containsExactly(1.1, 1.2, 1.3);
  }

  @Test
  void largeColumnWithAGoodPilotIsExactInOnePass() {
    // Reference: Commons Math Percentile R_7 on the same doubles (D). The pilot is the first
    // 5 % of a random order, as the job's pilot is the first rows of a few partitions.
    double[] data = lognormal(200_000, 3);
    double[] pilot = Arrays.copyOf(data, 10_000);
    RankSearch s = search(data, pilot, QUARTILES, 20_000, 5);
    assertThat(s.passes()).isEqualTo(1);
    assertType7(s.quantiles(), data, QUARTILES);
  }

  @Test
  void aMisleadingPilotCostsPassesButNotExactness() {
    // Sorted data and a pilot from its start: every window misses. Reference: Commons Math R_7.
    double[] data = lognormal(100_000, 5);
    Arrays.sort(data);
    double[] pilot = Arrays.copyOf(data, 2_000);
    RankSearch s = search(data, pilot, QUARTILES, 5_000, 3);
    assertThat(s.passes()).isGreaterThan(1);
    assertType7(s.quantiles(), data, QUARTILES);
  }

  @Test
  void aQuartileFoundBeforeAnotherPassStillHasItsCountBelow() {
    // The pilot's upper half is stretched: its Q1 window holds Q1, its Q3 window misses, and Q3
    // needs another pass, whose windows lie around Q3 only. Reference: the values below each
    // quartile, counted directly in the data; Commons Math R_7 for the quartiles.
    java.util.Random rnd = new java.util.Random(11);
    double[] data = new double[100_000];
    for (int i = 0; i < data.length; i++) {
      data[i] = rnd.nextDouble();
    }
    double[] pilot = Arrays.copyOf(data, 2_000);
    for (int i = 0; i < pilot.length; i++) {
      pilot[i] = pilot[i] > 0.5 ? 0.5 + (pilot[i] - 0.5) * 1.6 : pilot[i];
    }
    RankSearch s = search(data, pilot, QUARTILES, 5_000, 3);
    assertThat(s.passes()).isGreaterThan(1);
    double[] q = s.quantiles();
    assertType7(q, data, QUARTILES);
    for (double x : q) {
      assertThat(s.countBelow(x)).as("below %s", x).isEqualTo(Arrays.stream(data).filter(v -> v < x).count());
    }
  }

  @Test
  void aQuartileBetweenTheWindowsOfEveryPassStillHasItsCountBelow() {
    // Values rounded to 0.1 with many ties, 250 held values per window: Q1 and Q3 (type 7, each
    // between two order statistics) lie in gaps between the windows of every pass. No value lies
    // strictly between two consecutive order statistics, so the values below the quartile are
    // those at or below the lower one. Reference: the values below each quartile, counted directly
    // in the data; Commons Math R_7 for the quartiles.
    java.util.Random rnd = new java.util.Random(7);
    double[] data = new double[20_000 + rnd.nextInt(20_000)];
    for (int i = 0; i < data.length; i++) {
      data[i] = Math.round(Math.exp(rnd.nextGaussian()) * 3000) / 10.0;
    }
    RankSearch s = new RankSearch(QUARTILES, 250);
    OrderWindows plan = s.firstPlan(RankSearch.sorted(Arrays.copyOf(data, 1_000)), data.length);
    List<OrderWindows> passes = new java.util.ArrayList<>();
    while (true) {
      OrderWindows pass = plan.emptyCopy();
      for (double x : data) {
        pass.add(x);
      }
      passes.add(pass);
      if (s.absorb(pass)) {
        break;
      }
      plan = s.nextPlan();
    }
    double[] q = s.quantiles();
    assertType7(q, data, QUARTILES);
    assertThat(passes).allMatch(p -> p.countBelow(q[0], false) < 0 && p.countBelow(q[2], false) < 0);
    for (double x : q) {
      assertThat(s.countBelow(x)).as("below %s", x).isEqualTo(Arrays.stream(data).filter(v -> v < x).count());
    }
  }

  @Test
  void heavyTiesAndATinyMemoryStillEndExactly() {
    // 60 % of the values are one number and memory holds 50 values per window: the search must
    // narrow by histograms down to single keys. Reference: Commons Math R_7.
    SplittableRandom r = new SplittableRandom(9);
    double[] data = new double[50_000];
    for (int i = 0; i < data.length; i++) {
      data[i] = r.nextDouble() < 0.6 ? 5.0 : r.nextGaussian() * 3 + 5;
    }
    double[] ps = {0.1, 0.25, 0.5, 0.75, 0.9, 0.999};
    RankSearch s = search(data, new double[0], ps, 50, 7);
    assertType7(s.quantiles(), data, ps);
    // Each pass narrows a region by at least BUCKETS in key space: 64 bits need at most 6.
    assertThat(s.passes()).isLessThanOrEqualTo(7);
  }

  @Test
  void discreteValuesSeenInThePilotAreCountedNotHeld() {
    // Whole-number scores with many repeats: the pilot's repeated values become counting windows,
    // so a small memory suffices in one pass. Reference: Commons Math R_7.
    SplittableRandom r = new SplittableRandom(13);
    double[] data = new double[100_000];
    for (int i = 0; i < data.length; i++) {
      data[i] = Math.min(100, Math.max(0, Math.round(85 + 4.5 * r.nextGaussian())));
    }
    double[] pilot = Arrays.copyOf(data, 5_000);
    RankSearch s = search(data, pilot, QUARTILES, 2_000, 4);
    assertThat(s.passes()).isEqualTo(1);
    assertType7(s.quantiles(), data, QUARTILES);
  }

  @Test
  void resultIsTheSameForAnySplitMergeOrderAndPilot() {
    double[] data = lognormal(30_000, 17);
    double[] expected = Quantiles.type7Of(data, QUARTILES);
    List<Double> shuffled = new ArrayList<>();
    for (double d : data) {
      shuffled.add(d);
    }
    Collections.shuffle(shuffled, new java.util.Random(1));
    double[] other = shuffled.stream().mapToDouble(Double::doubleValue).toArray();
    assertThat(search(data, Arrays.copyOf(data, 500), QUARTILES, 1_000, 1).quantiles()).containsExactly(expected);
    assertThat(search(other, Arrays.copyOf(other, 3_000), QUARTILES, 1_000, 9).quantiles()).containsExactly(expected);
    assertThat(search(other, new double[0], QUARTILES, 100, 2).quantiles()).containsExactly(expected);
  }

  @Test
  void quartilesOfCappedValuesFollowFromTheOrderStatistics() {
    // Capping keeps order and count: the search over raw values gives the capped quartiles.
    // Reference: our sorted-array type 7 (and Commons Math R_7) on the capped values themselves.
    double[] data = lognormal(20_000, 23);
    RankSearch s = search(data, Arrays.copyOf(data, 2_000), QUARTILES, 1_000, 3);
    double lo = 0.8;
    double hi = 1.1; // inside the quartile range on purpose: the cap moves Q1 and Q3
    double[] capped = Arrays.stream(data).map(x -> Math.min(hi, Math.max(lo, x))).toArray();
    assertType7(s.quantiles(x -> Math.min(hi, Math.max(lo, x))), capped, QUARTILES);
  }

  @Test
  void edgeCases() {
    RankSearch empty = search(new double[0], new double[0], QUARTILES, 10, 2);
    assertThat(empty.count()).isZero();
    assertThat(empty.quantiles()).containsOnly(Double.NaN);
    assertThat(search(new double[] {4.5}, new double[0], QUARTILES, 10, 2).quantiles())
        .containsExactly(4.5, 4.5, 4.5);
    // -0.0 and 0.0 are one value; extremes of the double range are ordinary values.
    double[] mixed = {-0.0, 0.0, -Double.MAX_VALUE, Double.MAX_VALUE, Double.MIN_VALUE, -1.0};
    double[] q = search(mixed, new double[0], new double[] {0.0, 0.5, 1.0}, 2, 2).quantiles();
    assertThat(q[0]).isEqualTo(-Double.MAX_VALUE);
    assertThat(q[1]).isEqualTo(0.0);
    assertThat(q[2]).isEqualTo(Double.MAX_VALUE);
  }

  @Test
  void keysSortLikeTheDoubles() {
    double[] v = {Double.NEGATIVE_INFINITY, -Double.MAX_VALUE, -1.5, -Double.MIN_VALUE, 0.0,
        Double.MIN_VALUE, 1.0, 2.0, Double.MAX_VALUE, Double.POSITIVE_INFINITY};
    for (int i = 1; i < v.length; i++) {
      assertThat(OrderWindows.key(v[i - 1])).isLessThan(OrderWindows.key(v[i]));
      assertThat(OrderWindows.value(OrderWindows.key(v[i]))).isEqualTo(v[i]);
    }
    assertThat(OrderWindows.key(-0.0)).isEqualTo(OrderWindows.key(0.0));
  }

  @Test
  void heldValuesAreReadInAscendingOrderWhateverTheReadOrder() {
    // Reference: a full sort of the same values (java.util.Arrays.sort), read at every rank.
    SplittableRandom r = new SplittableRandom(7);
    double[] values = new double[5_000];
    for (int i = 0; i < values.length; i++) {
      // Ties and both zeros, which must read as 0.0 (the windows order -0.0 as 0.0).
      values[i] = i % 10 == 0 ? (i % 20 == 0 ? -0.0 : 0.0) : Math.floor(r.nextGaussian() * 300) / 7;
    }
    OrderWindows w = new OrderWindows(
        new long[] {OrderWindows.key(-1e9)}, new long[] {OrderWindows.key(1e9)}, new boolean[1], 10_000);
    for (double v : values) {
      w.add(v);
    }
    double[] sorted = values.clone();
    for (int i = 0; i < sorted.length; i++) {
      sorted[i] += 0.0;
    }
    Arrays.sort(sorted);
    List<Integer> ranks = new ArrayList<>();
    for (int i = 0; i < values.length; i++) {
      ranks.add(i);
    }
    Collections.shuffle(ranks, new java.util.Random(3));
    for (int i : ranks) {
      assertThat(w.heldValue(0, i)).as("rank %d", i).isEqualTo(sorted[i]);
    }
    // A value added after reads is taken into account by the next read.
    w.add(-1e8);
    assertThat(w.heldValue(0, 0)).isEqualTo(-1e8);
    assertThat(w.heldValue(0, values.length)).isEqualTo(sorted[values.length - 1]);
    assertThatThrownBy(() -> w.heldValue(0, values.length + 1))
        .isInstanceOf(IndexOutOfBoundsException.class);
  }

  @Test
  void argumentsAreChecked() {
    assertThatThrownBy(() -> new RankSearch(new double[] {1.5}, 10))
        .hasMessage("Cannot take the quantile at p = 1.5: p must be in [0, 1]");
    assertThatThrownBy(() -> new OrderWindows(new long[] {5, 3}, new long[] {6, 4}, new boolean[2], 10))
        .hasMessageContaining("overlaps or precedes");
    RankSearch s = new RankSearch(QUARTILES, 10);
    assertThatThrownBy(s::nextPlan).hasMessage("No further pass is needed");
  }
}
