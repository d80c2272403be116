package dev.sluice.stats;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;

import java.io.ByteArrayInputStream;
import java.io.ByteArrayOutputStream;
import java.io.ObjectInputStream;
import java.io.ObjectOutputStream;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.Random;
import org.apache.commons.math3.stat.Frequency;
import org.junit.jupiter.api.Test;

class HashedCountsTest {
  /** The caller's pattern: increment by hash, insert the value when it is new. */
  private static void add(HashedCounts<String> c, String value) {
    long hash = value.hashCode() * 0x9E3779B97F4A7C15L; // any fixed 64-bit hash of the value
    if (!c.increment(hash)) {
      c.insert(hash, value);
    }
  }

  @Test
  void smallExampleCountedByHand() {
    // dairy x3, frozen x2, chilled x2: the top is dairy with 3 (counted by hand).
    HashedCounts<String> c = new HashedCounts<>(10);
    for (String s : List.of("frozen", "dairy", "chilled", "dairy", "frozen", "dairy", "chilled")) {
      add(c, s);
    }
    assertThat(c.top()).isEqualTo("dairy");
    assertThat(c.topCount()).isEqualTo(3);
    assertThat(c.distinct()).isEqualTo(3);
  }

  @Test
  void tiesGoToTheSmallestValueWhateverTheOrder() {
    List<String> values = new ArrayList<>(List.of("b", "c", "a", "b", "c", "a", "d"));
    for (int seed = 0; seed < 5; seed++) {
      Collections.shuffle(values, new Random(seed));
      HashedCounts<String> c = new HashedCounts<>(10);
      values.forEach(v -> add(c, v));
      assertThat(c.top()).isEqualTo("a");
      assertThat(c.topCount()).isEqualTo(2);
    }
  }

  @Test
  void agreesWithCommonsMathFrequencyAcrossPartsAndMergeOrders() {
    // Reference (D): Commons Math 3 Frequency on the same values, mode = most frequent, smallest.
    Random r = new Random(3);
    List<String> values = new ArrayList<>();
    Frequency reference = new Frequency();
    for (int i = 0; i < 20_000; i++) {
      String v = "v" + (int) Math.floor(Math.abs(r.nextGaussian()) * 40);
      values.add(v);
      reference.addValue(v);
    }
    String mode = (String) reference.getMode().get(0);
    for (int parts : new int[] {1, 3, 17}) {
      List<HashedCounts<String>> pieces = new ArrayList<>();
      for (int p = 0; p < parts; p++) {
        pieces.add(new HashedCounts<>(1_000));
      }
      for (int i = 0; i < values.size(); i++) {
        add(pieces.get(i % parts), values.get(i));
      }
      Collections.reverse(pieces);
      HashedCounts<String> all = pieces.get(0);
      for (int p = 1; p < parts; p++) {
        all.merge(pieces.get(p));
      }
      assertThat(all.top()).isEqualTo(mode);
      assertThat(all.topCount()).isEqualTo(reference.getCount(mode));
      assertThat(all.distinct()).isEqualTo(reference.getUniqueCount());
    }
  }

  @Test
  void countsAddedManyAtOnceEqualOneAtATime() {
    // Reference: the same values added one at a time (smallExampleCountedByHand's pattern).
    List<String> values = List.of("frozen", "dairy", "chilled", "dairy", "frozen", "dairy", "chilled", "dairy");
    HashedCounts<String> one = new HashedCounts<>(10);
    values.forEach(v -> add(one, v));
    HashedCounts<String> many = new HashedCounts<>(10);
    for (String v : List.of("frozen", "dairy", "chilled")) {
      long n = values.stream().filter(v::equals).count();
      long hash = v.hashCode() * 0x9E3779B97F4A7C15L;
      if (!many.increment(hash, n)) {
        many.insert(hash, v, n);
      }
    }
    assertThat(many.top()).isEqualTo(one.top()).isEqualTo("dairy");
    assertThat(many.topCount()).isEqualTo(one.topCount()).isEqualTo(4);
    assertThat(many.distinct()).isEqualTo(3);
    assertThat(many.increment("dairy".hashCode() * 0x9E3779B97F4A7C15L, 3)).isTrue();
    assertThat(many.topCount()).isEqualTo(7);
  }

  @Test
  void overflowPastTheLimitIsStickyAndGivesNoTop() {
    HashedCounts<String> c = new HashedCounts<>(3);
    List.of("a", "b", "c").forEach(v -> add(c, v));
    assertThat(c.overflowed()).isFalse();
    add(c, "d");
    assertThat(c.overflowed()).isTrue();
    assertThat(c.top()).isNull();
    assertThat(c.topCount()).isZero();
    HashedCounts<String> other = new HashedCounts<>(3);
    add(other, "a");
    assertThat(other.merge(c).overflowed()).isTrue();
    HashedCounts<String> x = new HashedCounts<>(3);
    HashedCounts<String> y = new HashedCounts<>(3);
    List.of("a", "b").forEach(v -> add(x, v));
    List.of("c", "e").forEach(v -> add(y, v));
    assertThat(x.merge(y).overflowed()).as("a union of 4 values past a limit of 3").isTrue();
  }

  @Test
  void serializationKeepsCounts() throws Exception {
    HashedCounts<String> c = new HashedCounts<>(100);
    for (int i = 0; i < 50; i++) {
      add(c, "k" + (i % 7));
    }
    ByteArrayOutputStream bytes = new ByteArrayOutputStream();
    try (ObjectOutputStream out = new ObjectOutputStream(bytes)) {
      out.writeObject(c);
    }
    @SuppressWarnings("unchecked")
    HashedCounts<String> back = (HashedCounts<String>) new ObjectInputStream(
        new ByteArrayInputStream(bytes.toByteArray())).readObject();
    assertThat(back.top()).isEqualTo(c.top());
    assertThat(back.topCount()).isEqualTo(c.topCount());
    assertThat(back.distinct()).isEqualTo(7);
    add(back, "k0");
    assertThat(back.topCount()).isEqualTo(c.topCount() + 1);
  }

  @Test
  void limitIsChecked() {
    assertThatThrownBy(() -> new HashedCounts<String>(0))
        .hasMessage("Cannot count up to 0 distinct values");
  }
}
