package dev.sluice.stats;

import java.io.IOException;
import java.io.InvalidObjectException;
import java.io.ObjectInputStream;
import java.io.ObjectOutputStream;
import java.io.Serializable;
import org.apache.datasketches.hll.HllSketch;
import org.apache.datasketches.hll.TgtHllType;
import org.apache.datasketches.hll.Union;

/**
 * Mutable, mergeable count of distinct values, each given by the caller as a 64-bit hash; one
 * instance per part of a column, Java-serializable.
 *
 * <p>While at most {@code exactLimit} distinct hashes have been seen they are kept in a primitive
 * open-addressing set and the count is exact. The first hash beyond the limit (from {@link #add} or
 * from a {@link #merge} whose union passes the limit) switches the instance for good to an Apache
 * DataSketches HyperLogLog sketch (lgConfigK 12, HLL_8) fed every hash seen so far.
 *
 * <p>Order independence: the sketch's default estimate ({@code getEstimate}) uses the HIP
 * estimator when the sketch was built in one stream, and another one after a union, so the same
 * values split or merged differently would give different figures. {@link #estimate} therefore
 * reads {@code getCompositeEstimate}, which depends only on the sketch's registers (in its warm-up
 * modes, only on its coupons), and registers do not depend on the order hashes arrived in or on
 * how parts were merged. The estimate is the same, bit for bit, for every split and merge order.
 *
 * <p>Edge cases: an empty instance estimates 0, exactly. Every long is a valid hash, 0 included.
 * Once switched, the estimate is approximate (relative standard error about 1.04/sqrt(4096), 1.6%)
 * and may even fall below the limit. Both sides of a merge must have the same limit.
 *
 * <p>Cost of {@link #add}: while exact, one multiplication and a short probe of the table
 * (allocation only when the table doubles, amortised); once switched, one sketch update.
 */
public final class DistinctCount implements Serializable {
  private static final long serialVersionUID = 1L;

  /** log2 of the number of HyperLogLog registers. */
  static final int LG_K = 12;
  /** The largest exact limit accepted: the set then holds up to 2^24 hashes in 2^25 slots. */
  public static final int MAX_EXACT_LIMIT = 1 << 24;
  private static final int MIN_LG_CAPACITY = 4;
  private static final long MIX = 0x9E3779B97F4A7C15L;

  private final int exactLimit;
  /** Open-addressing set of the non-zero hashes, 0 marking a free slot; null once sketched. */
  private transient long[] table;
  private transient int lgCapacity;
  /** Non-zero hashes held in the table. */
  private transient int held;
  /** Whether the hash 0 was seen (it cannot live in the table). */
  private transient boolean holdsZero;
  /** The sketch once the limit was passed; null while exact. */
  private transient HllSketch sketch;

  /**
   * @param exactLimit the most distinct hashes counted exactly, 0 to {@link #MAX_EXACT_LIMIT}
   * @throws IllegalArgumentException for a limit out of that range
   */
  public DistinctCount(int exactLimit) {
    if (exactLimit < 0 || exactLimit > MAX_EXACT_LIMIT) {
      throw new IllegalArgumentException("Cannot count distinct values exactly up to " + exactLimit
          + ": the exact limit must be between 0 and " + MAX_EXACT_LIMIT);
    }
    this.exactLimit = exactLimit;
    emptyTable();
  }

  private void emptyTable() {
    lgCapacity = MIN_LG_CAPACITY;
    table = new long[1 << lgCapacity];
    held = 0;
    holdsZero = false;
  }

  /** Adds one value by its 64-bit hash. */
  public void add(long hash) {
    if (table == null) {
      sketch.update(hash);
      return;
    }
    if (hash == 0) {
      if (!holdsZero) {
        holdsZero = true;
        afterNewHash();
      }
      return;
    }
    long[] t = table;
    int mask = t.length - 1;
    int i = slot(hash, lgCapacity);
    long s;
    while ((s = t[i]) != 0) {
      if (s == hash) {
        return;
      }
      i = (i + 1) & mask;
    }
    t[i] = hash;
    held++;
    afterNewHash();
  }

  private void afterNewHash() {
    if (size() > exactLimit) {
      switchToSketch();
    } else if (2 * held > table.length) {
      grow();
    }
  }

  private static int slot(long hash, int lgCapacity) {
    return (int) ((hash * MIX) >>> (64 - lgCapacity));
  }

  private void grow() {
    long[] old = table;
    lgCapacity++;
    long[] t = new long[1 << lgCapacity];
    int mask = t.length - 1;
    for (long h : old) {
      if (h != 0) {
        int i = slot(h, lgCapacity);
        while (t[i] != 0) {
          i = (i + 1) & mask;
        }
        t[i] = h;
      }
    }
    table = t;
  }

  private int size() {
    return held + (holdsZero ? 1 : 0);
  }

  private void switchToSketch() {
    HllSketch s = new HllSketch(LG_K, TgtHllType.HLL_8);
    if (holdsZero) {
      s.update(0L);
    }
    for (long h : table) {
      if (h != 0) {
        s.update(h);
      }
    }
    sketch = s;
    table = null;
    held = 0;
    holdsZero = false;
  }

  /**
   * Folds {@code other} into this instance and returns this; {@code other} is not changed. The
   * result is the distinct count of the union: exact while the union holds at most the limit,
   * sketched otherwise. Merging an instance with itself changes nothing.
   *
   * @throws IllegalArgumentException when the two exact limits differ
   */
  public DistinctCount merge(DistinctCount other) {
    if (other.exactLimit != exactLimit) {
      throw new IllegalArgumentException("Cannot merge distinct counts with exact limits "
          + exactLimit + " and " + other.exactLimit);
    }
    if (other == this) {
      return this;
    }
    if (other.table != null) {
      if (other.holdsZero) {
        add(0L);
      }
      for (long h : other.table) {
        if (h != 0) {
          add(h);
        }
      }
      return this;
    }
    if (table != null) {
      switchToSketch();
    }
    Union union = new Union(LG_K);
    union.update(sketch);
    union.update(other.sketch);
    sketch = union.getResult(TgtHllType.HLL_8);
    return this;
  }

  /** The number of distinct hashes: exact while {@link #exact()}, else the sketch's rounded estimate. */
  public long estimate() {
    return table != null ? size() : Math.round(sketch.getCompositeEstimate());
  }

  /** The estimate before rounding (the sketch's composite estimate once switched). */
  double rawEstimate() {
    return table != null ? size() : sketch.getCompositeEstimate();
  }

  /** Whether the count is exact, that is, at most {@code exactLimit} distinct hashes were seen. */
  public boolean exact() {
    return table != null;
  }

  /** The exact limit given at construction. */
  public int exactLimit() {
    return exactLimit;
  }

  @Override
  public String toString() {
    return "DistinctCount[estimate=" + estimate() + ", exact=" + exact() + ", exactLimit=" + exactLimit + "]";
  }

  /**
   * Serial form: the exact limit, then whether exact; an exact instance writes its number of hashes
   * and the hashes, a sketched one the sketch's compact image.
   */
  private void writeObject(ObjectOutputStream out) throws IOException {
    out.defaultWriteObject();
    out.writeBoolean(table != null);
    if (table != null) {
      out.writeInt(size());
      if (holdsZero) {
        out.writeLong(0L);
      }
      for (long h : table) {
        if (h != 0) {
          out.writeLong(h);
        }
      }
    } else {
      byte[] image = sketch.toCompactByteArray();
      out.writeInt(image.length);
      out.write(image);
    }
  }

  private void readObject(ObjectInputStream in) throws IOException, ClassNotFoundException {
    in.defaultReadObject();
    if (exactLimit < 0 || exactLimit > MAX_EXACT_LIMIT) {
      throw new InvalidObjectException("Distinct count with an exact limit out of range: " + exactLimit);
    }
    if (in.readBoolean()) {
      int n = in.readInt();
      if (n < 0 || n > exactLimit) {
        throw new InvalidObjectException(
            "Exact distinct count of " + n + " hashes beyond its limit " + exactLimit);
      }
      emptyTable();
      for (int i = 0; i < n; i++) {
        add(in.readLong());
      }
    } else {
      byte[] image = new byte[in.readInt()];
      in.readFully(image);
      sketch = HllSketch.heapify(image);
    }
  }
}
