package dev.sluice.stats;

import static org.assertj.core.api.Assertions.assertThat;

import java.util.Arrays;
import java.util.Random;
import org.junit.jupiter.api.Test;

/**
 * The radix sort against the JDK's comparison sort ({@code java.util.Arrays.sort}, whose order of
 * doubles is {@code Double.compare}: -0.0 before 0.0, NaN last) as the reference.
 */
class RadixSortTest {
  /** Values of every kind: both signs, zeros of both signs, subnormals, infinities, repeats. */
  private static double[] mixed(int n, long seed) {
    Random random = new Random(seed);
    double[] out = new double[n];
    double[] special = {0.0, -0.0, Double.MIN_VALUE, -Double.MIN_VALUE, Double.MAX_VALUE,
        -Double.MAX_VALUE, Double.POSITIVE_INFINITY, Double.NEGATIVE_INFINITY, 1.0, -1.0};
    for (int i = 0; i < n; i++) {
      int kind = random.nextInt(10);
      out[i] = kind == 0 ? special[random.nextInt(special.length)]
          : kind == 1 ? Math.rint(random.nextGaussian() * 3) // many repeats
          : kind == 2 ? random.nextGaussian() * 1e300
          : (random.nextDouble() - 0.3) * Math.pow(10, random.nextInt(40) - 20);
    }
    return out;
  }

  @Test
  void keysSortDoublesAsTheComparisonSortDoes() {
    double[] values = mixed(200_000, 7);
    long[] keys = new long[values.length];
    for (int i = 0; i < values.length; i++) {
      keys[i] = RadixSort.key(values[i]);
      assertThat(Double.doubleToRawLongBits(RadixSort.value(keys[i])))
          .isEqualTo(Double.doubleToRawLongBits(values[i]));
    }
    RadixSort.sort(keys, null, keys.length, new long[keys.length], null);
    double[] sorted = new double[keys.length];
    for (int i = 0; i < keys.length; i++) {
      sorted[i] = RadixSort.value(keys[i]);
    }
    double[] reference = values.clone();
    Arrays.sort(reference);
    // Arrays.equals on doubles compares bits: -0.0 and 0.0 must be where the reference has them.
    assertThat(Arrays.equals(sorted, reference)).isTrue();
  }

  @Test
  void rowsMoveWithTheirKeysAndEqualKeysKeepTheirOrder() {
    int n = 50_000;
    Random random = new Random(11);
    long[] keys = new long[n];
    int[] rows = new int[n];
    for (int i = 0; i < n; i++) {
      keys[i] = RadixSort.key(random.nextInt(500) - 250.0);
      rows[i] = i;
    }
    long[] original = keys.clone();
    RadixSort.sort(keys, rows, n, new long[n], new int[n]);
    for (int i = 0; i < n; i++) {
      assertThat(keys[i]).isEqualTo(original[rows[i]]);
      if (i > 0) {
        assertThat(Long.compareUnsigned(keys[i - 1], keys[i])).isLessThanOrEqualTo(0);
        if (keys[i - 1] == keys[i]) {
          assertThat(rows[i - 1]).as("stable").isLessThan(rows[i]);
        }
      }
    }
  }

  @Test
  void onlyThePrefixIsSortedAndSharedBytesCostNoPass() {
    long[] keys = {5, 3, 9, 1, 4};
    RadixSort.sort(keys, null, 3, new long[3], null);
    assertThat(keys).containsExactly(3, 5, 9, 1, 4);
    // Keys differing in their highest byte only: one pass, from the scratch back into keys.
    long[] high = {3L << 56, 1L << 56, 2L << 56};
    RadixSort.sort(high, null, 3, new long[3], null);
    assertThat(high).containsExactly(1L << 56, 2L << 56, 3L << 56);
  }

  @Test
  void thePilotSortsAsTheComparisonSortWithNegativeZeroAsZero() {
    double[] values = mixed(100_000, 3);
    values[17] = Double.NaN;
    double[] reference = values.clone();
    for (int i = 0; i < reference.length; i++) {
      reference[i] += 0.0;
    }
    Arrays.sort(reference);
    double[] sorted = RankSearch.sorted(values);
    assertThat(Arrays.equals(sorted, reference)).isTrue();
    assertThat(sorted[sorted.length - 1]).isNaN();
    // Already sorted (the Profiler hands the sorted pilot to firstPlan): copied as it is.
    double[] again = RankSearch.sorted(Arrays.copyOf(reference, reference.length - 1));
    assertThat(Arrays.equals(again, Arrays.copyOf(reference, reference.length - 1))).isTrue();
    assertThat(RankSearch.sorted(new double[] {0.0, -0.0})).containsExactly(0.0, 0.0);
    assertThat(Double.doubleToRawLongBits(RankSearch.sorted(new double[] {-0.0})[0])).isZero();
  }
}
