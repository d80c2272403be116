package dev.sluice.profile;

import dev.sluice.stats.NumericSteps;
import dev.sluice.stats.OrderWindows;
import dev.sluice.stats.RankSearch;
import java.io.Serializable;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.function.Supplier;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.sql.catalyst.InternalRow;

/**
 * One pass of several exact quantile searches ({@link RankSearch}) over DOUBLE columns of a
 * projection, and the loop that runs such passes until every search is done.
 *
 * <p>Used for what cannot share the pass that needs it: the MAD (whose values are distances from
 * the median, known only after pass 1), the quartiles of treated values when they are wanted on
 * their own, and the rare extra passes of a search whose first windows missed.
 */
public final class SearchPass implements RowScan.Accumulator<SearchPass> {
  private static final long serialVersionUID = 1L;

  /**
   * The values one search looks at: the column at position {@code at}, after the validity step
   * (or steps 2 and 3 when {@code treated}), as the distance from {@code centre} unless it is NaN;
   * with {@code keyAt} at least 0, only in the rows whose LONG there is {@code key} (one group).
   */
  public record Target(int at, NumericSteps steps, boolean treated, double centre, int keyAt, long key)
      implements Serializable {
    /** A target over every row. */
    public Target(int at, NumericSteps steps, boolean treated, double centre) {
      this(at, steps, treated, centre, -1, 0L);
    }

    /**
     * The values this search counts among a pilot's: {@code column} holds the pilot's raw values
     * of the column at {@link #at}, {@code keys} its rows' key hashes (read only by a group's
     * target; may be null otherwise).
     */
    public double[] pilotValues(double[] column, long[] keys) {
      double[] out = new double[column.length];
      int n = 0;
      for (int r = 0; r < column.length; r++) {
        double v = keyAt >= 0 && keys[r] != key ? Double.NaN : value(column[r]);
        if (!Double.isNaN(v)) {
          out[n++] = v;
        }
      }
      return java.util.Arrays.copyOf(out, n);
    }

    /** The value of raw x that the search counts, or NaN for none. */
    public double value(double x) {
      double v = treated ? steps.treated(x) : steps.valid(x);
      return Double.isNaN(centre) ? v : Math.abs(v - centre);
    }
  }

  private final Target[] targets;
  private final OrderWindows[] windows;
  /**
   * The targets over every row; the group keys in ascending order, and each one's targets (one
   * key column for all; a sorted array, so that the per-row lookup boxes nothing).
   */
  private final int[] everyRow;
  private final long[] keys;
  private final int[][] keyTargets;
  private final int keyAt;

  SearchPass(Target[] targets, OrderWindows[] windows) {
    this.targets = targets;
    this.windows = windows;
    List<Integer> every = new ArrayList<>();
    Map<Long, List<Integer>> keyed = new HashMap<>();
    int at = -1;
    for (int t = 0; t < targets.length; t++) {
      if (targets[t].keyAt() < 0) {
        every.add(t);
      } else {
        if (at >= 0 && at != targets[t].keyAt()) {
          throw new IllegalArgumentException("Group targets read their key from different positions");
        }
        at = targets[t].keyAt();
        keyed.computeIfAbsent(targets[t].key(), k -> new ArrayList<>()).add(t);
      }
    }
    this.everyRow = every.stream().mapToInt(Integer::intValue).toArray();
    this.keys = keyed.keySet().stream().mapToLong(Long::longValue).sorted().toArray();
    this.keyTargets = new int[keys.length][];
    for (int k = 0; k < keys.length; k++) {
      keyTargets[k] = keyed.get(keys[k]).stream().mapToInt(Integer::intValue).toArray();
    }
    this.keyAt = at;
  }

  private SearchPass emptyCopy() {
    OrderWindows[] fresh = new OrderWindows[windows.length];
    for (int t = 0; t < windows.length; t++) {
      fresh[t] = windows[t].emptyCopy();
    }
    return new SearchPass(targets, fresh);
  }

  @Override
  public void add(InternalRow row) {
    for (int t : everyRow) {
      count(t, row);
    }
    if (keyAt >= 0) {
      int k = java.util.Arrays.binarySearch(keys, row.getLong(keyAt));
      if (k >= 0) {
        for (int t : keyTargets[k]) {
          count(t, row);
        }
      }
    }
  }

  private void count(int t, InternalRow row) {
    int at = targets[t].at();
    if (row.isNullAt(at)) {
      return;
    }
    double v = targets[t].value(row.getDouble(at));
    if (!Double.isNaN(v)) {
      windows[t].add(v);
    }
  }

  @Override
  public SearchPass merge(SearchPass other) {
    for (int t = 0; t < windows.length; t++) {
      windows[t].merge(other.windows[t]);
    }
    return this;
  }

  /**
   * Runs passes over {@code rows} until every search is done. A search that has not absorbed a
   * pass yet starts from {@code first} (its windows from a pilot); the others continue where they
   * stopped. Returns the number of passes run.
   */
  public static int complete(JavaRDD<InternalRow> rows, List<Target> targets, List<RankSearch> searches,
      List<OrderWindows> first) {
    return complete(() -> rows, targets, searches, first);
  }

  /** As above, with the rows made only if a pass is needed. */
  public static int complete(Supplier<JavaRDD<InternalRow>> rows, List<Target> targets,
      List<RankSearch> searches, List<OrderWindows> first) {
    int passes = 0;
    while (true) {
      List<Integer> open = new ArrayList<>();
      for (int i = 0; i < searches.size(); i++) {
        if (!searches.get(i).done()) {
          open.add(i);
        }
      }
      if (open.isEmpty()) {
        return passes;
      }
      Target[] t = new Target[open.size()];
      OrderWindows[] w = new OrderWindows[open.size()];
      for (int k = 0; k < open.size(); k++) {
        int i = open.get(k);
        t[k] = targets.get(i);
        w[k] = searches.get(i).count() < 0 ? first.get(i) : searches.get(i).nextPlan();
      }
      SearchPass proto = new SearchPass(t, w);
      SearchPass result = RowScan.fold(rows.get(), proto::emptyCopy);
      passes++;
      for (int k = 0; k < open.size(); k++) {
        searches.get(open.get(k)).absorb(result.windows[k]);
      }
    }
  }
}
