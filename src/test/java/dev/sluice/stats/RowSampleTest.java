package dev.sluice.stats;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

import dev.sluice.testing.ReferenceData;
import java.io.ByteArrayInputStream;
import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.ObjectInputStream;
import java.io.ObjectOutputStream;
import java.lang.management.ManagementFactory;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Collections;
import java.util.Comparator;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Random;
import java.util.TreeSet;
import org.apache.commons.math3.stat.descriptive.moment.Mean;
import org.apache.commons.math3.stat.descriptive.moment.Variance;
import org.junit.jupiter.api.Test;

/**
 * The expected sample is worked out from its definition by brute force in {@link #expected}: the
 * rows grouped by normalized content and counted, then every content whose hash is among the k
 * smallest distinct hashes, sorted by hash and content. The accumulator itself (heap, hash table,
 * eviction, merge) is checked against that.
 */
class RowSampleTest {
  private static final double NAN = Double.NaN;

  /** The sample a multiset of rows must give, worked out from the definition. */
  record Expected(double[][] rows, long[] weights, boolean complete) {}

  static double[] normalized(double[] row) {
    return Arrays.stream(row).map(v -> v == 0.0 ? 0.0 : Double.isNaN(v) ? NAN : v).toArray();
  }

  static Expected expected(List<double[]> table, int capacity) {
    Map<List<Double>, Long> counts = new HashMap<>();
    for (double[] row : table) {
      List<Double> key = Arrays.stream(normalized(row)).boxed().toList();
      counts.merge(key, 1L, Long::sum);
    }
    TreeSet<Long> hashes = new TreeSet<>();
    for (List<Double> key : counts.keySet()) {
      hashes.add(RowSample.hash(key.stream().mapToDouble(Double::doubleValue).toArray()));
    }
    long limit = hashes.size() <= capacity
        ? Long.MAX_VALUE : hashes.stream().skip(capacity - 1L).findFirst().orElseThrow();
    Comparator<double[]> byContent = (x, y) -> {
      for (int i = 0; i < x.length; i++) {
        int c = Double.compare(x[i], y[i]);
        if (c != 0) {
          return c;
        }
      }
      return 0;
    };
    List<double[]> kept = new ArrayList<>();
    for (List<Double> key : counts.keySet()) {
      double[] row = key.stream().mapToDouble(Double::doubleValue).toArray();
      if (RowSample.hash(row) <= limit) {
        kept.add(row);
      }
    }
    kept.sort(Comparator.<double[]>comparingLong(RowSample::hash).thenComparing(byContent));
    long[] weights = kept.stream()
        .mapToLong(r -> counts.get(Arrays.stream(r).boxed().toList())).toArray();
    return new Expected(kept.toArray(new double[0][]), weights, hashes.size() <= capacity);
  }

  /** A multiset with repeats, missing entries, -0.0 and 0.0, and infinities. */
  static List<double[]> table(long seed, int rows, int distinct, int width) {
    Random random = new Random(seed);
    double[][] contents = new double[distinct][width];
    for (double[] c : contents) {
      for (int j = 0; j < width; j++) {
        int kind = random.nextInt(20);
        c[j] = switch (kind) {
          case 0 -> NAN;
          case 1 -> -0.0;
          case 2 -> 0.0;
          case 3 -> Double.POSITIVE_INFINITY;
          default -> random.nextInt(50) / 4.0;
        };
      }
    }
    List<double[]> table = new ArrayList<>();
    for (int i = 0; i < rows; i++) {
      table.add(contents[(int) Math.floor(Math.pow(random.nextDouble(), 2) * distinct)].clone());
    }
    return table;
  }

  /** Adds the rows through one reused array, as the caller does. */
  static RowSample sampleOf(List<double[]> rows, int capacity, int width) {
    RowSample sample = new RowSample(capacity, width);
    double[] buffer = new double[width];
    for (double[] row : rows) {
      System.arraycopy(row, 0, buffer, 0, width);
      sample.add(buffer);
      Arrays.fill(buffer, 12345.0);
    }
    return sample;
  }

  @Test
  void smallTableIsKeptWholeWithItsCounts() {
    List<double[]> table = table(11L, 400, 60, 3);
    Expected want = expected(table, 100);
    assertThat(want.complete()).isTrue();

    RowSample sample = sampleOf(table, 100, 3);

    assertThat(sample.complete()).isTrue();
    assertThat(sample.offered()).isEqualTo(400);
    assertThat(sample.size()).isEqualTo(want.rows().length);
    assertThat(Arrays.deepEquals(sample.rows(), want.rows())).isTrue();
    assertThat(sample.weights()).containsExactly(want.weights());
    assertThat(Arrays.stream(sample.weights()).sum()).isEqualTo(400);
    assertThat(Arrays.deepEquals(sample.weighted().rows(), want.rows())).isTrue();
    assertThat(sample.weighted().weights()).containsExactly(want.weights());
  }

  @Test
  void completeOnlyWhileTheDistinctRowsFit() {
    List<double[]> table = new ArrayList<>();
    for (int i = 0; i < 10; i++) {
      table.add(new double[] {i});
      table.add(new double[] {i});
    }
    assertThat(sampleOf(table, 10, 1).complete()).isTrue();
    assertThat(sampleOf(table, 10, 1).size()).isEqualTo(10);
    assertThat(sampleOf(table, 9, 1).complete()).isFalse();
    assertThat(sampleOf(table, 9, 1).size()).isEqualTo(9);
    assertThat(new RowSample(5, 2).complete()).isTrue();
    assertThat(new RowSample(5, 2).size()).isZero();
  }

  @Test
  void sameSampleWhateverTheSplitAndOrder() {
    int capacity = 256;
    List<double[]> table = table(20240611L, 6000, 2000, 4);
    Expected want = expected(table, capacity);
    assertThat(want.complete()).isFalse();
    assertThat(want.rows().length).isEqualTo(capacity);

    Random random = new Random(7L);
    for (int trial = 0; trial < 12; trial++) {
      List<double[]> shuffled = new ArrayList<>(table);
      Collections.shuffle(shuffled, random);
      int parts = 1 + random.nextInt(9);
      List<List<double[]>> split = new ArrayList<>();
      for (int p = 0; p < parts; p++) {
        split.add(new ArrayList<>());
      }
      for (double[] row : shuffled) {
        // Uneven parts: some take most rows, some may stay empty.
        split.get((int) (Math.pow(random.nextDouble(), 3) * parts)).add(row);
      }
      List<RowSample> samples = new ArrayList<>();
      for (List<double[]> part : split) {
        samples.add(sampleOf(part, capacity, 4));
      }
      while (samples.size() > 1) {
        RowSample a = samples.remove(random.nextInt(samples.size()));
        RowSample b = samples.remove(random.nextInt(samples.size()));
        samples.add(a.merge(b));
      }
      RowSample merged = samples.get(0);

      assertThat(Arrays.deepEquals(merged.rows(), want.rows())).as("trial %d", trial).isTrue();
      assertThat(merged.weights()).as("trial %d", trial).containsExactly(want.weights());
      RowSample.Weighted both = merged.weighted();
      assertThat(Arrays.deepEquals(both.rows(), want.rows())).as("trial %d", trial).isTrue();
      assertThat(both.weights()).as("trial %d", trial).containsExactly(want.weights());
      assertThat(merged.offered()).isEqualTo(table.size());
      assertThat(merged.complete()).isFalse();
    }
  }

  @Test
  void repeatedRowsAreKeptOnceWithTheirCount() {
    RowSample sample = new RowSample(4, 2);
    double[] row = {1.5, NAN};
    sample.add(row);
    row[0] = 2.5; // the caller reuses its array: the kept copy must not change
    sample.add(row);
    row[0] = 1.5;
    sample.add(row);
    sample.add(new double[] {1.5, NAN});

    assertThat(sample.size()).isEqualTo(2);
    assertThat(sample.offered()).isEqualTo(4);
    double[][] rows = sample.rows();
    long[] weights = sample.weights();
    int first = rows[0][0] == 1.5 ? 0 : 1;
    assertThat(rows[first]).containsExactly(1.5, NAN);
    assertThat(weights[first]).isEqualTo(3);
    assertThat(rows[1 - first]).containsExactly(2.5, NAN);
    assertThat(weights[1 - first]).isEqualTo(1);
  }

  @Test
  void negativeZeroAndEveryNanAreOneContent() {
    double otherNan = Double.longBitsToDouble(0x7ff0000000000001L);
    double negativeNan = Double.longBitsToDouble(0xfff8000000000000L);
    assertThat(Double.isNaN(otherNan) && Double.isNaN(negativeNan)).isTrue();
    assertThat(RowSample.hash(new double[] {-0.0, 1.0})).isEqualTo(RowSample.hash(new double[] {0.0, 1.0}));
    assertThat(RowSample.hash(new double[] {otherNan})).isEqualTo(RowSample.hash(new double[] {NAN}));
    assertThat(RowSample.hash(new double[] {1.0, 2.0})).isNotEqualTo(RowSample.hash(new double[] {2.0, 1.0}));
    // Position matters in every lane and in the fold of the lanes: the 720 orders of six values
    // hash to 720 different values.
    java.util.Set<Long> orders = new java.util.HashSet<>();
    permute(new double[] {1, 2, 3, 4, 5, 6}, 0, orders);
    assertThat(orders).hasSize(720);

    RowSample sample = new RowSample(10, 2);
    sample.add(new double[] {-0.0, NAN});
    sample.add(new double[] {0.0, otherNan});
    sample.add(new double[] {0.0, negativeNan});
    sample.add(new double[] {Double.NEGATIVE_INFINITY, Double.POSITIVE_INFINITY});

    assertThat(sample.size()).isEqualTo(2);
    double[][] rows = sample.rows();
    long[] weights = sample.weights();
    int zero = rows[0][0] == 0.0 ? 0 : 1;
    assertThat(weights[zero]).isEqualTo(3);
    assertThat(Double.doubleToRawLongBits(rows[zero][0])).isZero(); // +0.0, not -0.0
    assertThat(Double.doubleToRawLongBits(rows[zero][1])).isEqualTo(0x7ff8000000000000L);
    assertThat(rows[1 - zero]).containsExactly(Double.NEGATIVE_INFINITY, Double.POSITIVE_INFINITY);
    assertThat(weights[1 - zero]).isEqualTo(1);
  }

  @Test
  void hashingColumnByColumnGivesEachRowsHash() {
    // Not an outside reference: Hasher must give exactly hash(row) for every width (each lane and
    // each tail length) and for the contents hash treats alike (-0.0, every NaN).
    java.util.Random random = new java.util.Random(59);
    double[] pool = {-0.0, 0.0, NAN, Double.longBitsToDouble(0x7ff0000000000001L), Double.POSITIVE_INFINITY, 1.5};
    RowSample.Hasher hasher = new RowSample.Hasher();
    for (int width = 1; width <= 9; width++) {
      for (int n : new int[] {1, 300, 5000}) {
        double[][] columns = new double[width][n];
        for (double[] column : columns) {
          for (int r = 0; r < n; r++) {
            column[r] = random.nextDouble() < 0.3 ? pool[random.nextInt(pool.length)] : random.nextGaussian();
          }
        }
        long[] hashes = hasher.of(columns, n);
        for (int r = 0; r < n; r++) {
          double[] row = new double[width];
          for (int j = 0; j < width; j++) {
            row[j] = columns[j][r];
          }
          assertThat(hashes[r]).as("width %d, row %d", width, r).isEqualTo(RowSample.hash(row));
        }
      }
    }
  }

  private static void permute(double[] values, int from, java.util.Set<Long> hashes) {
    if (from == values.length) {
      hashes.add(RowSample.hash(values));
      return;
    }
    for (int i = from; i < values.length; i++) {
      double t = values[from];
      values[from] = values[i];
      values[i] = t;
      permute(values, from + 1, hashes);
      values[i] = values[from];
      values[from] = t;
    }
  }

  // Inverse of the SplitMix64 output function (each xor-shift and odd multiplier is invertible),
  // used to build two different rows with the same hash.
  private static long unXorShift(long x, int shift) {
    long y = x;
    for (int i = 0; i < 64 / shift + 1; i++) {
      y = x ^ (y >>> shift);
    }
    return y;
  }

  private static long inverseOdd(long c) {
    long inv = c;
    for (int i = 0; i < 6; i++) {
      inv *= 2 - c * inv;
    }
    return inv;
  }

  private static long unMix13(long h) {
    long z = unXorShift(h, 31);
    z *= inverseOdd(0x94D049BB133111EBL);
    z = unXorShift(z, 27);
    z *= inverseOdd(0xBF58476D1CE4E5B9L);
    return unXorShift(z, 30);
  }

  private static final long K = 0x9E3779B97F4A7C15L;

  /**
   * A row (a, b) different from {@code row} (of width 2) with the same hash, by running the
   * documented construction backwards: for width 2 the lanes are L0 = rotl(bits(a) K, 29), L1 =
   * rotl(bits(b) K, 29) and L2 = L3 = 0, and the hash is mix13(L0 K^3 + L1 K^2 + K).
   */
  private static double[] collidingWith(double[] row) {
    long folded = unMix13(RowSample.hash(row)) - K; // L0 K^3 + L1 K^2
    long inverse = inverseOdd(K);
    for (double a = 1.0; ; a++) {
      long lane0 = Long.rotateLeft(Double.doubleToLongBits(a) * K, 29);
      long lane1 = (folded - lane0 * K * K * K) * inverse * inverse;
      double b = Double.longBitsToDouble(Long.rotateRight(lane1, 29) * inverse);
      if (!Double.isNaN(b) && b != 0.0 && a != row[0]) {
        return new double[] {a, b};
      }
    }
  }

  @Test
  void rowsWithTheSameHashAreKeptSeparately() {
    double[] first = {0.5, 7.0};
    double[] second = collidingWith(first);
    assertThat(RowSample.hash(second)).isEqualTo(RowSample.hash(first));
    assertThat(second).isNotEqualTo(first);
    // A third row with a smaller hash, and one with a larger hash.
    double[] smaller = null;
    double[] larger = null;
    for (double v = 0; smaller == null || larger == null; v++) {
      double[] candidate = {v, v};
      if (RowSample.hash(candidate) < RowSample.hash(first)) {
        smaller = smaller == null ? candidate : smaller;
      } else if (RowSample.hash(candidate) > RowSample.hash(first)) {
        larger = larger == null ? candidate : larger;
      }
    }
    double[][] inContentOrder = Double.compare(first[0], second[0]) < 0
        ? new double[][] {first, second} : new double[][] {second, first};

    // Capacity 1 counts distinct hashes: both colliding rows stay, with their own weights.
    RowSample sample = new RowSample(1, 2);
    sample.add(larger);
    sample.add(second);
    sample.add(first);
    sample.add(second);
    assertThat(sample.size()).isEqualTo(2);
    assertThat(Arrays.deepEquals(sample.rows(), inContentOrder)).isTrue();
    assertThat(sample.weights()).containsExactly(inContentOrder[0] == first ? new long[] {1, 2} : new long[] {2, 1});
    assertThat(sample.complete()).isFalse();

    // The same through a merge, in the other order.
    RowSample a = new RowSample(1, 2);
    a.add(first);
    RowSample b = new RowSample(1, 2);
    b.add(second);
    b.add(second);
    b.add(larger);
    RowSample merged = b.merge(a);
    assertThat(Arrays.deepEquals(merged.rows(), sample.rows())).isTrue();
    assertThat(merged.weights()).containsExactly(sample.weights());

    // A smaller hash evicts both entries of the colliding hash at once.
    sample.add(smaller);
    assertThat(sample.size()).isEqualTo(1);
    assertThat(sample.rows()[0]).containsExactly(smaller);
  }

  // Uniformity. Reference: the table's mean and variance by Commons Math (D); the standard error
  // of the mean of a simple random sample of k out of N without replacement is the textbook
  // formula sqrt((1 - k / N) S^2 / k), S^2 the table variance with divisor N - 1 (Cochran,
  // Sampling Techniques, ch. 2; from memory). Four standard errors: common practice. Column 0
  // rises with the row number, so a sample that kept the first or last rows would miss by far.
  @Test
  void sampleMeansMatchTheTableMeans() {
    int rows = 200_000;
    Random random = new Random(424242L);
    double[][] table = new double[rows][];
    for (int i = 0; i < rows; i++) {
      table[i] = new double[] {(double) i / rows, -Math.log(random.nextDouble()), random.nextGaussian()};
    }
    for (int capacity : new int[] {500, 4000}) {
      RowSample sample = sampleOf(Arrays.asList(table), capacity, 3);
      assertThat(sample.size()).isEqualTo(capacity);
      assertThat(sample.weights()).containsOnly(1L);
      double[][] kept = sample.rows();
      for (int j = 0; j < 3; j++) {
        double[] column = ReferenceData.column(table, j);
        double tableMean = new Mean().evaluate(column);
        double s2 = new Variance().evaluate(column);
        double standardError = Math.sqrt((1.0 - (double) capacity / rows) * s2 / capacity);
        double sampleMean = new Mean().evaluate(ReferenceData.column(kept, j));
        assertThat(Math.abs(sampleMean - tableMean))
            .as("column %d, capacity %d", j, capacity)
            .isLessThan(4 * standardError);
      }
      // The first rows alone fail the same criterion: the check can tell a biased choice.
      double[] column0 = ReferenceData.column(table, 0);
      double firstMean = new Mean().evaluate(ReferenceData.column(Arrays.copyOf(table, capacity), 0));
      assertThat(Math.abs(firstMean - new Mean().evaluate(column0)))
          .isGreaterThan(4 * Math.sqrt((1.0 - (double) capacity / rows) * new Variance().evaluate(column0) / capacity));
    }
  }

  private static byte[] serialize(Object o) throws IOException {
    ByteArrayOutputStream bytes = new ByteArrayOutputStream();
    try (ObjectOutputStream out = new ObjectOutputStream(bytes)) {
      out.writeObject(o);
    }
    return bytes.toByteArray();
  }

  private static RowSample deserialize(byte[] bytes) throws IOException, ClassNotFoundException {
    try (ObjectInputStream in = new ObjectInputStream(new ByteArrayInputStream(bytes))) {
      return (RowSample) in.readObject();
    }
  }

  @Test
  void survivesJavaSerialization() throws Exception {
    List<double[]> table = table(99L, 3000, 900, 3);
    RowSample original = sampleOf(table.subList(0, 2000), 200, 3);
    RowSample copy = deserialize(serialize(original));

    assertThat(copy.capacity()).isEqualTo(200);
    assertThat(copy.width()).isEqualTo(3);
    assertThat(copy.offered()).isEqualTo(2000);
    assertThat(copy.complete()).isFalse();
    assertThat(Arrays.deepEquals(copy.rows(), original.rows())).isTrue();
    assertThat(copy.weights()).containsExactly(original.weights());

    // The rebuilt look-up structures keep working: both go on to the sample of the whole table.
    Expected want = expected(table, 200);
    double[] buffer = new double[3];
    for (double[] row : table.subList(2000, 3000)) {
      System.arraycopy(row, 0, buffer, 0, 3);
      original.add(buffer);
      copy.add(buffer);
    }
    assertThat(Arrays.deepEquals(copy.rows(), want.rows())).isTrue();
    assertThat(copy.weights()).containsExactly(want.weights());
    assertThat(Arrays.deepEquals(original.rows(), want.rows())).isTrue();

    RowSample empty = deserialize(serialize(new RowSample(3, 2)));
    assertThat(empty.size()).isZero();
    assertThat(empty.complete()).isTrue();
    empty.add(new double[] {1, 2});
    assertThat(empty.size()).isEqualTo(1);
  }

  @Test
  void mergingWithItselfDoublesTheCounts() {
    RowSample sample = sampleOf(table(5L, 300, 80, 2), 50, 2);
    double[][] rows = sample.rows();
    long[] weights = sample.weights();
    sample.merge(sample);
    assertThat(Arrays.deepEquals(sample.rows(), rows)).isTrue();
    assertThat(sample.weights()).containsExactly(Arrays.stream(weights).map(w -> 2 * w).toArray());
    assertThat(sample.offered()).isEqualTo(600);
  }

  @Test
  void rejectsBadArguments() {
    assertThatThrownBy(() -> new RowSample(0, 3)).isInstanceOf(IllegalArgumentException.class).hasMessageContaining("capacity 0");
    assertThatThrownBy(() -> new RowSample(-5, 3)).isInstanceOf(IllegalArgumentException.class).hasMessageContaining("-5");
    assertThatThrownBy(() -> new RowSample(RowSample.MAX_CAPACITY + 1, 3))
        .isInstanceOf(IllegalArgumentException.class).hasMessageContaining(String.valueOf(RowSample.MAX_CAPACITY + 1));
    assertThatThrownBy(() -> new RowSample(10, 0)).isInstanceOf(IllegalArgumentException.class).hasMessageContaining("width 0");

    RowSample sample = new RowSample(10, 3);
    assertThatThrownBy(() -> sample.add(new double[2]))
        .isInstanceOf(IllegalArgumentException.class).hasMessageContaining("2 values").hasMessageContaining("width 3");
    assertThatThrownBy(() -> sample.merge(new RowSample(10, 4)))
        .isInstanceOf(IllegalArgumentException.class).hasMessageContaining("width 4");
    assertThatThrownBy(() -> sample.merge(new RowSample(11, 3)))
        .isInstanceOf(IllegalArgumentException.class).hasMessageContaining("capacity 11");
    assertThat(sample.offered()).isZero();
  }

  // Rows rejected by the threshold must not allocate (the hot path of a large partition). Checked
  // with the JVM's per-thread allocation counter; any allocation per row (16 bytes or more) over
  // a million rows would show as megabytes.
  @Test
  void rejectedRowsAllocateNothing() {
    java.lang.management.ThreadMXBean plain = ManagementFactory.getThreadMXBean();
    assumeTrue(plain instanceof com.sun.management.ThreadMXBean);
    com.sun.management.ThreadMXBean threads = (com.sun.management.ThreadMXBean) plain;
    assumeTrue(threads.isThreadAllocatedMemorySupported() && threads.isThreadAllocatedMemoryEnabled());

    RowSample sample = new RowSample(100, 8);
    Random random = new Random(3L);
    double[] row = new double[8];
    for (int i = 0; i < 20_000; i++) {
      row[i % 8] = random.nextDouble();
      sample.add(row);
    }
    long before = threads.getCurrentThreadAllocatedBytes();
    for (int i = 0; i < 1_000_000; i++) {
      row[i % 8] = random.nextDouble();
      sample.add(row);
    }
    long allocated = threads.getCurrentThreadAllocatedBytes() - before;
    assertThat(sample.size()).isEqualTo(100);
    assertThat(allocated).isLessThan(256 * 1024);
  }
}
