package dev.sluice.stats;

import java.io.Serializable;
import java.util.HashMap;
import java.util.Map;
import java.util.Objects;

/**
 * Mutable, mergeable exact occurrence counts of up to {@code limit} distinct keys, for the most
 * frequent value of a column; one instance per part, Java-serializable (keys must be too).
 *
 * <p>The hot path is {@link #increment}: it adds one to a key already held without allocating and
 * returns false for a key not held, so that a caller reusing a mutable key object can copy it
 * before {@link #insert}. {@link #add} does both for immutable keys.
 *
 * <p>Overflow: a key arriving when {@code limit} keys are already held, or a merge whose union holds
 * more than {@code limit} keys, makes the instance overflowed for good: it forgets its keys, stops
 * counting and reports no top value. Whether an instance ends overflowed depends only on the number
 * of distinct keys in all its parts, not on how they were split or merged.
 *
 * <p>Edge cases: keys are told apart by {@code equals} and {@code hashCode} and ordered by
 * {@code compareTo}, which must agree with {@code equals} (for {@link Double} keys: -0.0 and 0.0 are
 * two keys, -0.0 the smaller; all NaNs are one key, above every number). Null keys are rejected.
 * Ties for the top count go to the smallest key, so the top value never depends on order. Empty
 * or overflowed: {@link #top()} is null and {@link #topCount()} is 0.
 *
 * @param <K> the key type; held keys must not be changed afterwards
 */
public final class Frequencies<K extends Comparable<? super K>> implements Serializable {
  private static final long serialVersionUID = 1L;

  private final int limit;
  /** Key to count; null once overflowed. */
  private HashMap<K, Tally> counts = new HashMap<>();

  /** A mutable count, so that counting a held key allocates nothing. */
  private static final class Tally implements Serializable {
    private static final long serialVersionUID = 1L;
    long n;

    Tally(long n) {
      this.n = n;
    }
  }

  /**
   * @param limit the most distinct keys counted, at least 1
   * @throws IllegalArgumentException for a limit below 1
   */
  public Frequencies(int limit) {
    if (limit < 1) {
      throw new IllegalArgumentException(
          "Cannot count the frequencies of at most " + limit + " distinct values: the limit must be at least 1");
    }
    this.limit = limit;
  }

  /**
   * Adds one occurrence of a key already held and returns true; returns false, changing nothing,
   * when the key is not held. An overflowed instance counts nothing and returns true: there is
   * nothing to insert.
   */
  public boolean increment(K key) {
    if (counts == null) {
      return true;
    }
    Tally t = counts.get(key);
    if (t == null) {
      return false;
    }
    t.n++;
    return true;
  }

  /**
   * Adds a key with count 1 (or one more occurrence, if it is held after all). When {@code limit}
   * keys are already held the instance becomes overflowed instead. Does nothing once overflowed.
   *
   * @throws NullPointerException for a null key
   */
  public void insert(K key) {
    Objects.requireNonNull(key, "Cannot count a null value");
    if (counts == null) {
      return;
    }
    Tally t = counts.get(key);
    if (t != null) {
      t.n++;
    } else if (counts.size() >= limit) {
      counts = null;
    } else {
      counts.put(key, new Tally(1));
    }
  }

  /** One occurrence of an immutable key: {@link #increment}, else {@link #insert}. */
  public void add(K key) {
    if (!increment(key)) {
      insert(key);
    }
  }

  /**
   * {@code occurrences} of an immutable key at once, as many calls of {@link #add} would give.
   *
   * @throws IllegalArgumentException for fewer than 1 occurrence
   * @throws NullPointerException for a null key
   */
  public void add(K key, long occurrences) {
    if (occurrences < 1) {
      throw new IllegalArgumentException("Cannot count " + occurrences + " occurrences of " + key);
    }
    insert(key);
    Tally t = counts == null ? null : counts.get(key);
    if (t != null) {
      t.n += occurrences - 1;
    }
  }

  /**
   * Folds {@code other} into this instance, adding counts key by key, and returns this;
   * {@code other} is not changed and shares no counts with this. The result is overflowed when
   * either side is or when the union holds more than {@code limit} keys.
   *
   * @throws IllegalArgumentException when the limits differ, or when {@code other} is this instance
   */
  public Frequencies<K> merge(Frequencies<K> other) {
    if (other == this) {
      throw new IllegalArgumentException("Cannot merge value frequencies into themselves");
    }
    if (other.limit != limit) {
      throw new IllegalArgumentException(
          "Cannot merge value frequencies with limits " + limit + " and " + other.limit);
    }
    if (counts == null) {
      return this;
    }
    if (other.counts == null) {
      counts = null;
      return this;
    }
    for (Map.Entry<K, Tally> e : other.counts.entrySet()) {
      Tally t = counts.get(e.getKey());
      if (t != null) {
        t.n += e.getValue().n;
      } else if (counts.size() >= limit) {
        counts = null;
        return this;
      } else {
        counts.put(e.getKey(), new Tally(e.getValue().n));
      }
    }
    return this;
  }

  /** The most frequent key, the smallest by {@code compareTo} among ties; null when empty or overflowed. */
  public K top() {
    if (counts == null) {
      return null;
    }
    K best = null;
    long bestCount = 0;
    for (Map.Entry<K, Tally> e : counts.entrySet()) {
      long n = e.getValue().n;
      if (n > bestCount || (n == bestCount && e.getKey().compareTo(best) < 0)) {
        best = e.getKey();
        bestCount = n;
      }
    }
    return best;
  }

  /** The count of {@link #top()}; 0 when empty or overflowed. */
  public long topCount() {
    K top = top();
    return top == null ? 0 : counts.get(top).n;
  }

  /** The count of one key; 0 when not held or overflowed. */
  public long count(K key) {
    Tally t = counts == null ? null : counts.get(key);
    return t == null ? 0 : t.n;
  }

  /** The number of distinct keys held; 0 once overflowed (see {@link #overflowed()}). */
  public int distinct() {
    return counts == null ? 0 : counts.size();
  }

  /** Whether more than {@code limit} distinct keys were seen, so that no counts are kept. */
  public boolean overflowed() {
    return counts == null;
  }

  /** The limit given at construction. */
  public int limit() {
    return limit;
  }

  @Override
  public String toString() {
    return overflowed()
        ? "Frequencies[overflowed, limit=" + limit + "]"
        : "Frequencies[distinct=" + distinct() + ", top=" + top() + ", topCount=" + topCount() + ", limit=" + limit + "]";
  }
}
