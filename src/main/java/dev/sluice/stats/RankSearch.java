package dev.sluice.stats;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;

/**
 * Exact type 7 quantiles (Hyndman and Fan 1996) of a column too large to sort, found in one pass
 * over the data when a pilot sample places the windows well, and in a few more when it does not.
 *
 * <p>Each pass counts the values below, inside and between a few windows of values and keeps the
 * values inside the windows ({@link OrderWindows}). The quantile at p needs the order statistics
 * x(r) and x(r + 1) around h = (n - 1) p + 1. When the counts place each of them inside a window
 * whose values were kept, it is read off exactly. Otherwise the counts name the region that holds
 * it: the gap between two windows, or the histogram bucket of a window that held too many values.
 * The next pass puts a window on just that region. Each such pass narrows the region by a factor
 * of {@link OrderWindows#BUCKETS} in key space (a region of one key holds one value, however many
 * times it occurs), so the search ends after at most six passes even on adversarial data; in
 * practice the first pass resolves every quantile.
 *
 * <p>The first windows come from a pilot sample ({@link #firstPlan}): around each probability p a
 * bracket of pilot ranks p +/- d, with d six standard errors of a sample quantile,
 * sqrt(p (1 - p) / m), widened while the expected number of held values stays well within
 * memory. The pilot only decides how much work the search does, never its answer: the result is
 * the exact order statistics of the whole column, the same for any pilot, any partitioning of the
 * data and any order of merging.
 *
 * <p>Edge cases: no values give NaN quantiles; one value is every quantile of itself; ties need no
 * care (a tie spanning a region boundary is a single key, which the next pass only counts).
 */
public final class RankSearch {
  /** Standard errors of a pilot quantile covered on each side of a bracket. */
  public static final double BRACKET_ERRORS = 6.0;
  /** Share of maxHeld that the expected number of held values of one bracket may use. */
  static final double HELD_SHARE = 0.125;

  private final double[] probabilities;
  private final int maxHeld;
  /** Standard errors of a pilot quantile that the first windows cover on each side. */
  private final double bracketErrors;
  private long count = -1;
  /** The order statistics needed (1-based ranks) and those found so far. */
  private long[] ranks;
  private double[] found;
  /** Key ranges that the next pass must look into. */
  private final List<long[]> pending = new ArrayList<>();
  private final List<Boolean> pendingTooMany = new ArrayList<>();
  private int passes;
  /**
   * Every pass absorbed, in order: a later question about ranks is read off the last pass whose
   * windows can answer it. Each pass counts the same values, so any that can answer gives the same
   * exact answer; a quartile found by pass 1 is no longer inside the windows of a pass that
   * searched only for another one.
   */
  private final List<OrderWindows> absorbed = new ArrayList<>();

  /**
   * @param probabilities the quantiles wanted, each in [0, 1]
   * @param maxHeld most values one window of a pass may hold (memory bound), at least 1
   */
  public RankSearch(double[] probabilities, int maxHeld) {
    this(probabilities, maxHeld, BRACKET_ERRORS);
  }

  /**
   * As {@link #RankSearch(double[], int)}, with first windows of {@code bracketErrors} standard
   * errors either side (fewer: narrower windows that miss more often, costing a pass, never
   * accuracy).
   */
  public RankSearch(double[] probabilities, int maxHeld, double bracketErrors) {
    if (!(bracketErrors > 0)) {
      throw new IllegalArgumentException("Cannot bracket " + bracketErrors + " standard errors");
    }
    for (double p : probabilities) {
      if (!(p >= 0.0 && p <= 1.0)) {
        throw new IllegalArgumentException("Cannot take the quantile at p = " + p + ": p must be in [0, 1]");
      }
    }
    if (maxHeld < 1) {
      throw new IllegalArgumentException("Cannot hold " + maxHeld + " values per window");
    }
    this.probabilities = probabilities.clone();
    this.maxHeld = maxHeld;
    this.bracketErrors = bracketErrors;
  }

  /**
   * The windows of the first pass. {@code pilot}: a sample of the column's values (finite, any
   * order; may be empty), {@code expectedCount}: about how many values the column holds. Without
   * a pilot, or when the whole column fits, one window holds every value.
   */
  public OrderWindows firstPlan(double[] pilot, long expectedCount) {
    return firstPlan(pilot, expectedCount, List.of());
  }

  /**
   * As {@link #firstPlan(double[], long)}, with further ranges of values, {@code {low, high}}
   * inclusive, that the windows must also cover (where other figures will be read off, such as
   * counts below an outlier limit known only after the pass).
   */
  public OrderWindows firstPlan(double[] pilot, long expectedCount, List<double[]> alsoCover) {
    if (pilot.length == 0 || expectedCount <= maxHeld) {
      return windows(List.of(new long[] {Long.MIN_VALUE, Long.MAX_VALUE}), List.of(false));
    }
    double[] sorted = sorted(pilot);
    int m = sorted.length;
    List<long[]> brackets = new ArrayList<>();
    for (double p : probabilities) {
      double[] b = bracket(sorted, p, expectedCount, maxHeld, bracketErrors);
      brackets.add(new long[] {OrderWindows.key(b[0]), OrderWindows.key(b[1])});
    }
    for (double[] r : alsoCover) {
      brackets.add(new long[] {OrderWindows.key(r[0]), OrderWindows.key(r[1])});
    }
    List<long[]> merged = union(brackets);
    // A value the pilot shows many times is a single-key window: it is counted, never held.
    double heavy = Math.max(2.0, m * HELD_SHARE * maxHeld / Math.max(1.0, expectedCount) / 8.0);
    List<long[]> split = new ArrayList<>();
    for (long[] b : merged) {
      split.addAll(splitAtHeavyValues(b, sorted, heavy));
    }
    List<Boolean> flags = new ArrayList<>();
    split.forEach(w -> flags.add(false));
    return windows(split, flags);
  }

  /**
   * A copy of the pilot in ascending order, -0.0 as 0.0 and NaN (if any) last, as Arrays.sort
   * orders doubles; by a radix sort ({@link RadixSort}). An array already so is copied as it is.
   */
  public static double[] sorted(double[] pilot) {
    int m = pilot.length;
    if (isSorted(pilot)) {
      return pilot.clone();
    }
    long[] keys = new long[m];
    for (int i = 0; i < m; i++) {
      double v = pilot[i] + 0.0;
      keys[i] = RadixSort.key(v == v ? v : Double.NaN);
    }
    RadixSort.sort(keys, null, m, new long[m], null);
    double[] sorted = new double[m];
    for (int i = 0; i < m; i++) {
      sorted[i] = RadixSort.value(keys[i]);
    }
    return sorted;
  }

  /** In ascending order with no -0.0 and no NaN: what {@link #sorted} would return. */
  private static boolean isSorted(double[] a) {
    for (int i = 0; i < a.length; i++) {
      double v = a[i];
      if (v != v || Double.doubleToRawLongBits(v) == Long.MIN_VALUE || (i > 0 && !(a[i - 1] <= v))) {
        return false;
      }
    }
    return true;
  }

  /**
   * The values {@code {low, high}} between which the quantile at p lies with near certainty, from
   * a sorted pilot: the pilot's quantiles at p -/+ d, d six standard errors of a sample quantile,
   * widened while the expected held values stay a small share of memory; -/+ Infinity where the
   * bracket runs past the pilot's ends.
   */
  public static double[] bracket(double[] sorted, double p, long expectedCount, int maxHeld) {
    return bracket(sorted, p, expectedCount, maxHeld, BRACKET_ERRORS);
  }

  /** As {@link #bracket(double[], double, long, int)}, {@code errors} standard errors either side. */
  public static double[] bracket(double[] sorted, double p, long expectedCount, int maxHeld, double errors) {
    int m = sorted.length;
    double affordable = HELD_SHARE * maxHeld / (2.0 * Math.max(1, expectedCount));
    double d = Math.max(errors * Math.sqrt(p * (1 - p) / m) + 2.0 / m, affordable);
    double low = p - d <= 0 ? Double.NEGATIVE_INFINITY : sorted[(int) Math.floor((p - d) * m)];
    int top = (int) Math.ceil((p + d) * m);
    double high = top >= m ? Double.POSITIVE_INFINITY : sorted[top];
    return new double[] {low, high};
  }

  /** Cuts the heavy pilot values inside a key range out as single-key windows. */
  private static List<long[]> splitAtHeavyValues(long[] range, double[] sorted, double heavy) {
    List<long[]> out = new ArrayList<>();
    long next = range[0];
    // Only the pilot values inside the range: from the first one (keys ascend with the values).
    int i = 0;
    int above = sorted.length;
    while (i < above) {
      int mid = (i + above) >>> 1;
      if (OrderWindows.key(sorted[mid]) < range[0]) {
        i = mid + 1;
      } else {
        above = mid;
      }
    }
    while (i < sorted.length && OrderWindows.key(sorted[i]) <= range[1]) {
      int j = i;
      while (j < sorted.length && sorted[j] == sorted[i]) {
        j++;
      }
      long k = OrderWindows.key(sorted[i]);
      if (j - i >= heavy) {
        if (k > next) {
          out.add(new long[] {next, k - 1});
        }
        out.add(new long[] {k, k});
        next = k + 1; // finite values never have the top key
      }
      i = j;
    }
    if (next <= range[1]) {
      out.add(new long[] {next, range[1]});
    }
    return out;
  }

  /** Sorted, overlapping or touching ranges joined. */
  private static List<long[]> union(List<long[]> ranges) {
    List<long[]> sorted = new ArrayList<>(ranges);
    sorted.sort((a, b) -> Long.compare(a[0], b[0]));
    List<long[]> out = new ArrayList<>();
    for (long[] r : sorted) {
      long[] last = out.isEmpty() ? null : out.get(out.size() - 1);
      if (last != null && (r[0] <= last[1] || r[0] == last[1] + 1)) {
        last[1] = Math.max(last[1], r[1]);
      } else {
        out.add(r.clone());
      }
    }
    return out;
  }

  private OrderWindows windows(List<long[]> ranges, List<Boolean> tooMany) {
    long[] lo = new long[ranges.size()];
    long[] hi = new long[ranges.size()];
    boolean[] histogram = new boolean[ranges.size()];
    for (int i = 0; i < lo.length; i++) {
      lo[i] = ranges.get(i)[0];
      hi[i] = ranges.get(i)[1];
      histogram[i] = tooMany.get(i);
    }
    return new OrderWindows(lo, hi, histogram, maxHeld);
  }

  /**
   * Takes the merged counts of a pass over every value of the column and returns true when every
   * quantile is known. The first pass fixes the count; a later pass that counts a different
   * number of values means the data changed under the search.
   *
   * @throws IllegalStateException when a later pass counted a different number of values
   */
  public boolean absorb(OrderWindows pass) {
    passes++;
    absorbed.add(pass);
    long n = pass.total();
    if (count < 0) {
      count = n;
      ranks = neededRanks(n);
      found = new double[ranks.length];
      Arrays.fill(found, Double.NaN);
    } else if (n != count) {
      throw new IllegalStateException("A later pass over the column counted " + n
          + " values where the first counted " + count + ": the input changed during the run");
    }
    pending.clear();
    pendingTooMany.clear();
    for (int i = 0; i < ranks.length; i++) {
      if (Double.isNaN(found[i])) {
        locate(pass, i);
      }
    }
    return done();
  }

  /** Finds rank i in the pass: its value, or the key range the next pass must look into. */
  private void locate(OrderWindows pass, int i) {
    long r = ranks[i];
    long before = 0;
    int windows = pass.windows();
    for (int region = 0; region <= 2 * windows; region++) {
      long c = pass.regionCount(region);
      if (r > before + c) {
        before += c;
        continue;
      }
      if (region % 2 == 0) {
        int w = region / 2;
        long first = w == 0 ? Long.MIN_VALUE : pass.lastKey(w - 1) + 1;
        long last = w == windows ? Long.MAX_VALUE : pass.firstKey(w) - 1;
        want(first, last, c);
        return;
      }
      int w = (region - 1) / 2;
      if (pass.firstKey(w) == pass.lastKey(w)) {
        found[i] = OrderWindows.value(pass.firstKey(w));
      } else if (pass.resolved(w)) {
        found[i] = pass.heldValue(w, (int) (r - before - 1));
      } else {
        long[] h = pass.histogram(w);
        for (int b = 0; b < h.length; b++) {
          if (r <= before + h[b]) {
            want(pass.bucketFirstKey(w, b), pass.bucketLastKey(w, b), h[b]);
            return;
          }
          before += h[b];
        }
      }
      return;
    }
    throw new IllegalStateException("Rank " + r + " lies beyond the " + before + " values counted");
  }

  private void want(long first, long last, long values) {
    for (long[] p : pending) {
      if (p[0] == first && p[1] == last) {
        return;
      }
    }
    pending.add(new long[] {first, last});
    pendingTooMany.add(values > maxHeld);
  }

  /** True once every needed order statistic is known (at once for a column with no values). */
  public boolean done() {
    if (count < 0) {
      return false;
    }
    for (double v : found) {
      if (Double.isNaN(v)) {
        return false;
      }
    }
    return true;
  }

  /**
   * The windows of the next pass: one on each region still holding a needed order statistic.
   *
   * @throws IllegalStateException before the first pass or when nothing is left to find
   */
  public OrderWindows nextPlan() {
    if (count < 0 || done()) {
      throw new IllegalStateException("No further pass is needed");
    }
    List<long[]> ranges = new ArrayList<>();
    List<Boolean> tooMany = new ArrayList<>();
    List<Integer> order = new ArrayList<>();
    for (int i = 0; i < pending.size(); i++) {
      order.add(i);
    }
    order.sort((a, b) -> Long.compare(pending.get(a)[0], pending.get(b)[0]));
    for (int i : order) {
      ranges.add(pending.get(i));
      tooMany.add(pendingTooMany.get(i));
    }
    return windows(ranges, tooMany);
  }

  /**
   * The order statistic of any rank (1-based) among the values, when a pass's counts place it
   * inside a window whose values were kept or which holds a single value (the last such pass is
   * asked first); empty otherwise.
   */
  public java.util.OptionalDouble orderStatistic(long rank) {
    for (int i = absorbed.size() - 1; i >= 0; i--) {
      java.util.OptionalDouble v = absorbed.get(i).orderStatistic(rank);
      if (v.isPresent()) {
        return v;
      }
    }
    return java.util.OptionalDouble.empty();
  }

  /** Passes absorbed so far. */
  public int passes() {
    return passes;
  }

  /**
   * How many of the values are below {@code f}, exactly, from the windows of the last pass that
   * can tell, or, for f strictly between two consecutive order statistics found here, the values at
   * or below the lower one; -1 when neither can (f lies between every pass's windows, or the search
   * did not run).
   */
  public long countBelow(double f) {
    long below = told(f, false);
    if (below >= 0 || found == null) {
      return below;
    }
    // f strictly between two consecutive order statistics found here (a type 7 quantile between
    // them): no value lies between them, so the values below f are those at or below the lower one,
    // which the pass that found it can count.
    for (int i = 0; i + 1 < ranks.length; i++) {
      if (ranks[i + 1] == ranks[i] + 1 && found[i] < f && f < found[i + 1]) {
        return told(found[i], true);
      }
    }
    return -1;
  }

  /** The values below f (orEqual: at or below), from the last pass that can tell; -1: none. */
  private long told(double f, boolean orEqual) {
    for (int i = absorbed.size() - 1; i >= 0; i--) {
      long below = absorbed.get(i).countBelow(f, orEqual);
      if (below >= 0) {
        return below;
      }
    }
    return -1;
  }

  /** Values counted by the first pass. */
  public long count() {
    return count;
  }

  /**
   * The type 7 quantile at each probability, exact; NaN for every one when there are no values.
   *
   * @throws IllegalStateException when the search is not done
   */
  public double[] quantiles() {
    return quantiles(x -> x);
  }

  /**
   * The type 7 quantiles of {@code f} applied to every value, for a non-decreasing f: f keeps the
   * order, so the order statistics of f(x) are f of the order statistics found here. Capping at
   * fixed limits is such an f, which spares a search over capped values.
   *
   * @throws IllegalStateException when the search is not done
   */
  public double[] quantiles(java.util.function.DoubleUnaryOperator f) {
    if (!done()) {
      throw new IllegalStateException("The quantiles are not found yet");
    }
    double[] out = new double[probabilities.length];
    for (int i = 0; i < out.length; i++) {
      if (count == 0) {
        out[i] = Double.NaN;
        continue;
      }
      double h = (count - 1) * probabilities[i];
      long below = (long) Math.floor(h);
      double a = f.applyAsDouble(valueAt(below + 1));
      double fraction = h - below;
      if (below + 1 >= count || fraction == 0.0) {
        out[i] = a;
        continue;
      }
      out[i] = Quantiles.between(a, f.applyAsDouble(valueAt(below + 2)), fraction);
    }
    return out;
  }

  private double valueAt(long rank) {
    for (int i = 0; i < ranks.length; i++) {
      if (ranks[i] == rank) {
        return found[i];
      }
    }
    throw new IllegalStateException("Rank " + rank + " was not searched for");
  }

  /** The 1-based ranks of the order statistics type 7 needs for n values, without repeats. */
  private long[] neededRanks(long n) {
    if (n == 0) {
      return new long[0];
    }
    long[] out = new long[2 * probabilities.length];
    int k = 0;
    for (double p : probabilities) {
      double h = (n - 1) * p;
      long below = (long) Math.floor(h);
      out[k++] = below + 1;
      if (below + 1 < n && h - below != 0.0) {
        out[k++] = below + 2;
      }
    }
    return Arrays.stream(out, 0, k).distinct().sorted().toArray();
  }
}
