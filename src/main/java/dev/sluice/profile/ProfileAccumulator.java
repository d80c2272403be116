package dev.sluice.profile;

import dev.sluice.stats.DistinctCount;
import dev.sluice.stats.HashedCounts;
import dev.sluice.stats.NumericSteps;
import dev.sluice.stats.OrderWindows;
import dev.sluice.stats.RowSample;
import dev.sluice.stats.ScaledMoments;
import java.util.ArrayList;
import java.util.List;
import org.apache.spark.sql.catalyst.InternalRow;
import org.apache.spark.sql.types.DataType;
import org.apache.spark.sql.vectorized.ColumnVector;
import org.apache.spark.sql.vectorized.ColumnarBatch;
import org.apache.spark.unsafe.types.UTF8String;

/**
 * Pass 1 over one partition: every column's counts, the moments and order-statistic windows of
 * the measured columns, distinct counts and most frequent values of categorical columns, date
 * ranges, and the canonical row sample of the treated columns. Merged across partitions into the
 * table's figures.
 */
final class ProfileAccumulator implements RowScan.Accumulator<ProfileAccumulator> {
  private static final long serialVersionUID = 1L;
  /** Distinct values counted exactly before the count turns into a HyperLogLog estimate. */
  static final int EXACT_DISTINCT = 100_000;
  /** Distinct values of a categorical column whose occurrences are counted for the mode. */
  static final int COUNTED_VALUES = 100_000;

  private final ProfileLayout layout;
  private final NumericSteps[] validity;
  /** Measured columns (projection order) that the sample holds, in sample order. */
  private final int[] sampled;
  private final int sampleRows;
  /**
   * Rows whose content hash is at or above this never reach the sample: with a little more than
   * the sample's share of the table's rows below it, the sample's own threshold almost surely ends
   * below it, and the cut depends only on the row count, so the sample stays a function of the
   * data alone. It spares most rows the sample's bookkeeping while it fills.
   */
  private final long sampleCut;

  long rows;
  final long[] present;
  final long[] nan;
  final long[] infinite;
  final long[] invalid;
  /** Per measured column, the moments of the values in each region of its windows. */
  final ScaledMoments[][] moments;
  /** Pass 1's share of pass 2, or null when it is not attempted. */
  final EarlyTreatment early;
  final OrderWindows[] windows;
  /** Per group of groups.by, the figures of the group-wise columns; null without groups. */
  final GroupTally groups;
  final DistinctCount[] distinct;
  final HashedCounts<UTF8String>[] values;
  final long[] earliest;
  final long[] latest;
  final RowSample sample;
  private transient double[] sampleRow;
  private transient double[][] batchValues;
  private transient boolean[][] batchNulls;
  private transient Batches.Tally tally;
  private transient RowSample.Hasher hasher;
  /** Most distinct sets of columns missing together that are counted before giving up. */
  static final int PATTERNS = 10_000;
  /** Per tracked column (table order): its measured index, or -1 for a categorical column. */
  final int[] trackedMeasured;
  /** Per tracked column: its column index when categorical, else -1. */
  final int[] trackedCategorical;
  /** Rows by the set of tracked columns that are null in them (a bit mask), rows with none left out. */
  final HashedCounts<Long> together;
  private transient long[] batchMasks;
  /** Scratch of {@link #togetherInBatch}: rows of a batch by their only null column (64: none). */
  private transient long[] singleMasks;
  /**
   * Scratch of {@link #togetherInBatch}: rows of a batch by their two null columns (64 a + b for
   * columns a < b), and which of those cells the batch touched, in the order it did.
   */
  private transient long[] pairMasks;
  private transient int[] pairsTouched;
  /** Scratch of {@link #measureColumn}: a batch's finite, valid values by region. */
  private transient double[] grouped;
  private transient int[] starts;

  /**
   * @param validity per measured column (projection order), its validity bounds
   * @param windows per measured column, the first pass of its quartile search
   * @param sampled measured columns the row sample holds; sampleRows its capacity (0: no sample)
   */
  @SuppressWarnings("unchecked")
  ProfileAccumulator(ProfileLayout layout, NumericSteps[] validity, OrderWindows[] windows,
      int[] sampled, int sampleRows, long sampleCut, EarlyTreatment early, GroupTally groups) {
    int n = layout.names.length;
    this.layout = layout;
    this.validity = validity;
    this.sampled = sampled;
    this.sampleRows = sampleRows;
    this.sampleCut = sampleCut;
    this.present = new long[n];
    this.nan = new long[layout.measured];
    this.infinite = new long[layout.measured];
    this.invalid = new long[layout.measured];
    this.moments = new ScaledMoments[layout.measured][];
    this.windows = new OrderWindows[layout.measured];
    for (int j = 0; j < layout.measured; j++) {
      moments[j] = new ScaledMoments[windows[j].regions()];
      for (int r = 0; r < moments[j].length; r++) {
        moments[j][r] = new ScaledMoments();
      }
      this.windows[j] = windows[j].emptyCopy();
    }
    this.distinct = new DistinctCount[n];
    this.values = new HashedCounts[n];
    this.earliest = new long[n];
    this.latest = new long[n];
    for (int i = 0; i < n; i++) {
      switch (layout.reads[i]) {
        case CATEGORICAL:
          values[i] = new HashedCounts<>(COUNTED_VALUES);
          distinct[i] = new DistinctCount(EXACT_DISTINCT);
          break;
        case IDENTIFIER:
          distinct[i] = new DistinctCount(EXACT_DISTINCT);
          break;
        case DATE:
        case TIMESTAMP:
        case LOCAL_TIMESTAMP:
          earliest[i] = Long.MAX_VALUE;
          latest[i] = Long.MIN_VALUE;
          break;
        default:
          break;
      }
    }
    this.sample = sampled.length >= 2 && sampleRows > 0 ? new RowSample(sampleRows, sampled.length) : null;
    this.early = early == null ? null : early.emptyCopy();
    this.groups = groups == null ? null : groups.emptyCopy();
    int[] measuredIndex = new int[n];
    java.util.Arrays.fill(measuredIndex, -1);
    for (int j = 0; j < layout.measured; j++) {
      measuredIndex[layout.measuredAt[j]] = j;
    }
    List<int[]> tracked = new ArrayList<>();
    for (int i = 0; i < n && tracked.size() < TableProfile.TOGETHER_COLUMNS; i++) {
      if (measuredIndex[i] >= 0) {
        tracked.add(new int[] {measuredIndex[i], -1});
      } else if (layout.reads[i] == ProfileLayout.Read.CATEGORICAL) {
        tracked.add(new int[] {-1, i});
      }
    }
    this.trackedMeasured = tracked.stream().mapToInt(t -> t[0]).toArray();
    this.trackedCategorical = tracked.stream().mapToInt(t -> t[1]).toArray();
    this.together = new HashedCounts<>(PATTERNS);
  }

  /** The names of the tracked columns, bit 0 first. */
  List<String> trackedNames() {
    List<String> out = new ArrayList<>();
    for (int s = 0; s < trackedMeasured.length; s++) {
      out.add(layout.names[trackedMeasured[s] >= 0 ? layout.measuredAt[trackedMeasured[s]] : trackedCategorical[s]]);
    }
    return out;
  }

  private void countTogether(long mask) {
    if (mask != 0 && !together.increment(mask)) {
      together.insert(mask, mask);
    }
  }

  /** The cut for a sample of {@code sampleRows} out of {@code rows}: see {@link #sampleCut}. */
  static long sampleCut(int sampleRows, long rows) {
    // The k-th smallest of n uniform hashes lies near k / n with a spread of about sqrt(k) / n:
    // ten such spreads of margin leave it below the cut in all but astronomically rare cases.
    double share = (sampleRows + 10.0 * Math.sqrt(sampleRows) + 10.0) / Math.max(1, rows);
    return share >= 1.0 ? Long.MAX_VALUE : Long.MIN_VALUE + 2 * (long) (share * 0x1p63);
  }

  /** An empty accumulator over the same layout and windows, for one partition. */
  ProfileAccumulator emptyCopy() {
    return new ProfileAccumulator(layout, validity, windows, sampled, sampleRows, sampleCut, early, groups);
  }

  @Override
  public void add(InternalRow row) {
    rows++;
    for (int j = 0; j < layout.measured; j++) {
      if (!row.isNullAt(j)) {
        measure(j, row.getDouble(j));
      }
    }
    for (int i : layout.categorical) {
      int at = layout.at[i];
      if (!row.isNullAt(at)) {
        long hash = row.getLong(layout.hashAt[i]);
        if (!values[i].increment(hash)) {
          values[i].insert(hash, row.getUTF8String(at).copy());
        }
        countText(i, hash, 1);
      }
    }
    for (int i : layout.rest) {
      ProfileLayout.Read read = layout.reads[i];
      int at = layout.at[i];
      if (read == ProfileLayout.Read.OTHER) {
        present[i] += row.getBoolean(at) ? 0 : 1;
      } else if (!row.isNullAt(at)) {
        countOther(i, switch (read) {
          case IDENTIFIER, TIMESTAMP, LOCAL_TIMESTAMP -> row.getLong(at);
          case DATE -> row.getInt(at);
          default -> 0L;
        });
      }
    }
    long mask = 0;
    for (int s = 0; s < trackedMeasured.length; s++) {
      int at = trackedMeasured[s] >= 0 ? trackedMeasured[s] : layout.at[trackedCategorical[s]];
      mask |= row.isNullAt(at) ? 1L << s : 0L;
    }
    countTogether(mask);
    if (groups != null) {
      groups.add(row);
    }
    if (sample != null || early != null) {
      for (int s = 0; s < sampled.length; s++) {
        int j = sampled[s];
        sampleRow()[s] = row.isNullAt(j) ? Double.NaN : row.getDouble(j);
      }
      offerRow();
    }
  }

  /**
   * Adds a columnar batch of {@link ProfileLayout#raw} (the columns as stored): the same figures as
   * {@link #add} gives for the same rows, with the casts and hashes done here (see {@link Batches}).
   */
  void addBatch(ColumnarBatch batch) {
    if (groups != null) {
      throw new IllegalStateException("The group tally reads rows, not columnar batches");
    }
    int n = batch.numRows();
    rows += n;
    if (batchValues == null || batchValues[0].length < n) {
      batchValues = new double[Math.max(1, layout.measured)][Math.max(n, 4096)];
      batchNulls = new boolean[Math.max(1, layout.measured)][Math.max(n, 4096)];
    }
    for (int j = 0; j < layout.measured; j++) {
      int i = layout.measuredAt[j];
      double[] v = batchValues[j];
      boolean[] isNull = batchNulls[j];
      int nulls = Batches.doubles(batch.column(layout.rawAt[i]), layout.rawTypes[i], n, v, isNull);
      measureColumn(j, v, isNull, n, nulls);
    }
    for (int i : layout.categorical) {
      ColumnVector v = batch.column(layout.rawAt[i]);
      DataType t = layout.rawTypes[i];
      if (tally == null) {
        tally = new Batches.Tally();
      }
      int distinctInBatch = tally.of(v, t, n);
      if (distinctInBatch >= 0) {
        // Dictionary-encoded text: each distinct value hashed once, with its count in the batch.
        for (int k = 0; k < distinctInBatch; k++) {
          int r = tally.firstRow[k];
          int c = tally.count[k];
          long hash = Batches.hash(v, t, r);
          if (!values[i].increment(hash, c)) {
            values[i].insert(hash, Batches.text(v, t, r).copy(), c);
          }
          countText(i, hash, c);
        }
        continue;
      }
      for (int r = 0; r < n; r++) {
        if (!v.isNullAt(r)) {
          long hash = Batches.hash(v, t, r);
          if (!values[i].increment(hash)) {
            values[i].insert(hash, Batches.text(v, t, r).copy());
          }
          countText(i, hash, 1);
        }
      }
    }
    for (int i : layout.rest) {
      ColumnVector v = batch.column(layout.rawAt[i]);
      ProfileLayout.Read read = layout.reads[i];
      for (int r = 0; r < n; r++) {
        if (v.isNullAt(r)) {
          continue;
        }
        switch (read) {
          case IDENTIFIER -> countOther(i, Batches.hash(v, layout.rawTypes[i], r));
          case DATE -> countOther(i, v.getInt(r));
          case TIMESTAMP, LOCAL_TIMESTAMP -> countOther(i, v.getLong(r));
          default -> present[i]++;
        }
      }
    }
    togetherInBatch(batch, n);
    if (sample != null || early != null) {
      double[][] columns = new double[sampled.length][];
      for (int s = 0; s < sampled.length; s++) {
        columns[s] = batchValues[sampled[s]];
      }
      // As offerRow on each row, column by column: only rows under the cut reach the sample.
      if (sample != null) {
        if (hasher == null) {
          hasher = new RowSample.Hasher();
        }
        long[] hashes = hasher.of(columns, n);
        double[] row = sampleRow();
        for (int r = 0; r < n; r++) {
          if (hashes[r] < sampleCut) {
            for (int s = 0; s < sampled.length; s++) {
              row[s] = columns[s][r];
            }
            sample.add(row);
          }
        }
      }
      if (early != null) {
        early.addColumns(columns, n);
      }
    }
  }

  /** The missing-together counts of a batch, from the measured columns' null flags of this batch. */
  private void togetherInBatch(ColumnarBatch batch, int n) {
    if (trackedMeasured.length == 0) {
      return;
    }
    if (batchMasks == null || batchMasks.length < n) {
      batchMasks = new long[Math.max(n, 4096)];
    }
    if (singleMasks == null) {
      singleMasks = new long[Long.SIZE + 1];
      pairMasks = new long[Long.SIZE * Long.SIZE];
      pairsTouched = new int[Long.SIZE * Long.SIZE];
    }
    long[] masks = batchMasks;
    java.util.Arrays.fill(masks, 0, n, 0L);
    for (int s = 0; s < trackedMeasured.length; s++) {
      long bit = 1L << s;
      if (trackedMeasured[s] >= 0) {
        boolean[] isNull = batchNulls[trackedMeasured[s]];
        for (int r = 0; r < n; r++) {
          masks[r] |= isNull[r] ? bit : 0L;
        }
      } else {
        ColumnVector v = batch.column(layout.rawAt[trackedCategorical[s]]);
        if (v.hasNull()) {
          for (int r = 0; r < n; r++) {
            masks[r] |= v.isNullAt(r) ? bit : 0L;
          }
        }
      }
    }
    // Most rows have no tracked column null, one or two: counted by the bits' positions (64 for
    // none) in small tables, and only the rest one by one in the hashed counts.
    long[] single = singleMasks;
    long[] pair = pairMasks;
    int[] touched = pairsTouched;
    int pairs = 0;
    for (int r = 0; r < n; r++) {
      long mask = masks[r];
      long rest = mask & (mask - 1);
      if (rest == 0) {
        single[Long.numberOfTrailingZeros(mask)]++;
      } else if ((rest & (rest - 1)) == 0) {
        int cell = (Long.numberOfTrailingZeros(mask) << 6) | Long.numberOfTrailingZeros(rest);
        if (pair[cell]++ == 0) {
          touched[pairs++] = cell;
        }
      } else {
        countTogether(mask);
      }
    }
    for (int s = 0; s < Long.SIZE; s++) {
      long c = single[s];
      if (c > 0) {
        long mask = 1L << s;
        if (!together.increment(mask, c)) {
          together.insert(mask, mask, c);
        }
        single[s] = 0;
      }
    }
    for (int t = 0; t < pairs; t++) {
      int cell = touched[t];
      long mask = (1L << (cell >>> 6)) | (1L << (cell & 63));
      if (!together.increment(mask, pair[cell])) {
        together.insert(mask, mask, pair[cell]);
      }
      pair[cell] = 0;
    }
  }

  /**
   * {@link #measure} on the non-null values {@code v[0 .. n - 1]} of column j ({@code nulls} of
   * them null): the same figures, bit for bit. The finite, valid values are placed in their regions
   * by {@link OrderWindows#addAllWithin}, which leaves the others out in the same loop, and each
   * region's values go to its moments in one call, in the order they came; the rare other values
   * are counted in a second loop only when there are some.
   */
  private void measureColumn(int j, double[] v, boolean[] isNull, int n, int nulls) {
    if (grouped == null || grouped.length < n) {
      grouped = new double[Math.max(n, 4096)];
    }
    NumericSteps valid = validity[j];
    // Finite and valid exactly when within [low, high] (NaN compares false).
    double low = Math.max(-Double.MAX_VALUE, valid.validMin());
    double high = Math.min(Double.MAX_VALUE, valid.validMax());
    OrderWindows w = windows[j];
    if (starts == null || starts.length < w.regions() + 1) {
      starts = new int[w.regions() + 1];
    }
    int count = w.addAllWithin(v, isNull, n, low, high, grouped, starts);
    if (count + nulls < n) {
      for (int r = 0; r < n; r++) {
        double x = v[r];
        if (isNull[r] || (x >= low && x <= high)) {
          continue;
        }
        if (Double.isNaN(x)) {
          nan[j]++;
        } else if (Double.isInfinite(x)) {
          infinite[j]++;
        } else {
          invalid[j]++;
        }
      }
    }
    ScaledMoments[] m = moments[j];
    for (int r = 0; r < m.length; r++) {
      if (starts[r] < starts[r + 1]) {
        m[r].addAll(grouped, starts[r], starts[r + 1]);
      }
    }
  }

  /** One non-null value of measured column j. */
  private void measure(int j, double x) {
    if (Double.isNaN(x)) {
      nan[j]++;
    } else if (Double.isInfinite(x)) {
      infinite[j]++;
    } else if (validity[j].invalid(x)) {
      invalid[j]++;
    } else {
      moments[j][windows[j].add(x)].add(x);
    }
  }

  /** A non-null categorical value, already counted by hash for the mode. */
  private void countText(int i, long hash, long occurrences) {
    present[i] += occurrences;
    distinct[i].add(hash);
  }

  /**
   * A non-null value of any other column: an identifier's hash, a date's day or a timestamp's
   * microseconds (ignored for measured columns, whose values {@link #measure} takes).
   */
  private void countOther(int i, long v) {
    present[i]++;
    ProfileLayout.Read read = layout.reads[i];
    if (read == ProfileLayout.Read.IDENTIFIER) {
      distinct[i].add(v);
    } else if (read == ProfileLayout.Read.DATE || read == ProfileLayout.Read.TIMESTAMP
        || read == ProfileLayout.Read.LOCAL_TIMESTAMP) {
      earliest[i] = Math.min(earliest[i], v);
      latest[i] = Math.max(latest[i], v);
    }
  }

  private double[] sampleRow() {
    if (sampleRow == null) {
      sampleRow = new double[sampled.length];
    }
    return sampleRow;
  }

  /** The sampled columns' raw values of one row, to the row sample and pass 1's share of pass 2. */
  private void offerRow() {
    if (sample != null && RowSample.hash(sampleRow) < sampleCut) {
      sample.add(sampleRow);
    }
    if (early != null) {
      early.add(sampleRow);
    }
  }

  @Override
  public ProfileAccumulator merge(ProfileAccumulator o) {
    rows += o.rows;
    for (int i = 0; i < present.length; i++) {
      present[i] += o.present[i];
      if (values[i] != null) {
        values[i].merge(o.values[i]);
      }
      if (distinct[i] != null) {
        distinct[i].merge(o.distinct[i]);
      }
      earliest[i] = Math.min(earliest[i], o.earliest[i]);
      latest[i] = Math.max(latest[i], o.latest[i]);
    }
    for (int j = 0; j < layout.measured; j++) {
      nan[j] += o.nan[j];
      infinite[j] += o.infinite[j];
      invalid[j] += o.invalid[j];
      for (int r = 0; r < moments[j].length; r++) {
        moments[j][r].merge(o.moments[j][r]);
      }
      windows[j].merge(o.windows[j]);
    }
    if (sample != null) {
      sample.merge(o.sample);
    }
    if (early != null) {
      early.merge(o.early);
    }
    if (groups != null) {
      groups.merge(o.groups);
    }
    together.merge(o.together);
    return this;
  }
}
