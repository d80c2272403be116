package dev.sluice.stats;

import static org.assertj.core.api.Assertions.assertThat;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;

/**
 * Not an outside reference: a batch added with {@link OrderWindows#addAll} must leave the same
 * counts, held values and histograms as {@link OrderWindows#add} one value at a time, and group the
 * values by the region add returns (RankSearchTest checks the search built on add against Commons
 * Math).
 */
class OrderWindowsTest {

  private static long key(double x) {
    return OrderWindows.key(x);
  }

  /** Window layouts that exercise the region table and its fall-backs. */
  private static List<OrderWindows> layouts() {
    List<OrderWindows> out = new ArrayList<>();
    // Seven windows as a quartile search with fence bands makes them; one starts as a histogram.
    double[] edges = {1.3, 4.0, 22.1, 23.6, 43.0, 43.5, 49.9, 50.3, 56.6, 57.0, 76.3, 77.9, 96.1, 98.8};
    long[] lo = new long[7];
    long[] hi = new long[7];
    for (int w = 0; w < 7; w++) {
      lo[w] = key(edges[2 * w]);
      hi[w] = key(edges[2 * w + 1]);
    }
    out.add(new OrderWindows(lo, hi, new boolean[] {false, false, true, false, false, false, false}, 50));
    // A single-key window, windows with no key between them, one ending at the key of -0.0 and
    // one starting just above it; the window [0, 0] is the key of 0.0 alone.
    out.add(new OrderWindows(new long[] {key(-2.0), key(-1.0) + 1, 0, 1, key(3.0)},
        new long[] {key(-1.0), -1, 0, key(2.0), key(3.0)}, new boolean[5], 1_000_000));
    // Windows at the ends of the line (the table is skipped), and nine windows.
    out.add(new OrderWindows(new long[] {Long.MIN_VALUE, key(0.5)}, new long[] {key(-0.5), Long.MAX_VALUE},
        new boolean[2], 1_000_000));
    long[] nineLo = new long[9];
    long[] nineHi = new long[9];
    for (int w = 0; w < 9; w++) {
      nineLo[w] = key(w * 10.0);
      nineHi[w] = key(w * 10.0 + 0.5);
    }
    out.add(new OrderWindows(nineLo, nineHi, new boolean[9], 3));
    // A span of a few ulps near 1e15 and one over nearly the whole double range.
    out.add(new OrderWindows(new long[] {key(1e15), key(Math.nextUp(Math.nextUp(1e15)))},
        new long[] {key(Math.nextUp(1e15)), key(Math.nextUp(Math.nextUp(Math.nextUp(1e15))))},
        new boolean[2], 1_000_000));
    out.add(new OrderWindows(new long[] {key(-1e308), key(1e308)}, new long[] {key(-1e307), key(1.5e308)},
        new boolean[2], 1_000_000));
    return out;
  }

  /** Values spread over the windows, their edges and the points just beside them, and extremes. */
  private static double[] values(OrderWindows layout, SplittableRandom random, int n) {
    List<Double> special = new ArrayList<>(List.of(0.0, -0.0, Double.MIN_VALUE, -Double.MIN_VALUE,
        Double.MAX_VALUE, -Double.MAX_VALUE, 1e15, Math.nextUp(1e15), Math.nextDown(1e15)));
    for (int w = 0; w < layout.windows(); w++) {
      for (long k : new long[] {layout.firstKey(w), layout.lastKey(w)}) {
        for (long d = -2; d <= 2; d++) {
          double v = OrderWindows.value(k + d);
          if (Double.isFinite(v)) {
            special.add(v);
          }
        }
      }
    }
    double[] x = new double[n];
    for (int i = 0; i < n; i++) {
      double u = random.nextDouble();
      x[i] = u < 0.2 ? special.get(random.nextInt(special.size()))
          : u < 0.9 ? random.nextDouble() * 110.0 - 5.0
          : (random.nextDouble() - 0.5) * Math.scalb(1.0, random.nextInt(-1074, 1024));
    }
    return x;
  }

  @Test
  void aBatchAddedAtOnceLeavesTheSameFiguresAsOneValueAtATime() {
    SplittableRandom random = new SplittableRandom(20261203L);
    for (OrderWindows layout : layouts()) {
      OrderWindows one = layout.emptyCopy();
      OrderWindows all = layout.emptyCopy();
      int regions = layout.regions();
      for (int batch : new int[] {1, 4096, 0, 777, 5000}) {
        double[] x = values(layout, random, batch);
        List<List<Double>> expected = addedOneByOne(one, x, i -> true);
        double[] grouped = new double[batch];
        int[] starts = new int[regions + 1];
        all.addAll(x, batch, grouped, starts);
        assertGrouped(layout, grouped, starts, expected);
        assertThat(starts[regions]).isEqualTo(batch);
      }
      assertSameFigures(all, one);
    }
  }

  @Test
  void valuesLeftOutByTheFilterAreNeitherCountedNorHeld() {
    SplittableRandom random = new SplittableRandom(20261204L);
    for (OrderWindows layout : layouts()) {
      OrderWindows one = layout.emptyCopy();
      OrderWindows within = layout.emptyCopy();
      int regions = layout.regions();
      double[] x = values(layout, random, 3000);
      boolean[] isNull = new boolean[x.length];
      // Nulls, NaN, infinities and values outside [low, high] among the values, at random.
      double low = x[random.nextInt(x.length)];
      double high = Math.max(low, x[random.nextInt(x.length)]);
      for (int i = 0; i < x.length; i++) {
        int kind = random.nextInt(20);
        if (kind == 0) {
          isNull[i] = true;
        } else if (kind == 1) {
          x[i] = Double.NaN;
        } else if (kind == 2) {
          x[i] = random.nextBoolean() ? Double.POSITIVE_INFINITY : Double.NEGATIVE_INFINITY;
        }
      }
      List<List<Double>> expected =
          addedOneByOne(one, x, i -> !isNull[i] && x[i] >= low && x[i] <= high);
      int kept = expected.stream().mapToInt(List::size).sum();
      double[] grouped = new double[x.length];
      int[] starts = new int[regions + 1];
      assertThat(within.addAllWithin(x, isNull, x.length, low, high, grouped, starts)).isEqualTo(kept);
      assertThat(starts[regions]).isEqualTo(kept);
      assertGrouped(layout, grouped, starts, expected);
      assertSameFigures(within, one);
    }
  }

  /**
   * The values {@code x[i]} that {@code keep} takes, added one at a time to {@code one}, listed by
   * the region {@link OrderWindows#add} placed each in, in their order.
   */
  private static List<List<Double>> addedOneByOne(OrderWindows one, double[] x,
      java.util.function.IntPredicate keep) {
    List<List<Double>> out = new ArrayList<>();
    for (int r = 0; r < one.regions(); r++) {
      out.add(new ArrayList<>());
    }
    for (int i = 0; i < x.length; i++) {
      if (keep.test(i)) {
        out.get(one.add(x[i])).add(x[i]);
      }
    }
    return out;
  }

  /**
   * Region r's values in {@code grouped[starts[r] .. starts[r + 1] - 1]} are {@code expected.get(r)}
   * in their order, bit for bit, so that -0.0 stays -0.0 for the moments that take these values.
   */
  private static void assertGrouped(OrderWindows layout, double[] grouped, int[] starts,
      List<List<Double>> expected) {
    for (int r = 0; r < layout.regions(); r++) {
      double[] got = Arrays.copyOfRange(grouped, starts[r], starts[r + 1]);
      double[] want = expected.get(r).stream().mapToDouble(Double::doubleValue).toArray();
      assertThat(Arrays.stream(got).mapToLong(Double::doubleToRawLongBits).toArray())
          .as("region %d of %s", r, Arrays.toString(window(layout)))
          .containsExactly(Arrays.stream(want).mapToLong(Double::doubleToRawLongBits).toArray());
    }
  }

  /**
   * Same counts per region, same overflow, histograms and held values (as multisets) per window.
   * In a merge the total is the same either way, so a window overflows in both or in neither.
   */
  private static void assertSameFigures(OrderWindows got, OrderWindows want) {
    for (int r = 0; r < want.regions(); r++) {
      assertThat(got.regionCount(r)).isEqualTo(want.regionCount(r));
    }
    for (int w = 0; w < want.windows(); w++) {
      assertThat(got.resolved(w)).isEqualTo(want.resolved(w));
      assertThat(got.histogram(w)).isEqualTo(want.histogram(w));
      double[] a = got.heldValues(w);
      double[] b = want.heldValues(w);
      Arrays.sort(a);
      Arrays.sort(b);
      assertThat(a).containsExactly(b);
    }
  }

  @Test
  void partsMergedHoldWhatOneAccumulatorHolds() {
    SplittableRandom random = new SplittableRandom(71);
    for (OrderWindows layout : layouts()) {
      double[] x = values(layout, random, 6000);
      OrderWindows whole = layout.emptyCopy();
      OrderWindows[] parts = {layout.emptyCopy(), layout.emptyCopy(), layout.emptyCopy()};
      for (int i = 0; i < x.length; i++) {
        whole.add(x[i]);
        parts[i % 3].add(x[i]);
      }
      assertSameFigures(parts[0].merge(parts[1]).merge(parts[2]), whole);
    }
  }

  private static long[] window(OrderWindows layout) {
    long[] out = new long[2 * layout.windows()];
    for (int w = 0; w < layout.windows(); w++) {
      out[2 * w] = layout.firstKey(w);
      out[2 * w + 1] = layout.lastKey(w);
    }
    return out;
  }
}
