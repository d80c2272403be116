package dev.sluice.stats;

import java.io.IOException;
import java.io.InvalidObjectException;
import java.io.ObjectInputStream;
import java.io.ObjectOutputStream;
import java.io.Serializable;
import java.util.Arrays;

/**
 * A bottom-k sample of rows chosen by a hash of their content: the rows whose hash is among the
 * {@code capacity} smallest distinct hash values seen. Rows of equal content have equal hashes and
 * are kept once, with their number of occurrences as weight.
 *
 * <p>Because the choice depends only on content, the sample is a function of the multiset of rows
 * alone: whatever the split into parts, the order of rows within a part and the order in which
 * parts are merged, {@link #rows()} and {@link #weights()} come out bit for bit the same. A hash
 * that stays above the k smallest of one part can never be among the k smallest of a union, and a
 * hash once left out can never come back, so every kept weight counts every occurrence. As the
 * hash behaves like a random function of content, the kept rows are a uniform random sample
 * (without replacement) of the distinct rows, each carrying its multiplicity.
 *
 * <p>Edge cases: NaN marks a missing entry and every NaN is kept as the one canonical
 * {@link Double#NaN}; -0.0 is kept as 0.0 (the two are equal content); infinite entries are kept as
 * they are. Two different contents with the same 64-bit hash (a collision) are both kept, as
 * separate entries under that hash, so which hashes are kept never depends on order; the
 * capacity counts distinct hashes, not entries. A sample to which nothing was added has size 0 and
 * is {@link #complete()}.
 *
 * <p>Memory: at most {@code capacity * width} doubles for the kept rows (one more row for each
 * hash collision among kept rows, which for 64-bit hashes has a probability of about
 * {@code capacity * rows / 2^64}), plus up to about 100 bytes of bookkeeping per kept row (array
 * header, hash, weight, collision link, heap cell and two to four hash-table cells). Storage grows with the rows actually kept, so a
 * small part costs little. With {@code width} 500 a capacity of 100,000 holds 400 MB of rows;
 * callers lower the capacity for wide tables.
 *
 * <p>Cost: a row whose hash is above the current threshold (the largest kept hash, once the
 * sample is full) costs its hash, one comparison and no allocation. Other rows cost a hash-table
 * look-up and content comparison (a repeat of a kept row adds to its weight) and, when new, a
 * heap update; an evicted row's storage is reused by the next row kept. Over a stream of n
 * distinct rows, in an order that does not depend on their hashes, about {@code capacity * (1 +
 * ln(n / capacity))} of them take that slower path in expectation.
 *
 * <p>Not thread-safe. Java serialization writes the kept rows, weights and counts only; the
 * look-up structures are rebuilt on reading.
 */
public final class RowSample implements Serializable {
  private static final long serialVersionUID = 1L;

  /** Largest capacity accepted: keeps the hash table's size within an int. */
  public static final int MAX_CAPACITY = 1 << 28;

  /** SplitMix64's increment, the golden ratio as a 64-bit fraction. */
  private static final long GAMMA = 0x9E3779B97F4A7C15L;

  private static final int NONE = -1;

  private final int capacity;
  private final int width;
  /** Rows added, in this sample and in every sample merged into it. */
  private long offered;
  /** Whether a row (or a merged entry) was ever left out or evicted. */
  private boolean dropped;

  // Everything below is rebuilt by readObject from the serialized entries.

  /** Hashes above this are rejected at once; Long.MAX_VALUE until the sample is full. */
  private transient long threshold;

  /** Entry slots: normalized row, hash, weight, next entry under the same hash (collisions). */
  private transient double[][] slotRow;
  private transient long[] slotHash;
  private transient long[] slotWeight;
  private transient int[] slotNext;
  /** Free slots: a stack linked through slotNext; their row arrays are kept for reuse. */
  private transient int freeSlot;
  /** Slots ever handed out (slots beyond this have never been used). */
  private transient int usedSlots;
  private transient int entries;

  /** Max-heap (signed order) of the distinct kept hashes. */
  private transient long[] heap;
  private transient int distinct;

  /** Open addressing with linear probing: distinct hash -> first slot of its entries. */
  private transient long[] tableKey;
  private transient int[] tableSlot;
  private transient int tableMask;

  /**
   * @throws IllegalArgumentException for a capacity below 1 or above {@link #MAX_CAPACITY}, or a
   *     width below 1
   */
  public RowSample(int capacity, int width) {
    if (capacity < 1 || capacity > MAX_CAPACITY) {
      throw new IllegalArgumentException(
          "Cannot keep a row sample of capacity " + capacity + ": it must be 1 to " + MAX_CAPACITY);
    }
    if (width < 1) {
      throw new IllegalArgumentException("Cannot keep sampled rows of width " + width + ": it must be at least 1");
    }
    this.capacity = capacity;
    this.width = width;
    initStructures();
  }

  private void initStructures() {
    threshold = Long.MAX_VALUE;
    int slots = Math.min(capacity, 16);
    slotRow = new double[slots][];
    slotHash = new long[slots];
    slotWeight = new long[slots];
    slotNext = new int[slots];
    freeSlot = NONE;
    usedSlots = 0;
    entries = 0;
    heap = new long[slots];
    distinct = 0;
    int tableSize = Integer.highestOneBit(Math.max(2 * slots - 1, 1)) << 1;
    tableKey = new long[tableSize];
    tableSlot = new int[tableSize];
    Arrays.fill(tableSlot, NONE);
    tableMask = tableSize - 1;
  }

  public int capacity() {
    return capacity;
  }

  public int width() {
    return width;
  }

  /**
   * The canonical 64-bit hash of a row's content. Each value is first reduced to 64 bits, with
   * -0.0 taken as 0.0 and every NaN as the canonical NaN ({@link Double#doubleToLongBits}). The
   * value at position i goes to lane i mod 4; each lane starts at 0 and takes its values in order
   * with one multiply and a rotation, and the lanes are then folded and finished once with the
   * SplitMix64 output function (Stafford's "Mix13" 64-bit finalizer):
   *
   * <pre>
   *   lane = rotl((lane ^ bits(v)) * K, 29)                 K = 0x9E3779B97F4A7C15
   *   hash = mix13(((lane0 * K + lane1) * K + lane2) * K + lane3 + K)
   *   mix13(z):  z = (z ^ (z >>> 30)) * 0xBF58476D1CE4E5B9; z = (z ^ (z >>> 27)) * 0x94D049BB133111EB;
   *              return z ^ (z >>> 31)
   * </pre>
   *
   * The four lanes are independent chains, so the processor works on them in parallel. Each lane
   * step is a bijection of the lane for a fixed value and of the value for a fixed lane, and the
   * fold is a bijection of each lane for the others fixed, so rows that differ in a single value
   * never collide; otherwise the finalizer makes the hash behave like a random function of the
   * content.
   */
  public static long hash(double[] row) {
    long h0 = 0L;
    long h1 = 0L;
    long h2 = 0L;
    long h3 = 0L;
    int n = row.length;
    int i = 0;
    for (; i + 3 < n; i += 4) {
      h0 = step(h0, bits(row[i]));
      h1 = step(h1, bits(row[i + 1]));
      h2 = step(h2, bits(row[i + 2]));
      h3 = step(h3, bits(row[i + 3]));
    }
    if (i < n) {
      h0 = step(h0, bits(row[i++]));
    }
    if (i < n) {
      h1 = step(h1, bits(row[i++]));
    }
    if (i < n) {
      h2 = step(h2, bits(row[i]));
    }
    return finish(h0, h1, h2, h3);
  }

  /**
   * {@link #hash} of many rows given column by column, reusing its scratch from call to call (not
   * thread-safe). Each column is folded into its lane for all rows in one loop, so that the steps
   * of different rows overlap; the hashes are the same as {@link #hash} gives row by row.
   */
  public static final class Hasher {
    private long[][] lanes = new long[4][0];

    /**
     * The hashes of rows 0 .. n - 1, row r being {@code columns[0][r], columns[1][r], ...}: valid
     * until the next call.
     */
    public long[] of(double[][] columns, int n) {
      if (lanes[0].length < n) {
        lanes = new long[4][Math.max(n, 4096)];
      }
      for (long[] lane : lanes) {
        Arrays.fill(lane, 0, n, 0L);
      }
      for (int i = 0; i < columns.length; i++) {
        long[] h = lanes[i & 3];
        double[] x = columns[i];
        for (int r = 0; r < n; r++) {
          h[r] = step(h[r], bits(x[r]));
        }
      }
      long[] h0 = lanes[0];
      long[] h1 = lanes[1];
      long[] h2 = lanes[2];
      long[] h3 = lanes[3];
      for (int r = 0; r < n; r++) {
        h0[r] = finish(h0[r], h1[r], h2[r], h3[r]);
      }
      return h0;
    }
  }

  private static long step(long lane, long x) {
    return Long.rotateLeft((lane ^ x) * GAMMA, 29);
  }

  private static long finish(long h0, long h1, long h2, long h3) {
    return mix13(((h0 * GAMMA + h1) * GAMMA + h2) * GAMMA + h3 + GAMMA);
  }

  /** The value's bits, -0.0 as 0.0 and every NaN as the canonical NaN, without a branch. */
  private static long bits(double v) {
    long raw = Double.doubleToRawLongBits(v + 0.0);
    return v != v ? CANONICAL_NAN : raw;
  }

  private static final long CANONICAL_NAN = 0x7ff8000000000000L;

  private static long mix13(long z) {
    z = (z ^ (z >>> 30)) * 0xBF58476D1CE4E5B9L;
    z = (z ^ (z >>> 27)) * 0x94D049BB133111EBL;
    return z ^ (z >>> 31);
  }

  /**
   * Offers one row; NaN entries mark missing values. The array is copied if kept, never retained.
   *
   * @throws IllegalArgumentException for a row whose length is not the sample's width
   */
  public void add(double[] row) {
    if (row.length != width) {
      throw new IllegalArgumentException(
          "Cannot sample a row of " + row.length + " values into rows of width " + width);
    }
    long h = hash(row);
    offered++;
    if (h > threshold) {
      dropped = true;
      return;
    }
    offer(h, row, 1L);
  }

  /**
   * Adds the other sample's rows into this one and returns this: the union of the two multisets,
   * weights added for equal content, cut again to the {@code capacity} smallest distinct hashes.
   * The other sample is not changed.
   *
   * @throws IllegalArgumentException when the two samples differ in capacity or width
   */
  public RowSample merge(RowSample other) {
    if (other.capacity != capacity || other.width != width) {
      throw new IllegalArgumentException(
          "Cannot merge a row sample of capacity " + other.capacity + " and width " + other.width
              + " into one of capacity " + capacity + " and width " + width);
    }
    int[] theirs = other.liveSlots();
    // Snapshot what is read from other: it may be this very sample.
    long[] hashes = new long[theirs.length];
    long[] weights = new long[theirs.length];
    double[][] rows = new double[theirs.length][];
    for (int i = 0; i < theirs.length; i++) {
      hashes[i] = other.slotHash[theirs[i]];
      weights[i] = other.slotWeight[theirs[i]];
      rows[i] = other.slotRow[theirs[i]];
    }
    long otherOffered = other.offered;
    boolean otherDropped = other.dropped;
    for (int i = 0; i < theirs.length; i++) {
      if (hashes[i] > threshold) {
        dropped = true;
      } else {
        offer(hashes[i], rows[i], weights[i]);
      }
    }
    offered += otherOffered;
    dropped |= otherDropped;
    return this;
  }

  /** Entries kept: distinct contents (more than the distinct hashes only after a collision). */
  public int size() {
    return entries;
  }

  /** Rows offered in total, in this sample and every sample merged into it. */
  public long offered() {
    return offered;
  }

  /** True when no row was ever left out, so that the sample holds the whole table. */
  public boolean complete() {
    return !dropped;
  }

  /**
   * The kept rows (normalized: 0.0 for -0.0, the canonical NaN), copied, in canonical order: by
   * hash in signed order, then by content, compared value by value with {@link Double#compare}.
   */
  public double[][] rows() {
    return rows(canonicalOrder());
  }

  /** The weights (occurrence counts) of {@link #rows()}, in the same order. */
  public long[] weights() {
    return weights(canonicalOrder());
  }

  /**
   * The kept rows and their weights, as {@link #rows()} and {@link #weights()} give them, from one
   * sort into canonical order (the caller that needs both pays for one).
   */
  public Weighted weighted() {
    int[] order = canonicalOrder();
    return new Weighted(rows(order), weights(order));
  }

  /** Rows of a sample and how many times each occurred, in canonical order. */
  public record Weighted(double[][] rows, long[] weights) {}

  // ---------------------------------------------------------------------------------------------
  // Internals

  private double[][] rows(int[] order) {
    double[][] out = new double[order.length][];
    for (int i = 0; i < order.length; i++) {
      out[i] = slotRow[order[i]].clone();
    }
    return out;
  }

  private long[] weights(int[] order) {
    long[] out = new long[order.length];
    for (int i = 0; i < order.length; i++) {
      out[i] = slotWeight[order[i]];
    }
    return out;
  }

  /** Keeps {@code weight} occurrences of a row with hash h, h at most the threshold. */
  private void offer(long h, double[] row, long weight) {
    int t = find(h);
    if (t >= 0) {
      int last = NONE;
      for (int s = tableSlot[t]; s != NONE; s = slotNext[s]) {
        if (sameContent(slotRow[s], row)) {
          slotWeight[s] = Math.addExact(slotWeight[s], weight);
          return;
        }
        last = s;
      }
      // A collision: another content under a hash already kept.
      int s = newSlot(h, row, weight);
      slotNext[last] = s;
      return;
    }
    if (distinct == capacity) {
      // Full and h is below the threshold (equal would have been found): the largest goes.
      evictLargest();
    }
    int s = newSlot(h, row, weight);
    tableInsert(h, s);
    heapPush(h);
    threshold = distinct == capacity ? heap[0] : Long.MAX_VALUE;
  }

  private static boolean sameContent(double[] kept, double[] row) {
    for (int i = 0; i < kept.length; i++) {
      if (Double.doubleToRawLongBits(kept[i]) != bits(row[i])) {
        return false;
      }
    }
    return true;
  }

  private int newSlot(long h, double[] row, long weight) {
    int s;
    if (freeSlot != NONE) {
      s = freeSlot;
      freeSlot = slotNext[s];
    } else {
      if (usedSlots == slotHash.length) {
        growSlots();
      }
      s = usedSlots++;
    }
    double[] copy = slotRow[s];
    if (copy == null) {
      copy = new double[width];
      slotRow[s] = copy;
    }
    for (int i = 0; i < width; i++) {
      double v = row[i];
      copy[i] = v == 0.0 ? 0.0 : (v != v ? Double.NaN : v);
    }
    slotHash[s] = h;
    slotWeight[s] = weight;
    slotNext[s] = NONE;
    entries++;
    return s;
  }

  private void growSlots() {
    int n = slotHash.length;
    // Up to the capacity by doubling; beyond it (collisions only) one slot at a time.
    int grown = n < capacity ? (int) Math.min((long) capacity, 2L * n) : n + 1;
    slotRow = Arrays.copyOf(slotRow, grown);
    slotHash = Arrays.copyOf(slotHash, grown);
    slotWeight = Arrays.copyOf(slotWeight, grown);
    slotNext = Arrays.copyOf(slotNext, grown);
  }

  private void evictLargest() {
    long h = heap[0];
    int t = find(h);
    for (int s = tableSlot[t]; s != NONE; ) {
      int next = slotNext[s];
      slotNext[s] = freeSlot;
      freeSlot = s;
      entries--;
      s = next;
    }
    tableDelete(t);
    heapPopMax();
    dropped = true;
  }

  // Max-heap of distinct hashes, signed order.

  private void heapPush(long h) {
    if (distinct == heap.length) {
      heap = Arrays.copyOf(heap, (int) Math.min((long) capacity, 2L * heap.length));
    }
    int i = distinct++;
    while (i > 0) {
      int parent = (i - 1) >>> 1;
      if (heap[parent] >= h) {
        break;
      }
      heap[i] = heap[parent];
      i = parent;
    }
    heap[i] = h;
  }

  private void heapPopMax() {
    long last = heap[--distinct];
    int n = distinct;
    int i = 0;
    while (true) {
      int child = 2 * i + 1;
      if (child >= n) {
        break;
      }
      if (child + 1 < n && heap[child + 1] > heap[child]) {
        child++;
      }
      if (heap[child] <= last) {
        break;
      }
      heap[i] = heap[child];
      i = child;
    }
    if (n > 0) {
      heap[i] = last;
    }
  }

  // Hash table over distinct hashes: linear probing on the low bits (the hash is already mixed),
  // deletion by backward shift so that no tombstones are needed.

  private int find(long h) {
    int i = (int) h & tableMask;
    while (tableSlot[i] != NONE) {
      if (tableKey[i] == h) {
        return i;
      }
      i = (i + 1) & tableMask;
    }
    return -1;
  }

  private void tableInsert(long h, int slot) {
    if (2 * (distinct + 1) > tableKey.length) {
      rehash(tableKey.length * 2);
    }
    int i = (int) h & tableMask;
    while (tableSlot[i] != NONE) {
      i = (i + 1) & tableMask;
    }
    tableKey[i] = h;
    tableSlot[i] = slot;
  }

  private void rehash(int size) {
    long[] oldKey = tableKey;
    int[] oldSlot = tableSlot;
    tableKey = new long[size];
    tableSlot = new int[size];
    Arrays.fill(tableSlot, NONE);
    tableMask = size - 1;
    for (int i = 0; i < oldKey.length; i++) {
      if (oldSlot[i] != NONE) {
        int j = (int) oldKey[i] & tableMask;
        while (tableSlot[j] != NONE) {
          j = (j + 1) & tableMask;
        }
        tableKey[j] = oldKey[i];
        tableSlot[j] = oldSlot[i];
      }
    }
  }

  private void tableDelete(int i) {
    tableSlot[i] = NONE;
    int j = i;
    while (true) {
      j = (j + 1) & tableMask;
      if (tableSlot[j] == NONE) {
        return;
      }
      int home = (int) tableKey[j] & tableMask;
      // Move j back into the hole at i unless its home lies cyclically in (i, j].
      boolean stays = i <= j ? (i < home && home <= j) : (i < home || home <= j);
      if (!stays) {
        tableKey[i] = tableKey[j];
        tableSlot[i] = tableSlot[j];
        tableSlot[j] = NONE;
        i = j;
      }
    }
  }

  private int[] liveSlots() {
    int[] out = new int[entries];
    int n = 0;
    for (int t = 0; t < tableSlot.length; t++) {
      for (int s = tableSlot[t]; s != NONE; s = slotNext[s]) {
        out[n++] = s;
      }
    }
    return out;
  }

  /** Slots in canonical order: distinct hashes sorted, then each hash's entries by content. */
  private int[] canonicalOrder() {
    long[] hashes = Arrays.copyOf(heap, distinct);
    Arrays.sort(hashes);
    int[] out = new int[entries];
    int n = 0;
    for (long h : hashes) {
      int from = n;
      for (int s = tableSlot[find(h)]; s != NONE; s = slotNext[s]) {
        out[n++] = s;
      }
      // Insertion sort by content within a hash: more than one entry only after a collision.
      for (int a = from + 1; a < n; a++) {
        int slot = out[a];
        int b = a - 1;
        while (b >= from && compareContent(slotRow[out[b]], slotRow[slot]) > 0) {
          out[b + 1] = out[b];
          b--;
        }
        out[b + 1] = slot;
      }
    }
    return out;
  }

  private static int compareContent(double[] x, double[] y) {
    for (int i = 0; i < x.length; i++) {
      int c = Double.compare(x[i], y[i]);
      if (c != 0) {
        return c;
      }
    }
    return 0;
  }

  // Serialization: the counts by default, then the entries in canonical order.

  private void writeObject(ObjectOutputStream out) throws IOException {
    out.defaultWriteObject();
    int[] order = canonicalOrder();
    out.writeInt(order.length);
    for (int s : order) {
      out.writeLong(slotWeight[s]);
      for (double v : slotRow[s]) {
        out.writeDouble(v);
      }
    }
  }

  private void readObject(ObjectInputStream in) throws IOException, ClassNotFoundException {
    in.defaultReadObject();
    if (capacity < 1 || capacity > MAX_CAPACITY || width < 1 || offered < 0) {
      throw new InvalidObjectException(
          "Cannot read a row sample of capacity " + capacity + ", width " + width + ", " + offered + " rows offered");
    }
    int n = in.readInt();
    if (n < 0) {
      throw new InvalidObjectException("Cannot read a row sample of " + n + " entries");
    }
    initStructures();
    double[] row = new double[width];
    for (int i = 0; i < n; i++) {
      long weight = in.readLong();
      if (weight < 1) {
        throw new InvalidObjectException("Cannot read a sampled row of weight " + weight);
      }
      for (int j = 0; j < width; j++) {
        row[j] = in.readDouble();
      }
      long h = hash(row);
      if (h > threshold) {
        throw new InvalidObjectException("Cannot read a row sample holding more than " + capacity + " distinct hashes");
      }
      offer(h, row, weight);
    }
  }
}
