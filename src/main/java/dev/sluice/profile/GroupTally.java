package dev.sluice.profile;

import dev.sluice.stats.HashedCounts;
import dev.sluice.stats.NumericSteps;
import dev.sluice.stats.OrderWindows;
import dev.sluice.stats.RankSearch;
import dev.sluice.stats.ScaledMoments;
import java.io.Serializable;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.apache.spark.sql.catalyst.InternalRow;
import org.apache.spark.sql.catalyst.util.ArrayData;
import org.apache.spark.unsafe.types.UTF8String;

/**
 * Pass 1's group-wise share: per group of groups.by, the quartile windows of the usable values of
 * each candidate column with the moments of each of their regions, the counts of the values of
 * columns filled with their mode (categorical, or numeric with a mode fill), so that group-wise
 * limits and fill values need no pass of their own. The windows also cover the bands where a
 * group's Tukey fences can fall, so that figures after the group's capping or removal can be read
 * off them as the table-wide ones are ({@code treat.PassOneFinish}).
 *
 * <p>A group is known in the pass by its key's 64-bit hash (as {@code stats.HashedCounts} knows
 * a text value; two keys with the same hash would be taken as one, odds of about 3e-14 for 1,000
 * groups). The pilot places the quartile windows of each group it saw ({@link #plan}); a group it
 * did not see is counted without windows, which is enough when it has fewer values than
 * groups.min-values (it takes the table-wide figures anyway). The windows find exact type 7
 * quartiles as the table-wide ones do ({@link RankSearch}); a column with a group left unsettled
 * is searched after the plan instead.
 *
 * <p>Memory: one slot per group, at most groups.max-groups (past that the tally stops and every
 * column is searched later, which reports the limit); the windows' held values are bounded by
 * {@link #plan}'s budget (quantiles.max-held-values, beside the table-wide windows' own), the
 * value counts by {@link #TEXT_BUDGET}.
 */
final class GroupTally implements Serializable {
  private static final long serialVersionUID = 1L;
  /** The quartiles each group gets. */
  static final double[] QUARTILES = {0.25, 0.5, 0.75};
  /**
   * Standard errors of a pilot quartile that a group's window covers either side: fewer than the
   * table-wide search's, as each group's pilot is a fraction of the table's, so that the windows
   * of every group fit where the table-wide ones do. At 4 a window misses with odds of about 6e-5,
   * costing the column a later search, never accuracy.
   */
  static final double BRACKET_ERRORS = 4.0;
  /** A window holds up to this many times the values it is expected to, before it overflows. */
  static final double HEADROOM = 3.0;
  /**
   * Standard errors either side of the pilot's mean and standard deviation that the bands around
   * z-score limits cover: twice {@link #BRACKET_ERRORS}, as a few extreme values move both, and
   * bands in the tails hold few values.
   */
  static final double TAIL_ERRORS = 2 * BRACKET_ERRORS;
  /** Fewest pilot values of a group for bands around its limits. */
  static final int MIN_PILOT_FOR_BANDS = 30;
  /** Fewest values a window is allowed to hold. */
  static final int MIN_HELD = 1_000;
  /** Distinct values the groups' counts hold in all, at most, shared by the counted columns. */
  static final long TEXT_BUDGET = 2_000_000;

  private final int keyAt;
  private final int keyTextAt;
  /** Measured columns (projection positions) tallied, and their validity steps. */
  private final int[] cols;
  private final NumericSteps[] validity;
  private final int maxGroups;
  /**
   * Categorical columns tallied for their group modes: projection positions of their text and
   * hash, and the most distinct values each group's count holds before it overflows.
   */
  private final int[] textAt;
  private final int[] textHashAt;
  private final int textLimit;
  /** Per group hash the pilot saw, the first windows of each column (null: none). */
  private final Map<Long, OrderWindows[]> planned;
  /** Columns given no windows, because those of all their groups would pass the memory budget. */
  private final boolean[] skipped;
  /** Columns whose values each group counts (a mode fill), up to textLimit distinct values. */
  private final boolean[] countValues;

  // State of one part: open addressing from hash to slot, then per slot.
  private long[] table;
  private int[] tableSlot;
  private int slots;
  private long[] hashes;
  private String[][] keys;
  private OrderWindows[][] windows;
  /** Per slot and column, the moments of the values in each region of its windows (one without). */
  private ScaledMoments[][][] moments;
  private long[][] present;
  private HashedCounts<UTF8String>[][] texts;
  private HashedCounts<Double>[][] numbers;
  /** More groups than maxGroups were seen: the tally stopped. */
  boolean overflowed;

  private GroupTally(int keyAt, int keyTextAt, int[] cols, NumericSteps[] validity, int maxGroups,
      int[] textAt, int[] textHashAt, int textLimit, Map<Long, OrderWindows[]> planned, boolean[] skipped,
      boolean[] countValues) {
    this.keyAt = keyAt;
    this.keyTextAt = keyTextAt;
    this.cols = cols;
    this.validity = validity;
    this.maxGroups = maxGroups;
    this.textAt = textAt;
    this.textHashAt = textHashAt;
    this.textLimit = textLimit;
    this.planned = planned;
    this.skipped = skipped;
    this.countValues = countValues;
    int capacity = Integer.highestOneBit(Math.max(16, 4 * (maxGroups + 1)) - 1) << 1;
    this.table = new long[capacity];
    this.tableSlot = new int[capacity];
    Arrays.fill(tableSlot, -1);
    this.hashes = new long[8];
    this.keys = new String[8][];
    this.windows = new OrderWindows[8][];
    this.moments = new ScaledMoments[8][][];
    this.present = new long[8][];
    this.texts = newTexts(8);
    this.numbers = newNumbers(8);
  }

  @SuppressWarnings("unchecked")
  private static HashedCounts<Double>[] newNumberRow(int n) {
    return new HashedCounts[n];
  }

  @SuppressWarnings("unchecked")
  private static HashedCounts<Double>[][] newNumbers(int n) {
    return new HashedCounts[n][];
  }

  @SuppressWarnings("unchecked")
  private static HashedCounts<UTF8String>[][] newTexts(int n) {
    return new HashedCounts[n][];
  }

  /**
   * The tally's windows, placed by the pilot: for each group the pilot saw and each column, the
   * quartile windows of {@link RankSearch#firstPlan} at {@value #BRACKET_ERRORS} standard errors,
   * and for a column with outlier limits the bands where the group's limits can
   * fall, so that the values after the group's capping or removal can be read off too. Columns
   * whose windows would pass {@code budget} values in all (taken in order) get none. Empty when
   * the pilot saw more than {@code maxGroups} groups: the group-wise figures are then all searched
   * after the plan.
   *
   * @param cols measured columns (projection positions) to tally
   * @param outliers per column, its outlier settings (null: no limit bands)
   * @param countValues per column, whether each group counts its values (for a mode fill)
   * @param text categorical columns (table positions) whose group modes to tally
   * @param pilot the pilot's values per measured column, and its key hashes (empty: no pilot, the
   *     table is small enough that one window holds each group's values)
   * @param rows the table's rows
   */
  static java.util.Optional<GroupTally> plan(ProfileLayout layout, int[] cols, NumericSteps[] validity,
      dev.sluice.config.OutlierSettings[] outliers,
      boolean[] countValues, int[] text, RowScan.Pilot pilot, long rows, int maxGroups, int budget) {
    Map<Long, OrderWindows[]> planned = new HashMap<>();
    long[] keys = pilot.keys();
    Map<Long, List<Integer>> rowsOf = new LinkedHashMap<>();
    for (int r = 0; r < keys.length; r++) {
      rowsOf.computeIfAbsent(keys[r], k -> new ArrayList<>()).add(r);
    }
    if (rowsOf.size() > maxGroups) {
      return java.util.Optional.empty();
    }
    int[] textAt = new int[text.length];
    int[] textHashAt = new int[text.length];
    for (int t = 0; t < text.length; t++) {
      textAt[t] = layout.at[text[t]];
      textHashAt[t] = layout.hashAt[text[t]];
    }
    int counted = text.length;
    for (boolean b : countValues) {
      counted += b ? 1 : 0;
    }
    int textLimit = (int) Math.max(MIN_HELD, Math.min(ProfileAccumulator.COUNTED_VALUES,
        TEXT_BUDGET / Math.max(1L, (long) Math.max(1, rowsOf.size()) * Math.max(1, counted))));
    boolean[] skipped = new boolean[cols.length];
    if (keys.length == 0) {
      // No pilot: the table holds at most the budget's values per window; each group's window holds all.
      return java.util.Optional.of(new GroupTally(layout.keyAt, layout.keyTextAt, cols, validity, maxGroups,
          textAt, textHashAt, textLimit, planned, skipped, countValues));
    }
    long[] held = new long[cols.length];
    for (Map.Entry<Long, List<Integer>> e : rowsOf.entrySet()) {
      OrderWindows[] w = new OrderWindows[cols.length];
      for (int c = 0; c < cols.length; c++) {
        double[] values = new double[e.getValue().size()];
        int n = 0;
        for (int r : e.getValue()) {
          double v = validity[c].valid(pilot.values()[cols[c]][r]);
          if (!Double.isNaN(v)) {
            values[n++] = v;
          }
        }
        double[] sorted = RankSearch.sorted(Arrays.copyOf(values, n));
        long expected = Profiler.expected(rows, n, keys.length);
        // The widest bracket is the median's: 2 d of the group's values, d as RankSearch.bracket's.
        double d = n == 0 ? 1.0 : Math.min(1.0, BRACKET_ERRORS * 0.5 / Math.sqrt(n) + 2.0 / n);
        long perWindow = (long) Math.ceil(2 * d * expected);
        int cap = (int) Math.min(Integer.MAX_VALUE - 8, Math.max(MIN_HELD, HEADROOM * perWindow));
        List<double[]> bands = limitBands(sorted, outliers[c], expected);
        w[c] = new RankSearch(QUARTILES, cap, BRACKET_ERRORS).firstPlan(sorted, expected, bands);
        long inBands = 0;
        for (double[] b : bands) {
          inBands += Math.round((double) expected * between(sorted, b[0], b[1]) / Math.max(1, n));
        }
        held[c] += Math.min(expected, QUARTILES.length * perWindow + inBands);
      }
      planned.put(e.getKey(), w);
    }
    long total = 0;
    for (int c = 0; c < cols.length; c++) {
      total += held[c];
      if (total > budget) {
        skipped[c] = true;
        total -= held[c];
        for (OrderWindows[] w : planned.values()) {
          w[c] = null;
        }
      }
    }
    return java.util.Optional.of(new GroupTally(layout.keyAt, layout.keyTextAt, cols, validity, maxGroups,
        textAt, textHashAt, textLimit, planned, skipped, countValues));
  }

  /**
   * The two ranges where a group's outlier limits can fall while the figures they come from lie
   * near the pilot's: Tukey fences from the quartile brackets ({@value #BRACKET_ERRORS} standard
   * errors, as the table-wide search's bands); mean -/+ z sd from the pilot's mean and standard
   * deviation, each within {@link #TAIL_ERRORS} standard errors; median -/+ limit MAD / 0.6745
   * from the median's bracket and the bracket of the distances from the pilot's median, widened
   * by the median's. None when a bracket is unbounded, the spread could
   * be zero or the pilot holds fewer than {@value #MIN_PILOT_FOR_BANDS} values. A limit that falls
   * outside its band costs a search after the plan, never accuracy.
   */
  static List<double[]> limitBands(double[] sorted, dev.sluice.config.OutlierSettings o, long expected) {
    int n = sorted.length;
    if (o == null || n < MIN_PILOT_FOR_BANDS) {
      return List.of();
    }
    double e = BRACKET_ERRORS;
    double[] r;
    switch (o.method()) {
      case IQR -> {
        double[] q1 = RankSearch.bracket(sorted, 0.25, expected, 1, e);
        double[] q3 = RankSearch.bracket(sorted, 0.75, expected, 1, e);
        if (!Double.isFinite(q1[0]) || !Double.isFinite(q3[1]) || !(q1[1] < q3[0])) {
          return List.of();
        }
        r = dev.sluice.stats.Fences.tukeyRange(q1[0], q1[1], q3[0], q3[1], o.iqrK());
      }
      case ZSCORE -> {
        ScaledMoments m = new ScaledMoments();
        for (double x : sorted) {
          m.add(x);
        }
        double sd = m.stddev();
        if (!(sd > 0) || !Double.isFinite(sd)) {
          return List.of();
        }
        // The standard error of a standard deviation grows with the tails: sd sqrt((kurtosis - 1) / 4n),
        // sd / sqrt(2n) for normal data (kurtosis 3), taken as the least.
        double fourth = 0;
        for (double x : sorted) {
          double u = (x - m.mean()) / sd;
          fourth += u * u * u * u;
        }
        double kurtosis = fourth / n;
        double centre = TAIL_ERRORS * sd / Math.sqrt(n);
        double spread = TAIL_ERRORS * sd * Math.sqrt(Math.max(kurtosis - 1, 2.0) / (4.0 * n));
        double z = o.zLimit();
        double lowMean = m.mean() - centre;
        double highMean = m.mean() + centre;
        double lowSd = Math.max(0, sd - spread);
        double highSd = sd + spread;
        r = new double[] {lowMean - z * highSd, highMean - z * lowSd, lowMean + z * lowSd, highMean + z * highSd};
      }
      case MAD -> {
        double[] med = RankSearch.bracket(sorted, 0.5, expected, 1, e);
        if (!Double.isFinite(med[0]) || !Double.isFinite(med[1])) {
          return List.of();
        }
        double centre = sorted[n / 2];
        double[] distances = new double[n];
        for (int i = 0; i < n; i++) {
          distances[i] = Math.abs(sorted[i] - centre);
        }
        double[] mad = RankSearch.bracket(RankSearch.sorted(distances), 0.5, expected, 1, e);
        double shift = med[1] - med[0];
        if (!Double.isFinite(mad[0]) || !Double.isFinite(mad[1])) {
          return List.of();
        }
        double k = o.madLimit() / dev.sluice.stats.Fences.MODIFIED_Z_CONSTANT;
        double lowMad = Math.max(0, mad[0] - shift);
        double highMad = mad[1] + shift;
        r = new double[] {med[0] - k * highMad, med[1] - k * lowMad, med[0] + k * lowMad, med[1] + k * highMad};
      }
      default -> {
        return List.of();
      }
    }
    for (int i = 0; i < 4; i++) {
      // As published, limits keep 12 significant digits: a little slack keeps them inside.
      double slack = Math.abs(r[i]) * 1e-9 + Double.MIN_NORMAL;
      r[i] += i % 2 == 0 ? -slack : slack;
    }
    if (!(r[0] <= r[1] && r[2] <= r[3]) || !Double.isFinite(r[0]) || !Double.isFinite(r[3])) {
      return List.of();
    }
    return List.of(new double[] {r[0], r[1]}, new double[] {r[2], r[3]});
  }

  /** How many of the sorted values lie in [low, high]. */
  private static int between(double[] sorted, double low, double high) {
    int from = EarlySetup.lowerBound(sorted, low);
    int to = EarlySetup.lowerBound(sorted, Math.nextUp(high));
    return Math.max(0, to - from);
  }

  /** An empty tally over the same windows, for one partition. */
  GroupTally emptyCopy() {
    return new GroupTally(keyAt, keyTextAt, cols, validity, maxGroups, textAt, textHashAt, textLimit, planned,
        skipped, countValues);
  }

  /** One row of the full projection. */
  void add(InternalRow row) {
    if (overflowed) {
      return;
    }
    int s = slotOf(row.getLong(keyAt), row);
    if (s < 0) {
      return;
    }
    OrderWindows[] w = windows[s];
    ScaledMoments[][] m = moments[s];
    HashedCounts<Double>[] counted = numbers[s];
    for (int c = 0; c < cols.length; c++) {
      int j = cols[c];
      if (row.isNullAt(j)) {
        continue;
      }
      double x = validity[c].valid(row.getDouble(j));
      if (!Double.isNaN(x)) {
        m[c][w[c] == null ? 0 : w[c].add(x)].add(x);
        if (counted[c] != null) {
          double v = x + 0.0;
          long bits = Double.doubleToLongBits(v);
          if (!counted[c].increment(bits)) {
            counted[c].insert(bits, v);
          }
        }
      }
    }
    long[] n = present[s];
    HashedCounts<UTF8String>[] counts = texts[s];
    for (int t = 0; t < textAt.length; t++) {
      if (!row.isNullAt(textAt[t])) {
        n[t]++;
        long hash = row.getLong(textHashAt[t]);
        if (!counts[t].increment(hash)) {
          counts[t].insert(hash, row.getUTF8String(textAt[t]).copy());
        }
      }
    }
  }

  /** The slot of a group hash, made on first sight from the row's key text; -1 past maxGroups. */
  private int slotOf(long hash, InternalRow row) {
    int at = find(hash);
    int s = tableSlot[at];
    if (s >= 0) {
      return s;
    }
    ArrayData text = row.getArray(keyTextAt);
    String[] key = new String[text.numElements()];
    for (int i = 0; i < key.length; i++) {
      key[i] = text.isNullAt(i) ? null : text.getUTF8String(i).toString();
    }
    return insert(at, hash, key, null, null, null, null, null);
  }

  /** The table position of {@code hash}, or the empty position where it would go. */
  private int find(long hash) {
    int mask = table.length - 1;
    int at = (int) (hash ^ (hash >>> 32)) * 0x9E3779B9 & mask;
    while (tableSlot[at] >= 0 && table[at] != hash) {
      at = (at + 1) & mask;
    }
    return at;
  }

  private int insert(int at, long hash, String[] key, OrderWindows[] w, ScaledMoments[][] m, long[] n,
      HashedCounts<UTF8String>[] counts, HashedCounts<Double>[] values) {
    if (slots == maxGroups) {
      overflowed = true;
      return -1;
    }
    if (slots == hashes.length) {
      int grown = 2 * slots;
      hashes = Arrays.copyOf(hashes, grown);
      keys = Arrays.copyOf(keys, grown);
      windows = Arrays.copyOf(windows, grown);
      moments = Arrays.copyOf(moments, grown);
      present = Arrays.copyOf(present, grown);
      texts = Arrays.copyOf(texts, grown);
      numbers = Arrays.copyOf(numbers, grown);
    }
    int s = slots++;
    table[at] = hash;
    tableSlot[at] = s;
    hashes[s] = hash;
    keys[s] = key;
    if (w == null) {
      OrderWindows[] template = planned.get(hash);
      w = new OrderWindows[cols.length];
      m = new ScaledMoments[cols.length][];
      for (int c = 0; c < cols.length; c++) {
        w[c] = template != null ? (template[c] == null ? null : template[c].emptyCopy())
            : planned.isEmpty() && !skipped[c] ? everything() : null;
        m[c] = new ScaledMoments[w[c] == null ? 1 : w[c].regions()];
        for (int r = 0; r < m[c].length; r++) {
          m[c][r] = new ScaledMoments();
        }
      }
      n = new long[textAt.length];
      counts = newCounts(textAt.length, textLimit);
      values = newNumberRow(cols.length);
      for (int c = 0; c < cols.length; c++) {
        values[c] = countValues[c] ? new HashedCounts<>(textLimit) : null;
      }
    }
    windows[s] = w;
    moments[s] = m;
    present[s] = n;
    texts[s] = counts;
    numbers[s] = values;
    return s;
  }

  @SuppressWarnings("unchecked")
  private static HashedCounts<UTF8String>[] newCounts(int n, int limit) {
    HashedCounts<UTF8String>[] out = new HashedCounts[n];
    for (int t = 0; t < n; t++) {
      out[t] = new HashedCounts<>(limit);
    }
    return out;
  }

  /** One window holding every value: for a table small enough to need no pilot. */
  private OrderWindows everything() {
    return new OrderWindows(new long[] {Long.MIN_VALUE}, new long[] {Long.MAX_VALUE}, new boolean[] {false},
        Integer.MAX_VALUE - 8);
  }

  /** Folds another part's tally into this one and returns this. */
  GroupTally merge(GroupTally o) {
    overflowed |= o.overflowed;
    for (int t = 0; t < o.slots && !overflowed; t++) {
      int at = find(o.hashes[t]);
      int s = tableSlot[at];
      if (s < 0) {
        insert(at, o.hashes[t], o.keys[t], o.windows[t], o.moments[t], o.present[t], o.texts[t], o.numbers[t]);
        continue;
      }
      for (int x = 0; x < textAt.length; x++) {
        present[s][x] += o.present[t][x];
        texts[s][x].merge(o.texts[t][x]);
      }
      for (int c = 0; c < cols.length; c++) {
        for (int r = 0; r < moments[s][c].length; r++) {
          moments[s][c][r].merge(o.moments[t][c][r]);
        }
        if (windows[s][c] != null) {
          windows[s][c].merge(o.windows[t][c]);
        }
        if (numbers[s][c] != null) {
          numbers[s][c].merge(o.numbers[t][c]);
        }
      }
    }
    return this;
  }

  /**
   * The merged tally's figures per column name ({@code names}, {@code textNames}: each tallied
   * measured and categorical column's name): a measured column is settled when every group with
   * at least {@code minValues} usable values has its quartiles, a group with fewer getting NaN
   * quartiles (it takes the table-wide figures); a categorical column, when no such group
   * overflowed its count of distinct values.
   */
  GroupMeasures finish(List<String> by, String[] names, String[] textNames, int minValues) {
    Map<String, Map<List<String>, GroupMeasures.Measure>> settled = new LinkedHashMap<>();
    Map<String, Map<List<String>, GroupMeasures.Mode>> modes = new LinkedHashMap<>();
    Map<String, String> unsettled = new LinkedHashMap<>();
    if (overflowed) {
      for (String name : names) {
        unsettled.put(name, "more than groups.max-groups = " + maxGroups + " groups");
      }
      for (String name : textNames) {
        unsettled.put(name, "more than groups.max-groups = " + maxGroups + " groups");
      }
      return new GroupMeasures(by, settled, modes, unsettled);
    }
    int[] order = order();
    for (int c = 0; c < cols.length; c++) {
      Map<List<String>, GroupMeasures.Measure> groups = new LinkedHashMap<>();
      String missed = null;
      for (int s : order) {
        ScaledMoments m = merged(s, c);
        double[] q = new double[QUARTILES.length];
        Arrays.fill(q, Double.NaN);
        OrderWindows w = windows[s][c];
        if (m.count() >= minValues) {
          // A search only reads the merged windows here: its own size limit plays no part.
          RankSearch search = new RankSearch(QUARTILES, 1);
          if (w != null && search.absorb(w)) {
            q = search.quantiles();
          } else {
            missed = skipped[c] ? "its groups' windows would pass quantiles.max-held-values"
                : w == null ? "a group the pilot rows did not include" : "a group's windows missed its quartiles";
          }
        }
        groups.put(Arrays.asList(keys[s]), new GroupMeasures.Measure(m.count(), m.mean(), m.stddev(), q,
            w, w == null ? null : moments[s][c], Double.NaN,
            numbers[s][c] == null || numbers[s][c].overflowed() ? null : numbers[s][c]));
      }
      if (missed == null) {
        settled.put(names[c], groups);
      } else {
        unsettled.put(names[c], missed);
      }
    }
    for (int t = 0; t < textAt.length; t++) {
      Map<List<String>, GroupMeasures.Mode> groups = new LinkedHashMap<>();
      boolean overflowedCounts = false;
      for (int s : order) {
        long n = present[s][t];
        HashedCounts<UTF8String> counts = texts[s][t];
        overflowedCounts |= n >= minValues && counts.overflowed();
        groups.put(Arrays.asList(keys[s]), new GroupMeasures.Mode(n, counts.top() == null ? null : counts.top().toString()));
      }
      if (overflowedCounts) {
        unsettled.put(textNames[t], "a group with more than " + textLimit + " distinct values");
      } else {
        modes.put(textNames[t], groups);
      }
    }
    return new GroupMeasures(by, settled, modes, unsettled);
  }

  /** One group's share of a column's tally: its key and hash, moments, and windows (null: none). */
  record Part(List<String> key, long hash, ScaledMoments moments, OrderWindows windows) {}

  /** Each group's share of tallied column {@code c}, in key order (of the merged tally). */
  List<Part> parts(int c) {
    List<Part> out = new ArrayList<>();
    for (int s : order()) {
      out.add(new Part(Arrays.asList(keys[s]), hashes[s], merged(s, c), windows[s][c]));
    }
    return out;
  }

  /** The slots in key order (as the group search orders its groups). */
  private int[] order() {
    return java.util.stream.IntStream.range(0, slots).boxed()
        .sorted((a, b) -> GroupMeasures.compareKeys(Arrays.asList(keys[a]), Arrays.asList(keys[b])))
        .mapToInt(Integer::intValue).toArray();
  }

  /** The moments of slot s's values of column c, over all regions of its windows. */
  private ScaledMoments merged(int s, int c) {
    ScaledMoments m = new ScaledMoments();
    for (ScaledMoments r : moments[s][c]) {
      m.merge(r);
    }
    return m;
  }

  /** Each group's key hash, by key (of the merged tally). */
  Map<List<String>, Long> hashes() {
    Map<List<String>, Long> out = new HashMap<>();
    for (int s = 0; s < slots; s++) {
      out.put(Arrays.asList(keys[s]), hashes[s]);
    }
    return out;
  }
}
