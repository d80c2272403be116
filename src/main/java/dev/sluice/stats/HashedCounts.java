package dev.sluice.stats;

import java.io.IOException;
import java.io.ObjectInputStream;
import java.io.ObjectOutputStream;
import java.io.Serializable;

/**
 * Exact occurrence counts of up to {@code limit} distinct values, each value known by a 64-bit
 * hash the caller computes once per row (for text, Spark's xxhash64): the per-row path is a probe
 * of a primitive table, with no hashing or comparing of the value itself. Values are told apart by
 * their hash alone; two different values with the same 64-bit hash would be counted as one, which
 * for 100,000 values has a probability of about 3e-10.
 *
 * <p>Like {@link Frequencies}: past the limit the instance overflows (it forgets its values and
 * reports no top value), a merge whose union passes the limit overflows, and ties for the top
 * count go to the smallest value by {@code compareTo}, so the answer never depends on order.
 * Memory: about 3 words per slot, at most twice the limit in slots.
 */
public final class HashedCounts<V extends Comparable<? super V>> implements Serializable {
  private static final long serialVersionUID = 1L;

  private final int limit;
  private boolean overflowed;
  private transient long[] keys;
  private transient long[] counts;
  private transient Object[] values;
  private transient int size;
  private transient int mask;

  /** @throws IllegalArgumentException for a limit below 1 */
  public HashedCounts(int limit) {
    if (limit < 1) {
      throw new IllegalArgumentException("Cannot count up to " + limit + " distinct values");
    }
    this.limit = limit;
    allocate(16);
  }

  private void allocate(int slots) {
    keys = new long[slots];
    counts = new long[slots];
    values = new Object[slots];
    mask = slots - 1;
    size = 0;
  }

  private static int spread(long h) {
    return (int) (h ^ (h >>> 32)) * 0x9E3779B9;
  }

  /** The slot holding {@code hash}, or the empty slot where it would go (counts[slot] == 0). */
  private int slot(long hash) {
    int i = spread(hash) & mask;
    while (counts[i] != 0 && keys[i] != hash) {
      i = (i + 1) & mask;
    }
    return i;
  }

  /**
   * Adds one to the value with this hash and returns true, or returns false when no such value is
   * held yet (the caller then copies its value and calls {@link #insert}). Always true once
   * overflowed.
   */
  public boolean increment(long hash) {
    return increment(hash, 1);
  }

  /** As {@link #increment(long)}, adding {@code by} (at least 1) occurrences at once. */
  public boolean increment(long hash, long by) {
    if (overflowed) {
      return true;
    }
    int i = slot(hash);
    if (counts[i] == 0) {
      return false;
    }
    counts[i] += by;
    return true;
  }

  /** Holds a new value with count 1 (the caller checked it is not held); overflows past the limit. */
  public void insert(long hash, V value) {
    put(hash, value, 1);
  }

  /** As {@link #insert(long, Object)}, with {@code count} (at least 1) occurrences. */
  public void insert(long hash, V value, long count) {
    put(hash, value, count);
  }

  private void put(long hash, Object value, long count) {
    if (overflowed) {
      return;
    }
    int i = slot(hash);
    if (counts[i] != 0) {
      counts[i] += count;
      return;
    }
    if (size == limit) {
      overflowed = true;
      allocate(1);
      return;
    }
    keys[i] = hash;
    counts[i] = count;
    values[i] = value;
    size++;
    if (2 * size > keys.length) {
      grow();
    }
  }

  private void grow() {
    long[] k = keys;
    long[] c = counts;
    Object[] v = values;
    allocate(keys.length * 2);
    for (int i = 0; i < k.length; i++) {
      if (c[i] != 0) {
        int j = slot(k[i]);
        keys[j] = k[i];
        counts[j] = c[i];
        values[j] = v[i];
        size++;
      }
    }
  }

  /** Adds the other part's counts into this one and returns this. */
  public HashedCounts<V> merge(HashedCounts<V> other) {
    if (other.overflowed) {
      overflowed = true;
      allocate(1);
      return this;
    }
    for (int i = 0; i < other.keys.length && !overflowed; i++) {
      if (other.counts[i] != 0) {
        put(other.keys[i], other.values[i], other.counts[i]);
      }
    }
    return this;
  }

  public boolean overflowed() {
    return overflowed;
  }

  /** Distinct values held (0 once overflowed). */
  public int distinct() {
    return overflowed ? 0 : size;
  }

  /** The most frequent value, ties to the smallest; null when empty or overflowed. */
  @SuppressWarnings("unchecked")
  public V top() {
    int best = bestSlot();
    return best < 0 ? null : (V) values[best];
  }

  /** The top value's count; 0 when empty or overflowed. */
  public long topCount() {
    int best = bestSlot();
    return best < 0 ? 0 : counts[best];
  }

  /**
   * The {@code k} most frequent values with their counts, by count descending, ties to the
   * smaller value; empty when overflowed.
   */
  @SuppressWarnings("unchecked")
  public java.util.List<java.util.Map.Entry<V, Long>> mostCommon(int k) {
    java.util.List<java.util.Map.Entry<V, Long>> all = new java.util.ArrayList<>();
    if (overflowed) {
      return all;
    }
    for (int i = 0; i < keys.length; i++) {
      if (counts[i] != 0) {
        all.add(java.util.Map.entry((V) values[i], counts[i]));
      }
    }
    all.sort(java.util.Map.Entry.<V, Long>comparingByValue().reversed()
        .thenComparing(java.util.Map.Entry.comparingByKey()));
    return all.subList(0, Math.min(k, all.size()));
  }

  @SuppressWarnings("unchecked")
  private int bestSlot() {
    if (overflowed) {
      return -1;
    }
    int best = -1;
    for (int i = 0; i < keys.length; i++) {
      if (counts[i] == 0) {
        continue;
      }
      if (best < 0 || counts[i] > counts[best]
          || (counts[i] == counts[best] && ((V) values[i]).compareTo((V) values[best]) < 0)) {
        best = i;
      }
    }
    return best;
  }

  private void writeObject(ObjectOutputStream out) throws IOException {
    out.defaultWriteObject();
    out.writeInt(overflowed ? 0 : size);
    if (!overflowed) {
      for (int i = 0; i < keys.length; i++) {
        if (counts[i] != 0) {
          out.writeLong(keys[i]);
          out.writeLong(counts[i]);
          out.writeObject(values[i]);
        }
      }
    }
  }

  private void readObject(ObjectInputStream in) throws IOException, ClassNotFoundException {
    in.defaultReadObject();
    int n = in.readInt();
    allocate(Integer.highestOneBit(Math.max(8, 2 * n)) * 2);
    boolean wasOverflowed = overflowed;
    overflowed = false;
    for (int i = 0; i < n; i++) {
      long k = in.readLong();
      long c = in.readLong();
      put(k, in.readObject(), c);
    }
    overflowed = wasOverflowed;
    if (overflowed) {
      allocate(1);
    }
  }

  @Override
  public String toString() {
    return overflowed ? "HashedCounts(overflowed)" : "HashedCounts(" + size + " values, top " + top() + ")";
  }

  /** For tests: the count held for a hash (0 when none). */
  long count(long hash) {
    if (overflowed) {
      return 0;
    }
    int i = slot(hash);
    return counts[i];
  }
}
