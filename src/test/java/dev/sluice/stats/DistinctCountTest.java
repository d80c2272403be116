package dev.sluice.stats;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;
import static org.assertj.core.api.Assertions.within;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.Collections;
import java.util.HashSet;
import java.util.List;
import java.util.Random;
import java.util.Set;
import java.util.SplittableRandom;
import java.util.TreeSet;
import java.util.function.Function;
import org.apache.datasketches.hll.HllSketch;
import org.apache.datasketches.hll.TgtHllType;
import org.apache.datasketches.hll.Union;
import org.junit.jupiter.api.Test;

/**
 * References: counts by hand and by java.util.HashSet for the exact state; for the sketched state,
 * the HyperLogLog relative standard error 1.04/sqrt(k) (Flajolet et al. 2007, also the figure the
 * DataSketches HLL documentation gives; both from memory, so checked below against the library's
 * own table, HllSketch.getRelErr) and the truth of a million distinct values.
 */
class DistinctCountTest {
  /** Relative standard error for k = 2^12 registers: 1.04 / sqrt(4096) = 1.04 / 64 = 0.01625. */
  private static final double RSE = 1.04 / 64;

  private static DistinctCount of(int limit, long[] hashes, int from, int to) {
    DistinctCount d = new DistinctCount(limit);
    for (int i = from; i < to; i++) {
      d.add(hashes[i]);
    }
    return d;
  }

  private static DistinctCount of(int limit, long... hashes) {
    return of(limit, hashes, 0, hashes.length);
  }

  // By hand: 5, 7, 0, -1, Long.MIN_VALUE and Long.MAX_VALUE are the 6 distinct values among 9.
  @Test
  void countsExactlyWithDuplicates() {
    DistinctCount d = of(10, 5, 7, 5, 0, -1, 7, Long.MIN_VALUE, 0, Long.MAX_VALUE);
    assertThat(d.exact()).isTrue();
    assertThat(d.estimate()).isEqualTo(6);
    assertThat(new DistinctCount(10).estimate()).isZero();
  }

  // (D) java.util.HashSet of the same seeded values: 60,000 draws among 25,000 possible values,
  // so the set grows through many doublings and sees many repeats.
  @Test
  void exactCountMatchesHashSetInOneAndManyParts() {
    SplittableRandom random = new SplittableRandom(31);
    long[] pool = random.longs(25_000).toArray();
    pool[17] = 0;
    long[] hashes = new long[60_000];
    for (int i = 0; i < hashes.length; i++) {
      hashes[i] = pool[random.nextInt(pool.length)];
    }
    Set<Long> reference = new HashSet<>();
    Arrays.stream(hashes).forEach(reference::add);

    DistinctCount whole = of(30_000, hashes, 0, hashes.length);
    assertThat(whole.exact()).isTrue();
    assertThat(whole.estimate()).isEqualTo(reference.size());
    for (Function<List<DistinctCount>, DistinctCount> order : mergeOrders()) {
      DistinctCount merged = order.apply(parts(30_000, hashes, 1, 7_000, 7_001, 33_333, 59_000));
      assertThat(merged.exact()).isTrue();
      assertThat(merged.estimate()).isEqualTo(reference.size());
    }
  }

  // In its warm-up modes the sketch keeps each hash's coupon, which makes it exact for small counts
  // (DataSketches HLL package documentation (S): "keep exact counts until the transition to dense
  // mode"), so just past the limit the estimate is still the true count.
  @Test
  void switchesOnTheFirstHashBeyondTheLimit() {
    long[] hashes = new SplittableRandom(5).longs(101).toArray();
    DistinctCount d = of(100, hashes, 0, 100);
    assertThat(d.exact()).isTrue();
    assertThat(d.estimate()).isEqualTo(100);
    d.add(hashes[42]);
    assertThat(d.exact()).as("a repeat at the limit").isTrue();
    assertThat(d.estimate()).isEqualTo(100);
    d.add(hashes[100]);
    assertThat(d.exact()).isFalse();
    assertThat(d.estimate()).isEqualTo(101);
    d.add(hashes[0]);
    assertThat(d.estimate()).isEqualTo(101);

    DistinctCount none = new DistinctCount(0);
    assertThat(none.exact()).isTrue();
    none.add(9);
    assertThat(none.exact()).isFalse();
    assertThat(none.estimate()).isEqualTo(1);
  }

  @Test
  void exactPartsWhoseUnionPassesTheLimitSwitch() {
    long[] hashes = new SplittableRandom(8).longs(120).toArray();
    // Union of hashes 0..59 and 40..119: 120 distinct, beyond 100 (by hand).
    DistinctCount a = of(100, hashes, 0, 60);
    DistinctCount b = of(100, hashes, 40, 120);
    assertThat(a.exact()).isTrue();
    assertThat(b.exact()).isTrue();
    DistinctCount ab = a.merge(b);
    assertThat(ab.exact()).isFalse();
    assertThat(ab.estimate()).isEqualTo(120);
    DistinctCount ba = of(100, hashes, 40, 120).merge(of(100, hashes, 0, 60));
    assertThat(ba.exact()).isFalse();
    assertThat(bits(ba.rawEstimate())).isEqualTo(bits(ab.rawEstimate()));

    // Union of hashes 0..59 and 20..99: exactly 100 distinct, the limit itself (by hand).
    DistinctCount atLimit = of(100, hashes, 0, 60).merge(of(100, hashes, 20, 100));
    assertThat(atLimit.exact()).isTrue();
    assertThat(atLimit.estimate()).isEqualTo(100);
  }

  // Documented bound: relative standard error 1.04/sqrt(k) for k = 4096 (see the class comment);
  // the truth is a million distinct hashes (i times an odd constant is one-to-one on longs).
  @Test
  void estimatesAMillionDistinctValuesWithinThreeStandardErrors() {
    int n = 1_000_000;
    long[] hashes = new long[n];
    for (int i = 0; i < n; i++) {
      hashes[i] = i * 0x9E3779B97F4A7C15L;
    }
    DistinctCount whole = of(1000, hashes, 0, n);
    assertThat(whole.exact()).isFalse();
    assertThat((double) whole.estimate()).isCloseTo(n, within(3 * RSE * n));

    DistinctCount merged = new DistinctCount(1000);
    for (int p = 9; p >= 0; p--) {
      merged.merge(of(1000, hashes, p * n / 10, (p + 1) * n / 10));
    }
    assertThat(bits(merged.rawEstimate())).isEqualTo(bits(whole.rawEstimate()));
  }

  // (S) The library's own table of the relative error of its non-HIP estimate for lgK = 12, one
  // standard deviation, lower and upper: both within 1% of (and not above) the 1.04/64 used here.
  @Test
  void documentedRelativeErrorAgreesWithTheLibrary() {
    for (boolean upper : new boolean[] {false, true}) {
      double libraryRse = HllSketch.getRelErr(upper, true, DistinctCount.LG_K, 1);
      assertThat(libraryRse).isCloseTo(RSE, within(0.01 * RSE));
      assertThat(libraryRse).isLessThanOrEqualTo(RSE);
    }
  }

  // ---- order independence

  private static List<DistinctCount> parts(int limit, long[] hashes, int... cuts) {
    List<DistinctCount> out = new ArrayList<>();
    int from = 0;
    for (int cut : cuts) {
      out.add(of(limit, hashes, from, cut));
      from = cut;
    }
    out.add(of(limit, hashes, from, hashes.length));
    return out;
  }

  private static List<Function<List<DistinctCount>, DistinctCount>> mergeOrders() {
    return List.of(
        ps -> {
          DistinctCount acc = ps.get(0);
          ps.subList(1, ps.size()).forEach(acc::merge);
          return acc;
        },
        ps -> {
          DistinctCount acc = ps.get(ps.size() - 1);
          for (int i = ps.size() - 2; i >= 0; i--) {
            acc.merge(ps.get(i));
          }
          return acc;
        },
        DistinctCountTest::tree,
        ps -> {
          List<DistinctCount> copy = new ArrayList<>(ps);
          Collections.shuffle(copy, new Random(3));
          DistinctCount acc = new DistinctCount(ps.get(0).exactLimit());
          copy.forEach(acc::merge);
          return acc;
        });
  }

  private static DistinctCount tree(List<DistinctCount> ps) {
    if (ps.size() == 1) {
      return ps.get(0);
    }
    int mid = ps.size() / 2;
    return tree(ps.subList(0, mid)).merge(tree(ps.subList(mid, ps.size())));
  }

  /** Sorted distinct random cut points strictly inside (0, n). */
  private static int[] randomCuts(SplittableRandom random, int n, int count) {
    return random.ints(count, 1, n).sorted().distinct().toArray();
  }

  // Sizes from the sketch's warm-up modes to its dense mode; with a limit of 100, small parts stay
  // exact and large ones are sketched before they meet. Every split and order must give the same
  // double, bit for bit.
  @Test
  void sameEstimateBitForBitForEverySplitAndMergeOrder() {
    SplittableRandom random = new SplittableRandom(77);
    for (int distinct : new int[] {150, 900, 3_000, 50_000, 300_000}) {
      long[] pool = random.longs(distinct).toArray();
      long[] hashes = new long[distinct * 2];
      System.arraycopy(pool, 0, hashes, 0, distinct);
      for (int i = distinct; i < hashes.length; i++) {
        hashes[i] = pool[random.nextInt(distinct)];
      }
      shuffle(hashes, random);

      Set<Long> estimates = new TreeSet<>();
      estimates.add(bits(of(100, hashes, 0, hashes.length).rawEstimate()));
      for (int parts : new int[] {2, 5, 16, 60}) {
        int[] cuts = randomCuts(random, hashes.length, parts - 1);
        for (Function<List<DistinctCount>, DistinctCount> order : mergeOrders()) {
          DistinctCount d = order.apply(parts(100, hashes, cuts));
          assertThat(d.exact()).isFalse();
          estimates.add(bits(d.rawEstimate()));
        }
      }
      // Values added after a merge count as if added in one stream.
      int third = hashes.length / 3;
      DistinctCount later = of(100, hashes, 0, third).merge(of(100, hashes, third, 2 * third));
      for (int i = 2 * third; i < hashes.length; i++) {
        later.add(hashes[i]);
      }
      estimates.add(bits(later.rawEstimate()));

      assertThat(estimates).as(distinct + " distinct values").hasSize(1);
    }
  }

  // Why the composite estimate: the sketch's default estimate of the same values differs between a
  // sketch built in one stream and a union of parts (HIP versus the union's estimator), which would
  // make the figure depend on partitioning.
  @Test
  void defaultEstimateOfTheSketchDependsOnHowPartsWereCombined() {
    long[] hashes = new SplittableRandom(11).longs(50_000).toArray();
    HllSketch whole = new HllSketch(DistinctCount.LG_K, TgtHllType.HLL_8);
    HllSketch first = new HllSketch(DistinctCount.LG_K, TgtHllType.HLL_8);
    HllSketch second = new HllSketch(DistinctCount.LG_K, TgtHllType.HLL_8);
    for (int i = 0; i < hashes.length; i++) {
      whole.update(hashes[i]);
      (i < hashes.length / 2 ? first : second).update(hashes[i]);
    }
    Union union = new Union(DistinctCount.LG_K);
    union.update(first);
    union.update(second);
    HllSketch merged = union.getResult(TgtHllType.HLL_8);

    assertThat(merged.getEstimate()).isNotEqualTo(whole.getEstimate());
    assertThat(bits(merged.getCompositeEstimate())).isEqualTo(bits(whole.getCompositeEstimate()));
  }

  // ---- serialization, limits

  @Test
  void survivesJavaSerializationInBothStates() throws Exception {
    long[] hashes = new SplittableRandom(2).longs(5_000).toArray();
    hashes[10] = 0;
    long[] more = new SplittableRandom(4).longs(300).toArray();
    for (int size : new int[] {40, 5_000}) {
      DistinctCount original = of(1000, hashes, 0, size);
      DistinctCount copy = ScaledMomentsTest.roundTrip(original);
      assertThat(copy.exact()).isEqualTo(size <= 1000);
      assertThat(copy.exact()).isEqualTo(original.exact());
      assertThat(copy.exactLimit()).isEqualTo(1000);
      assertThat(copy.estimate()).isEqualTo(original.estimate());
      assertThat(bits(copy.rawEstimate())).isEqualTo(bits(original.rawEstimate()));
      if (size == 40) {
        assertThat(copy.estimate()).isEqualTo(40);
      }
      // Both continue alike: more values, then a merge.
      for (long h : more) {
        original.add(h);
        copy.add(h);
      }
      original.merge(of(1000, hashes, 0, 2_000));
      copy.merge(of(1000, hashes, 0, 2_000));
      assertThat(bits(copy.rawEstimate())).isEqualTo(bits(original.rawEstimate()));
    }
  }

  @Test
  void mergingWithItselfChangesNothing() {
    DistinctCount d = of(10, 1, 2, 3);
    assertThat(d.merge(d).estimate()).isEqualTo(3);
  }

  @Test
  void rejectsBadLimitsNamingThem() {
    assertThatThrownBy(() -> new DistinctCount(-1)).isInstanceOf(IllegalArgumentException.class)
        .hasMessageContaining("-1");
    assertThatThrownBy(() -> new DistinctCount(DistinctCount.MAX_EXACT_LIMIT + 1))
        .isInstanceOf(IllegalArgumentException.class);
    assertThatThrownBy(() -> new DistinctCount(10).merge(new DistinctCount(20)))
        .isInstanceOf(IllegalArgumentException.class)
        .hasMessage("Cannot merge distinct counts with exact limits 10 and 20");
  }

  private static void shuffle(long[] values, SplittableRandom random) {
    for (int i = values.length - 1; i > 0; i--) {
      int j = random.nextInt(i + 1);
      long t = values[i];
      values[i] = values[j];
      values[j] = t;
    }
  }

  private static long bits(double v) {
    return Double.doubleToRawLongBits(v);
  }
}
