package dev.sluice.stats;

/**
 * A stable least-significant-digit radix sort of 64-bit keys in unsigned order, a byte at a time,
 * optionally moving a row number along with each key. The counts of all eight bytes are taken in
 * one read of the keys, and a byte that every key shares costs no pass. Doubles sort by {@link
 * #key}, whose unsigned order is their numeric order. On the pilot's and the rank sample's few
 * hundred thousand values a column, this takes a fraction of the time of {@code Arrays.sort}'s
 * comparisons.
 */
final class RadixSort {
  private static final int BYTES = 8;

  private RadixSort() {}

  /**
   * The key of a double: unsigned order of keys is the numeric order of the values, -0.0 before
   * 0.0, and NaN (the canonical one) after positive infinity.
   */
  static long key(double v) {
    long bits = Double.doubleToRawLongBits(v);
    return bits ^ ((bits >> 63) | Long.MIN_VALUE);
  }

  /** The double whose {@link #key} is k. */
  static double value(long k) {
    return Double.longBitsToDouble(k ^ ((~k >> 63) | Long.MIN_VALUE));
  }

  /**
   * Sorts {@code keys[0 .. m - 1]} in unsigned order, stable; when {@code rows} is not null,
   * {@code rows[i]} moves with {@code keys[i]}. The swap arrays (at least m long; {@code rowSwap}
   * may be null when rows is) are scratch.
   */
  static void sort(long[] keys, int[] rows, int m, long[] keySwap, int[] rowSwap) {
    if (m < 2) {
      return;
    }
    int[][] counts = new int[BYTES][256];
    for (int t = 0; t < m; t++) {
      long k = keys[t];
      for (int b = 0; b < BYTES; b++) {
        counts[b][(int) (k >>> (8 * b)) & 0xFF]++;
      }
    }
    long[] from = keys;
    long[] to = keySwap;
    int[] rowsFrom = rows;
    int[] rowsTo = rowSwap;
    for (int b = 0; b < BYTES; b++) {
      int shift = 8 * b;
      int[] at = counts[b];
      if (at[(int) (from[0] >>> shift) & 0xFF] == m) {
        continue; // every key has this byte: the pass would move nothing
      }
      int sum = 0;
      for (int d = 0; d < 256; d++) {
        int c = at[d];
        at[d] = sum;
        sum += c;
      }
      if (rowsFrom == null) {
        for (int t = 0; t < m; t++) {
          long k = from[t];
          to[at[(int) (k >>> shift) & 0xFF]++] = k;
        }
      } else {
        for (int t = 0; t < m; t++) {
          long k = from[t];
          int i = at[(int) (k >>> shift) & 0xFF]++;
          to[i] = k;
          rowsTo[i] = rowsFrom[t];
        }
      }
      long[] k = from;
      from = to;
      to = k;
      int[] r = rowsFrom;
      rowsFrom = rowsTo;
      rowsTo = r;
    }
    if (from != keys) {
      System.arraycopy(from, 0, keys, 0, m);
      if (rows != null) {
        System.arraycopy(rowsFrom, 0, rows, 0, m);
      }
    }
  }
}
