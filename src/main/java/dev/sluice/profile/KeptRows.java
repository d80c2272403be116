package dev.sluice.profile;

import dev.sluice.stats.CoMoments;
import dev.sluice.stats.NumericSteps;
import java.util.ArrayList;
import java.util.List;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.storage.StorageLevel;

/**
 * Pass 1's partitions with the rows each kept aside ({@link EarlyTreatment}), persisted in Spark's
 * block store (as objects, spilling to disk) so that those rows never travel to the driver: the
 * accumulators are merged as usual, and once the outlier limits are known a small job treats the
 * kept rows where they are and merges only their co-moments. Stored as objects, not serialized:
 * the accumulators are then serialized once, as task results, not twice. (Merging may change a
 * stored accumulator; only the row blocks are read again, and they are never changed.)
 */
final class KeptRows implements PassOneShare.RowsAside {
  /** Per partition: its accumulator, then an {@link EarlyTreatment.Rows} block. */
  private final JavaRDD<Object> parts;
  private final long count;

  private KeptRows(JavaRDD<Object> parts, long count) {
    this.parts = parts;
    this.count = count;
  }

  /**
   * Runs pass 1 over {@code accumulators} (not yet computed), keeping each partition's rows aside
   * in the block store; returns the merged accumulator and, through {@code kept}, the rows.
   */
  static ProfileAccumulator run(JavaRDD<ProfileAccumulator> accumulators, RowScan.Empty<ProfileAccumulator> empty,
      List<KeptRows> kept) {
    JavaRDD<Object> parts = accumulators.flatMap(a -> {
      List<Object> out = new ArrayList<>(2);
      out.add(a);
      out.add(a.early.takeRows());
      return out.iterator();
    }).persist(StorageLevel.MEMORY_AND_DISK());
    ProfileAccumulator merged = RowScan.merged(
        parts.filter(o -> o instanceof ProfileAccumulator).map(o -> (ProfileAccumulator) o), empty);
    kept.add(new KeptRows(parts, merged.early.aside));
    return merged;
  }

  @Override
  public long count() {
    return count;
  }

  @Override
  public CoMoments treated(NumericSteps[] steps, CoMoments empty) {
    if (count == 0) {
      return empty.emptyCopy();
    }
    // The kept rows are a small share of each partition: one task per core reads several
    // partitions' blocks (coalesced by where the blocks are), rather than a task each, whose
    // launch costs more than its rows. Merged in a tree only for many partitions, as pass 1's
    // parts are: for a few, a tree's extra shuffle stage costs more than the merges it spreads.
    JavaRDD<Object> rows = parts.filter(o -> o instanceof EarlyTreatment.Rows);
    int cores = Math.max(1, parts.context().defaultParallelism());
    if (rows.getNumPartitions() > cores) {
      rows = rows.coalesce(cores);
    }
    return rows.map(o -> ((EarlyTreatment.Rows) o).treated(steps, empty))
        .treeReduce(CoMoments::merge, RowScan.depth(rows));
  }

  @Override
  public void release() {
    parts.unpersist(false);
  }
}
