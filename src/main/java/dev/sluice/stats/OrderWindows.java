package dev.sluice.stats;

import java.io.IOException;
import java.io.ObjectOutputStream;
import java.io.Serializable;
import java.util.Arrays;
import org.apache.commons.math3.util.KthSelector;

/**
 * One pass of an exact order-statistic search ({@link RankSearch}): counts of the values that fall
 * below, inside and between a few value windows, and the values inside each window themselves.
 *
 * <p>Values are ordered by their sortable key ({@link #key}), a 64-bit integer that sorts like the
 * double itself, with -0.0 equal to 0.0. The windows are disjoint, ascending, inclusive ranges of
 * keys. They split the line into 2w + 1 regions: gap 0 below window 0, window 0, gap 1, ...,
 * window w - 1, gap w. Every value adds one to its region's count. A window of a single key only
 * counts; any other window holds the values that fall in it, up to {@code maxHeld} of them, and
 * beyond that turns into a histogram of {@link #BUCKETS} equal ranges of keys, so that memory stays
 * bounded whatever the data.
 *
 * <p>Counts, held values (as a multiset) and histograms do not depend on the order values arrive
 * in or on how they are split into parts and merged, so neither does anything derived from them.
 * Whether a window overflowed into a histogram can depend on the split (a part may overflow while
 * the whole would not); the search stays exact either way and may need one more pass.
 *
 * <p>Memory: at most {@code maxHeld} doubles per window, or {@link #BUCKETS} longs once it
 * overflowed. Only finite values may be added; the caller filters NaN, infinities and nulls.
 */
public final class OrderWindows implements Serializable {
  private static final long serialVersionUID = 1L;
  /** Number of equal key ranges a window's histogram splits it into. */
  public static final int BUCKETS = 4096;

  private final long[] lo;
  private final long[] hi;
  private final int maxHeld;
  private final long[] counts;
  private final double[][] held;
  private final int[] heldSize;
  private final long[][] buckets;
  /** Selects order statistics in place, in linear time (no full sort of the held values). */
  private static final KthSelector SELECTOR = new KthSelector();
  /** Entries of a window's cache of selection pivots: ten levels, as Commons Math's Percentile. */
  private static final int PIVOT_CACHE = (1 << 10) - 1;
  /**
   * Per window, the pivots earlier selections left in its held values, so that the next one
   * starts from them; null until a selection (reset by every add and merge).
   */
  private transient int[][] pivots;
  /** Scratch of {@link #addAll}: each value's region. */
  private transient int[] regionScratch;
  /** The region table of {@link #addAll}, built on first use. */
  private transient RegionLookup lookup;

  /**
   * @param lo first key of each window, ascending
   * @param hi last key of each window (inclusive), each below the next window's first key
   * @param histogram windows that start as histograms (their values are known to be too many)
   * @param maxHeld most values a window holds before it turns into a histogram, at least 1
   * @throws IllegalArgumentException for windows that are empty, overlapping or out of order
   */
  public OrderWindows(long[] lo, long[] hi, boolean[] histogram, int maxHeld) {
    if (lo.length != hi.length || lo.length != histogram.length) {
      throw new IllegalArgumentException("Window bounds and flags differ in number: "
          + lo.length + ", " + hi.length + ", " + histogram.length);
    }
    if (maxHeld < 1) {
      throw new IllegalArgumentException("Cannot hold " + maxHeld + " values per window");
    }
    for (int i = 0; i < lo.length; i++) {
      if (lo[i] > hi[i] || (i > 0 && lo[i] <= hi[i - 1])) {
        throw new IllegalArgumentException("Window " + i + " [" + lo[i] + ", " + hi[i]
            + "] is empty, or overlaps or precedes the window before it");
      }
    }
    int w = lo.length;
    this.lo = lo.clone();
    this.hi = hi.clone();
    this.maxHeld = maxHeld;
    this.counts = new long[2 * w + 1];
    this.held = new double[w][];
    this.heldSize = new int[w];
    this.buckets = new long[w][];
    for (int i = 0; i < w; i++) {
      if (lo[i] != hi[i]) {
        if (histogram[i]) {
          buckets[i] = new long[BUCKETS];
        } else {
          held[i] = new double[16];
        }
      }
    }
  }

  /** A fresh, empty accumulator over the same windows (each task of a pass starts from one). */
  public OrderWindows emptyCopy() {
    boolean[] histogram = new boolean[lo.length];
    for (int i = 0; i < lo.length; i++) {
      histogram[i] = buckets[i] != null;
    }
    return new OrderWindows(lo, hi, histogram, maxHeld);
  }

  /**
   * The sortable key of a double: signed order of keys is numeric order, -0.0 maps as 0.0 (the
   * radix sort's key, {@link RadixSort#key}, with its sign bit flipped from unsigned to signed
   * order).
   */
  public static long key(double x) {
    return RadixSort.key(x + 0.0) ^ Long.MIN_VALUE;
  }

  /** The double whose key is {@code k} (the inverse of {@link #key} on non-NaN values). */
  public static double value(long k) {
    return RadixSort.value(k ^ Long.MIN_VALUE);
  }

  /**
   * Adds one finite value (not checked: this is the per-value path) and returns its region (even:
   * a gap, odd: a window; see {@link #regionCount}).
   */
  public int add(double x) {
    long k = key(x);
    int w = windowAtOrBelow(k);
    if (w < 0) {
      counts[0]++;
      return 0;
    }
    if (k > hi[w]) {
      counts[2 * w + 2]++;
      return 2 * w + 2;
    }
    counts[2 * w + 1]++;
    if (held[w] != null) {
      hold(w, x + 0.0);
    } else if (buckets[w] != null) {
      buckets[w][bucketOf(w, k)]++;
    }
    return 2 * w + 1;
  }

  /**
   * Adds the finite values {@code x[0 .. n - 1]} (not checked) as {@link #add} would one at a time,
   * and copies them into {@code grouped} by region: region r's values, in the order they came,
   * fill {@code grouped[starts[r] .. starts[r + 1] - 1]}. {@code grouped} needs room for n values
   * and {@code starts} for {@link #regions()} + 1 entries.
   *
   * <p>Most values find their region in a table ({@link RegionLookup}), the rest by comparing keys,
   * and the values are then moved by a counting sort: loops with almost no branch the data decides,
   * where {@link #add}'s tests are hard to predict for values that fall on both sides of a window at
   * random.
   */
  public void addAll(double[] x, int n, double[] grouped, int[] starts) {
    addAllWithin(x, null, n, Double.NEGATIVE_INFINITY, Double.POSITIVE_INFINITY, grouped, starts);
  }

  /**
   * {@link #addAll} of those of {@code x[0 .. n - 1]} that are present ({@code isNull[i]} false;
   * every one when {@code isNull} is null) and within {@code [low, high]} (NaN never is), in their
   * order; returns how many those are. The others are left out in the same loop that finds each
   * value's region, rather than by copying the kept values first.
   */
  public int addAllWithin(double[] x, boolean[] isNull, int n, double low, double high,
      double[] grouped, int[] starts) {
    int regions = counts.length;
    if (regionScratch == null || regionScratch.length < n) {
      regionScratch = new int[Math.max(n, 4096)];
    }
    if (lookup == null) {
      lookup = new RegionLookup(lo, hi);
    }
    RegionLookup look = lookup;
    int[] region = regionScratch;
    // One more region, last: the values left out.
    int[] inBatch = new int[regions + 1];
    for (int i = 0; i < n; i++) {
      double v = x[i];
      boolean keep = (isNull == null || !isNull[i]) & v >= low & v <= high;
      int r = look.regionOrMinusOne(v);
      if (r < 0 && keep) {
        r = regionOf(v);
      }
      r = keep ? r : regions;
      region[i] = r;
      inBatch[r]++;
    }
    int start = 0;
    for (int r = 0; r < regions; r++) {
      starts[r] = start;
      start += inBatch[r];
    }
    starts[regions] = start;
    // The values left out land after the kept ones, where nothing reads them.
    int[] next = Arrays.copyOf(starts, regions + 1);
    for (int i = 0; i < n; i++) {
      grouped[next[region[i]]++] = x[i];
    }
    holdGrouped(grouped, starts, inBatch);
    return start;
  }

  /**
   * The region of a value from one table lookup, for most values. A value's region is the number
   * of thresholds at or below it: per window, its first value and the value just above its last
   * key. The table splits the thresholds' span into equal slots by {@code slot(x)}, which is
   * monotone in x (a difference, a product, a sum, a truncation to long and clamps, each
   * monotone): a threshold below x's slot is therefore below x and one above x's slot is above x,
   * so a slot that holds no threshold has one region for all its values, exactly. Values in a
   * slot that holds a threshold (at most two slots per window, of about a thousand) get -1 and are
   * placed by comparing keys. Windows that reach an infinity or beyond get no table: every value
   * then compares keys.
   */
  private static final class RegionLookup {
    private static final double SLOTS = 1000.0;
    private final double start;
    private final double scale;
    /** Region per slot + 1 (slot 0: below the first threshold), -1 where a threshold falls. */
    private final int[] table;

    RegionLookup(long[] lo, long[] hi) {
      int w = lo.length;
      double[] thresholds = new double[2 * w];
      for (int i = 0; i < w; i++) {
        thresholds[2 * i] = threshold(lo[i]);
        thresholds[2 * i + 1] = hi[i] == Long.MAX_VALUE ? Double.NaN : threshold(hi[i] + 1);
      }
      double first = thresholds[0];
      double last = thresholds[2 * w - 1];
      double s = (SLOTS - 24.0) / (last - first);
      if (!Double.isFinite(first) || !Double.isFinite(last) || !(s > 0) || !Double.isFinite(s)) {
        start = 0.0;
        scale = 0.0;
        table = null;
        return;
      }
      start = first;
      scale = s;
      int[] t = new int[(int) SLOTS + 2];
      int[] below = new int[t.length + 1];
      for (double th : thresholds) {
        int slot = slot(th);
        t[slot] = -1;
        below[slot + 1]++;
      }
      int count = 0;
      for (int i = 0; i < t.length; i++) {
        count += below[i];
        if (t[i] == 0) {
          t[i] = count;
        }
      }
      table = t;
    }

    /** The smallest double whose key is at least k, or an infinity beyond the finite ones. */
    private static double threshold(long k) {
      if (k > key(Double.MAX_VALUE)) {
        return Double.POSITIVE_INFINITY;
      }
      if (k < key(-Double.MAX_VALUE)) {
        return Double.NEGATIVE_INFINITY;
      }
      return value(k);
    }

    /** Clamped in longs: Math.min and Math.max on doubles cost more (NaN and -0.0 rules). */
    private int slot(double x) {
      long s = (long) ((x - start) * scale + 1.0);
      return (int) Math.min(Math.max(s, 0L), (long) SLOTS + 1);
    }

    int regionOrMinusOne(double x) {
      return table == null ? -1 : table[slot(x)];
    }
  }

  /** Counts of a batch grouped by {@link #addAll}, and the values of its windows held or bucketed. */
  private void holdGrouped(double[] grouped, int[] starts, int[] inBatch) {
    for (int r = 0; r < counts.length; r++) {
      counts[r] += inBatch[r];
    }
    for (int w = 0; w < lo.length; w++) {
      int r = 2 * w + 1;
      int from = starts[r];
      int to = starts[r + 1];
      if (held[w] != null && to > from && heldSize[w] + (to - from) <= maxHeld) {
        // All of them fit: appended at once, as hold would one by one.
        int size = heldSize[w];
        appendHeld(w, grouped, from, to - from);
        double[] h = held[w];
        for (int i = size; i < heldSize[w]; i++) {
          h[i] += 0.0;
        }
      } else if (held[w] != null) {
        for (int i = starts[r]; i < starts[r + 1]; i++) {
          if (held[w] != null) {
            hold(w, grouped[i] + 0.0);
          } else {
            buckets[w][bucketOf(w, key(grouped[i]))]++;
          }
        }
      } else if (buckets[w] != null) {
        for (int i = starts[r]; i < starts[r + 1]; i++) {
          buckets[w][bucketOf(w, key(grouped[i]))]++;
        }
      }
    }
  }

  /** Number of regions: gaps and windows, 2 w + 1. */
  public int regions() {
    return counts.length;
  }

  /**
   * The region a value falls in, as {@link #add} would place it (-0.0 as 0.0); for a finite or
   * infinite value.
   */
  public int regionOf(double x) {
    long k = key(x);
    int w = windowAtOrBelow(k);
    return w < 0 ? 0 : k > hi[w] ? 2 * w + 2 : 2 * w + 1;
  }

  /**
   * How many values counted are below {@code f} ({@code orEqual}: at or below), exactly; -1 when
   * the counts cannot tell (f lies in a gap, or in a window that overflowed into a histogram).
   */
  public long countBelow(double f, boolean orEqual) {
    int r = regionOf(f);
    if (r % 2 == 0) {
      return -1;
    }
    int w = (r - 1) / 2;
    long before = 0;
    for (int i = 0; i < r; i++) {
      before += counts[i];
    }
    if (lo[w] == hi[w]) {
      return orEqual ? before + counts[r] : before;
    }
    if (held[w] == null) {
      return -1;
    }
    long in = 0;
    double g = f + 0.0;
    for (int i = 0; i < heldSize[w]; i++) {
      double v = held[w][i];
      in += (orEqual ? v <= g : v < g) ? 1 : 0;
    }
    return before + in;
  }

  /** Values held in window w (unsorted, a copy); empty for a single-key or overflowed window. */
  public double[] heldValues(int w) {
    return held[w] == null ? new double[0] : Arrays.copyOf(held[w], heldSize[w]);
  }

  /** True when window w only counts one key. */
  public boolean singleKey(int w) {
    return lo[w] == hi[w];
  }

  /** The last window whose first key is at most k, or -1. */
  private int windowAtOrBelow(long k) {
    if (lo.length <= 8) {
      // A few windows: count them without branches, which the processor cannot mispredict.
      int n = 0;
      for (long first : lo) {
        n += first <= k ? 1 : 0;
      }
      return n - 1;
    }
    int a = 0;
    int b = lo.length - 1;
    int found = -1;
    while (a <= b) {
      int mid = (a + b) >>> 1;
      if (lo[mid] <= k) {
        found = mid;
        a = mid + 1;
      } else {
        b = mid - 1;
      }
    }
    return found;
  }

  private void hold(int w, double x) {
    if (pivots != null) {
      pivots[w] = null;
    }
    double[] h = held[w];
    int n = heldSize[w];
    if (n == maxHeld) {
      toHistogram(w);
      buckets[w][bucketOf(w, key(x))]++;
      return;
    }
    if (n == h.length) {
      h = Arrays.copyOf(h, (int) Math.min(maxHeld, 2L * h.length));
      held[w] = h;
    }
    h[n] = x;
    heldSize[w] = n + 1;
  }

  /** Appends {@code count} values from {@code from} to window w's held values (they fit). */
  private void appendHeld(int w, double[] from, int at, int count) {
    if (count == 0) {
      return;
    }
    if (pivots != null) {
      pivots[w] = null;
    }
    int size = heldSize[w];
    int need = size + count;
    if (need > held[w].length) {
      held[w] = Arrays.copyOf(held[w], (int) Math.min(maxHeld, Math.max(need, 2L * held[w].length)));
    }
    System.arraycopy(from, at, held[w], size, count);
    heldSize[w] = need;
  }

  private void toHistogram(int w) {
    long[] b = new long[BUCKETS];
    for (int i = 0; i < heldSize[w]; i++) {
      b[bucketOf(w, key(held[w][i]))]++;
    }
    buckets[w] = b;
    held[w] = null;
    heldSize[w] = 0;
  }

  /** Width of one histogram bucket of window w, in keys (unsigned; at least 1). */
  private long bucketWidth(int w) {
    return Long.divideUnsigned(hi[w] - lo[w], BUCKETS) + 1;
  }

  private int bucketOf(int w, long k) {
    return (int) Long.divideUnsigned(k - lo[w], bucketWidth(w));
  }

  /**
   * Adds the other part's counts and values into this one and returns this.
   *
   * @throws IllegalArgumentException when the other part has different windows
   */
  public OrderWindows merge(OrderWindows other) {
    if (!Arrays.equals(lo, other.lo) || !Arrays.equals(hi, other.hi)) {
      throw new IllegalArgumentException("Cannot merge counts kept over different windows");
    }
    for (int i = 0; i < counts.length; i++) {
      counts[i] += other.counts[i];
    }
    for (int w = 0; w < lo.length; w++) {
      if (lo[w] == hi[w]) {
        continue;
      }
      if (other.buckets[w] != null && buckets[w] == null) {
        toHistogram(w);
      }
      if (buckets[w] != null) {
        if (other.buckets[w] != null) {
          for (int b = 0; b < BUCKETS; b++) {
            buckets[w][b] += other.buckets[w][b];
          }
        } else {
          for (int i = 0; i < other.heldSize[w]; i++) {
            buckets[w][bucketOf(w, key(other.held[w][i]))]++;
          }
        }
        continue;
      }
      int size = heldSize[w];
      int more = other.heldSize[w];
      if (size + more <= maxHeld) {
        // All of them fit: copied at once (held values are already free of -0.0).
        appendHeld(w, other.held[w], 0, more);
        continue;
      }
      for (int i = 0; i < other.heldSize[w]; i++) {
        hold(w, other.held[w][i]);
        if (buckets[w] != null) {
          for (int j = i + 1; j < other.heldSize[w]; j++) {
            buckets[w][bucketOf(w, key(other.held[w][j]))]++;
          }
          break;
        }
      }
    }
    return this;
  }

  /** Number of windows. */
  public int windows() {
    return lo.length;
  }

  /**
   * The order statistic of a rank (1-based) among all the values counted, when the counts place it
   * inside a window that kept its values or holds a single value; empty otherwise.
   */
  public java.util.OptionalDouble orderStatistic(long rank) {
    long before = 0;
    for (int region = 0; region < counts.length; region++) {
      long c = counts[region];
      if (rank < 1 || rank > before + c) {
        before += c;
        continue;
      }
      int w = (region - 1) / 2;
      if (region % 2 == 0 || !resolved(w)) {
        return java.util.OptionalDouble.empty();
      }
      return java.util.OptionalDouble.of(
          singleKey(w) ? value(lo[w]) : heldValue(w, (int) (rank - before - 1)));
    }
    return java.util.OptionalDouble.empty();
  }

  /** Values counted in all regions. */
  public long total() {
    long n = 0;
    for (long c : counts) {
      n += c;
    }
    return n;
  }

  /** Count of region r: even r are gaps (r / 2 windows below), odd r are window (r - 1) / 2. */
  public long regionCount(int r) {
    return counts[r];
  }

  public long firstKey(int w) {
    return lo[w];
  }

  public long lastKey(int w) {
    return hi[w];
  }

  /** True when window w only counts (a single key) or held every value that fell in it. */
  public boolean resolved(int w) {
    return buckets[w] == null;
  }

  /**
   * Value number i (0-based) in ascending order of those held in window w, by selection: each
   * read partially orders the held values in place, in time linear in their number, and later
   * reads start from the pivots it left. The value is the same as a full sort would give (the held
   * values have no NaN and no -0.0, so their order is total).
   */
  public double heldValue(int w, int i) {
    if (i < 0 || i >= heldSize[w]) {
      throw new IndexOutOfBoundsException("Window " + w + " holds " + heldSize[w] + " values, not "
          + (i + 1));
    }
    if (pivots == null) {
      pivots = new int[lo.length][];
    }
    if (pivots[w] == null) {
      // The selector works on the whole array: trim the spare capacity first.
      held[w] = Arrays.copyOf(held[w], heldSize[w]);
      pivots[w] = new int[PIVOT_CACHE];
      Arrays.fill(pivots[w], -1);
    }
    // Read on the driver after the pass, when the executors' cores are idle.
    return SELECTOR.select(held[w], pivots[w], i);
  }

  /** The histogram of an overflowed window w (a copy), or null. */
  public long[] histogram(int w) {
    return buckets[w] == null ? null : buckets[w].clone();
  }

  /** First key of bucket b of window w. */
  public long bucketFirstKey(int w, int b) {
    return lo[w] + b * bucketWidth(w);
  }

  /** Last key of bucket b of window w (inclusive). */
  public long bucketLastKey(int w, int b) {
    long last = bucketFirstKey(w, b) + bucketWidth(w) - 1;
    // The last bucket may end short of a full width, and the sum may wrap past the top key.
    return Long.compareUnsigned(last - lo[w], hi[w] - lo[w]) > 0 ? hi[w] : last;
  }

  private void writeObject(ObjectOutputStream out) throws IOException {
    for (int w = 0; w < held.length; w++) {
      if (held[w] != null && held[w].length > heldSize[w]) {
        held[w] = Arrays.copyOf(held[w], Math.max(heldSize[w], 1));
      }
    }
    out.defaultWriteObject();
  }
}
