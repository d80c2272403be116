package dev.sluice.stats;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;

import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.Random;
import java.util.SplittableRandom;
import java.util.function.Function;
import org.apache.commons.math3.stat.Frequency;
import org.junit.jupiter.api.Test;

/**
 * References: small worked examples counted by hand, and Commons Math 3 {@link Frequency} (counts
 * and modes) on seeded random keys.
 */
class FrequenciesTest {
  @SafeVarargs
  private static <K extends Comparable<? super K>> Frequencies<K> of(int limit, K... keys) {
    Frequencies<K> f = new Frequencies<>(limit);
    for (K k : keys) {
      f.add(k);
    }
    return f;
  }

  // By hand: b, a, c, a, b, a holds a three times, b twice and c once.
  @Test
  void countsAWorkedExample() {
    Frequencies<String> f = of(10, "b", "a", "c", "a", "b", "a");
    assertThat(f.top()).isEqualTo("a");
    assertThat(f.topCount()).isEqualTo(3);
    assertThat(f.distinct()).isEqualTo(3);
    assertThat(f.count("b")).isEqualTo(2);
    assertThat(f.count("c")).isEqualTo(1);
    assertThat(f.count("z")).isZero();
    assertThat(f.overflowed()).isFalse();
  }

  // By hand: 2.5 and -1.0 twice each, 7.0 once; the tie goes to the smaller key, -1.0.
  @Test
  void countsDoubleKeysAndBreaksTiesByTheSmallestKey() {
    Frequencies<Double> f = of(10, 2.5, -1.0, 7.0, 2.5, -1.0);
    assertThat(f.top()).isEqualTo(-1.0);
    assertThat(f.topCount()).isEqualTo(2);
    assertThat(f.distinct()).isEqualTo(3);
  }

  @Test
  void tiesGoToTheSmallestKeyWhateverTheOrder() {
    List<String> keys = new ArrayList<>(List.of("pear", "fig", "pear", "fig", "kiwi", "kiwi", "date"));
    for (int seed = 0; seed < 20; seed++) {
      Collections.shuffle(keys, new Random(seed));
      Frequencies<String> f = of(10, keys.toArray(new String[0]));
      // By hand: fig, kiwi and pear twice each; "fig" is the smallest.
      assertThat(f.top()).isEqualTo("fig");
      assertThat(f.topCount()).isEqualTo(2);
    }
  }

  // Policy: Double keys follow Double.equals and compareTo, so -0.0 and 0.0 are two keys (-0.0 the
  // smaller) and NaN is one key above every number.
  @Test
  void doubleKeysFollowDoubleEquality() {
    Frequencies<Double> f = of(10, 0.0, -0.0, Double.NaN, Double.NaN, 0.0, -0.0);
    assertThat(f.distinct()).isEqualTo(3);
    assertThat(f.top()).isEqualTo(-0.0);
    assertThat(Double.doubleToRawLongBits(f.top())).isEqualTo(Double.doubleToRawLongBits(-0.0));
    assertThat(f.count(Double.NaN)).isEqualTo(2);
  }

  @Test
  void manyOccurrencesAtOnceCountAsOneByOne() {
    // Not an outside reference: add(key, n) must equal n calls of add(key), overflow included.
    Frequencies<Double> once = new Frequencies<>(3);
    Frequencies<Double> many = new Frequencies<>(3);
    double[] keys = {2.5, -1.0, 2.5, 7.0};
    long[] n = {3, 4, 2, 1};
    for (int i = 0; i < keys.length; i++) {
      many.add(keys[i], n[i]);
      for (long k = 0; k < n[i]; k++) {
        once.add(keys[i]);
      }
    }
    assertThat(many.top()).isEqualTo(once.top()).isEqualTo(2.5);
    assertThat(many.topCount()).isEqualTo(once.topCount()).isEqualTo(5);
    assertThat(many.count(-1.0)).isEqualTo(4);
    many.add(9.0, 2);
    assertThat(many.overflowed()).isTrue();
    assertThat(many.top()).isNull();
    assertThatThrownBy(() -> once.add(1.0, 0)).isInstanceOf(IllegalArgumentException.class);
  }

  @Test
  void incrementCountsOnlyHeldKeys() {
    Frequencies<String> f = new Frequencies<>(5);
    assertThat(f.increment("x")).isFalse();
    assertThat(f.distinct()).isZero();
    f.insert("x");
    assertThat(f.increment("x")).isTrue();
    assertThat(f.count("x")).isEqualTo(2);
  }

  @Test
  void emptyHasNoTop() {
    Frequencies<String> f = new Frequencies<>(3);
    assertThat(f.top()).isNull();
    assertThat(f.topCount()).isZero();
    assertThat(f.distinct()).isZero();
    assertThat(f.overflowed()).isFalse();
  }

  @Test
  void overflowsOnTheKeyBeyondTheLimit() {
    Frequencies<String> f = of(3, "a", "b", "c", "a");
    assertThat(f.overflowed()).isFalse();
    assertThat(f.distinct()).isEqualTo(3);
    f.add("b");
    assertThat(f.overflowed()).as("a held key at the limit").isFalse();
    assertThat(f.count("b")).isEqualTo(2);

    f.add("d");
    assertThat(f.overflowed()).isTrue();
    assertThat(f.top()).isNull();
    assertThat(f.topCount()).isZero();
    assertThat(f.distinct()).isZero();
    assertThat(f.count("a")).isZero();
    // Overflowed: nothing to insert, so increment reports true and inserting does nothing.
    assertThat(f.increment("a")).isTrue();
    f.insert("e");
    assertThat(f.overflowed()).isTrue();
    assertThat(f.top()).isNull();
  }

  @Test
  void mergeAddsCountsKeyByKey() {
    // By hand: {a:2, b:1} + {b:3, c:1} = {a:2, b:4, c:1}, three keys, the limit.
    Frequencies<String> left = of(3, "a", "b", "a");
    Frequencies<String> right = of(3, "b", "c", "b", "b");
    Frequencies<String> merged = left.merge(right);
    assertThat(merged.overflowed()).isFalse();
    assertThat(merged.top()).isEqualTo("b");
    assertThat(merged.topCount()).isEqualTo(4);
    assertThat(merged.count("a")).isEqualTo(2);
    assertThat(merged.count("c")).isEqualTo(1);
    assertThat(right.count("b")).as("the merged-in part is unchanged").isEqualTo(3);
    right.add("b");
    assertThat(merged.count("b")).as("and shares no counts").isEqualTo(4);
  }

  @Test
  void mergeWhoseUnionPassesTheLimitOverflowsAndOverflowIsSticky() {
    // By hand: {a, b} and {c, d} make four keys, beyond 3.
    Frequencies<String> merged = of(3, "a", "b").merge(of(3, "c", "d"));
    assertThat(merged.overflowed()).isTrue();
    assertThat(merged.top()).isNull();
    assertThat(of(3, "c", "d").merge(of(3, "a", "b")).overflowed()).isTrue();

    Frequencies<String> overflowed = of(1, "a", "b");
    assertThat(overflowed.overflowed()).isTrue();
    assertThat(of(1, "a").merge(overflowed).overflowed()).isTrue();
    assertThat(overflowed.merge(of(1, "a")).overflowed()).isTrue();
    assertThat(overflowed.merge(new Frequencies<>(1)).overflowed()).isTrue();
  }

  // ---- seeded random keys against Commons Math Frequency (D)

  private static List<Function<List<Frequencies<String>>, Frequencies<String>>> mergeOrders() {
    return List.of(
        ps -> {
          Frequencies<String> acc = ps.get(0);
          ps.subList(1, ps.size()).forEach(acc::merge);
          return acc;
        },
        ps -> {
          Frequencies<String> acc = ps.get(ps.size() - 1);
          for (int i = ps.size() - 2; i >= 0; i--) {
            acc.merge(ps.get(i));
          }
          return acc;
        },
        FrequenciesTest::tree,
        ps -> {
          List<Frequencies<String>> copy = new ArrayList<>(ps);
          Collections.shuffle(copy, new Random(5));
          Frequencies<String> acc = new Frequencies<>(ps.get(0).limit());
          copy.forEach(acc::merge);
          return acc;
        });
  }

  private static Frequencies<String> tree(List<Frequencies<String>> ps) {
    if (ps.size() == 1) {
      return ps.get(0);
    }
    int mid = ps.size() / 2;
    return tree(ps.subList(0, mid)).merge(tree(ps.subList(mid, ps.size())));
  }

  /** Seeded keys "k0".."k{distinct-1}", skewed (smaller keys more frequent) or uniform. */
  private static String[] randomKeys(int n, int distinct, long seed, boolean skewed) {
    SplittableRandom random = new SplittableRandom(seed);
    String[] keys = new String[n];
    for (int i = 0; i < n; i++) {
      int k = skewed ? Math.min(random.nextInt(distinct), random.nextInt(distinct)) : random.nextInt(distinct);
      keys[i] = "k" + k;
    }
    return keys;
  }

  private static List<Frequencies<String>> parts(int limit, String[] keys, int partCount) {
    List<Frequencies<String>> out = new ArrayList<>();
    for (int p = 0; p < partCount; p++) {
      Frequencies<String> f = new Frequencies<>(limit);
      for (int i = p * keys.length / partCount; i < (p + 1) * keys.length / partCount; i++) {
        f.add(keys[i]);
      }
      out.add(f);
    }
    return out;
  }

  // (D) Commons Math 3 Frequency on the same keys: count of every key, number of distinct keys and
  // the smallest of its modes; for one part and for 2, 7 and 40 parts merged in four orders.
  @Test
  void agreesWithCommonsMathFrequencyHoweverSplitAndMerged() {
    for (int distinct : new int[] {3, 60, 400}) {
      String[] keys = randomKeys(20_000, distinct, 100 + distinct, true);
      Frequency reference = new Frequency();
      for (String k : keys) {
        reference.addValue(k);
      }
      List<Frequencies<String>> results = new ArrayList<>(List.of(parts(500, keys, 1).get(0)));
      for (int partCount : new int[] {2, 7, 40}) {
        for (Function<List<Frequencies<String>>, Frequencies<String>> order : mergeOrders()) {
          results.add(order.apply(parts(500, keys, partCount)));
        }
      }
      for (Frequencies<String> f : results) {
        assertThat(f.overflowed()).isFalse();
        assertThat(f.distinct()).isEqualTo(reference.getUniqueCount());
        assertThat(f.top()).isEqualTo(reference.getMode().get(0));
        assertThat(f.topCount()).isEqualTo(reference.getCount(f.top()));
        for (int k = 0; k < distinct; k++) {
          assertThat(f.count("k" + k)).isEqualTo(reference.getCount("k" + k));
        }
      }
    }
  }

  // With limit 399 and 400 distinct keys (Commons Math Frequency (D) counts them), every split and
  // merge order overflows; with limit 400 none does.
  @Test
  void overflowDependsOnlyOnTheDistinctKeysOfAllParts() {
    String[] keys = randomKeys(20_000, 400, 500, false);
    Frequency reference = new Frequency();
    for (String k : keys) {
      reference.addValue(k);
    }
    assertThat(reference.getUniqueCount()).isEqualTo(400);
    for (int partCount : new int[] {1, 2, 7, 40}) {
      for (Function<List<Frequencies<String>>, Frequencies<String>> order : mergeOrders()) {
        assertThat(order.apply(parts(399, keys, partCount)).overflowed()).isTrue();
        assertThat(order.apply(parts(400, keys, partCount)).overflowed()).isFalse();
      }
    }
  }

  // ---- serialization and rejections

  @Test
  void survivesJavaSerialization() throws Exception {
    Frequencies<Double> f = of(4, 1.5, -2.0, 1.5, 8.0);
    Frequencies<Double> copy = ScaledMomentsTest.roundTrip(f);
    assertThat(copy.top()).isEqualTo(1.5);
    assertThat(copy.topCount()).isEqualTo(2);
    assertThat(copy.distinct()).isEqualTo(3);
    assertThat(copy.limit()).isEqualTo(4);
    copy.add(-2.0);
    copy.add(-2.0);
    assertThat(copy.top()).isEqualTo(-2.0);
    assertThat(f.top()).as("the original is independent").isEqualTo(1.5);
    copy.add(3.0);
    assertThat(copy.overflowed()).isFalse();
    copy.add(4.0);
    assertThat(copy.overflowed()).isTrue();

    Frequencies<String> overflowed = ScaledMomentsTest.roundTrip(of(1, "a", "b"));
    assertThat(overflowed.overflowed()).isTrue();
    assertThat(overflowed.top()).isNull();
  }

  @Test
  void rejectsBadInput() {
    assertThatThrownBy(() -> new Frequencies<String>(0)).isInstanceOf(IllegalArgumentException.class)
        .hasMessageContaining("at most 0 distinct values");
    assertThatThrownBy(() -> new Frequencies<String>(3).insert(null)).isInstanceOf(NullPointerException.class)
        .hasMessage("Cannot count a null value");
    assertThatThrownBy(() -> of(3, "a").merge(of(4, "a"))).isInstanceOf(IllegalArgumentException.class)
        .hasMessage("Cannot merge value frequencies with limits 3 and 4");
    Frequencies<String> f = of(3, "a");
    assertThatThrownBy(() -> f.merge(f)).isInstanceOf(IllegalArgumentException.class);
  }
}
