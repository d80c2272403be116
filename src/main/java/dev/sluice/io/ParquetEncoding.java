package dev.sluice.io;

import java.util.LinkedHashMap;
import java.util.Map;
import org.apache.spark.sql.types.DataType;
import org.apache.spark.sql.types.DoubleType;
import org.apache.spark.sql.types.FloatType;
import org.apache.spark.sql.types.IntegerType;
import org.apache.spark.sql.types.LongType;
import org.apache.spark.sql.types.StructField;
import org.apache.spark.sql.types.StructType;

/**
 * Parquet writer options for the treated table, from what the fit already knows.
 *
 * <p>Parquet's writer first tries a dictionary for every column chunk and falls back to plain
 * encoding once the dictionary outgrows its page ({@value #DICTIONARY_PAGE}, 1 MiB by default).
 * For a column of mostly distinct values the attempt is wasted work on every row group: each
 * value is hashed into the dictionary until it overflows, and when that happens within the first
 * page, the values already taken are written plain, so the file comes out the same as without the
 * attempt. A numeric column whose pilot alone holds more distinct values than a dictionary page
 * can is therefore written with the dictionary off ({@value #DICTIONARY}{@code #<column>}, a
 * per-column option of Parquet's writer).
 *
 * <p>The dictionary can also be wasted without ever overflowing: on a wide table a row group holds
 * fewer values per column than a dictionary page, and Parquet then hashes every value into the
 * dictionary, finds at the end of the first page that the dictionary and its indices are no
 * smaller than the plain values, and writes them plain. A numeric column whose pilot holds at
 * least {@value #FEWEST_VALUES} values, at least {@value #DISTINCT_SHARE} of them distinct, in no
 * particular order (between {@value #ORDER_LOW} and {@value #ORDER_HIGH} of its consecutive pairs
 * ascending), is written with the dictionary off as well. A page with that share of distinct values
 * is not smaller with a dictionary; the order condition keeps sorted or clustered columns (whose
 * first rows may be distinct while later pages repeat) with the writer's defaults. Every other
 * column keeps them too.
 */
public final class ParquetEncoding {
  /** Parquet's switch for dictionary encoding; {@code #<column>} after it sets one column. */
  public static final String DICTIONARY = "parquet.enable.dictionary";
  /** Parquet's limit on one dictionary page, in bytes. */
  public static final String DICTIONARY_PAGE = "parquet.dictionary.page.size";
  /** Parquet's default {@value #DICTIONARY_PAGE}: 1 MiB. */
  public static final long DEFAULT_DICTIONARY_PAGE = 1L << 20;

  /** Fewest finite pilot values that may show a column mostly distinct. */
  static final int FEWEST_VALUES = 1_000;
  /** Share of a pilot's finite values that must be distinct. */
  static final double DISTINCT_SHARE = 0.99;
  /** Shares of ascending consecutive pairs between which a pilot is in no particular order. */
  static final double ORDER_LOW = 0.25;
  static final double ORDER_HIGH = 0.75;

  private ParquetEncoding() {}

  /**
   * The writer options for {@code schema}: the dictionary turned off for each numeric column
   * whose distinct values seen in the pilot ({@code pilotDistinct}, a lower bound on the column's)
   * would not fit one dictionary page of {@code dictionaryPageBytes}, or whose pilot values
   * ({@code pilot}, in the order read) are mostly distinct and unordered ({@link
   * #mostlyDistinct}). Empty without a pilot.
   */
  public static Map<String, String> options(Map<String, Long> pilotDistinct, Map<String, double[]> pilot,
      StructType schema, long dictionaryPageBytes) {
    Map<String, String> options = new LinkedHashMap<>();
    for (StructField f : schema.fields()) {
      Long distinct = pilotDistinct.get(f.name());
      int width = plainBytes(f.dataType());
      if (distinct != null && width > 0 && (distinct * width > dictionaryPageBytes
          || pilot.containsKey(f.name()) && mostlyDistinct(pilot.get(f.name()), distinct))) {
        options.put(DICTIONARY + "#" + f.name(), "false");
      }
    }
    return options;
  }

  /**
   * True when {@code values} (a pilot in the order read; NaN and infinities skipped) hold at least
   * {@value #FEWEST_VALUES} finite values, {@code distinct} of them distinct, at least {@value
   * #DISTINCT_SHARE} of them, and between {@value #ORDER_LOW} and {@value #ORDER_HIGH} of their
   * consecutive pairs ascend.
   */
  static boolean mostlyDistinct(double[] values, long distinct) {
    long finite = 0;
    long pairs = 0;
    long ascents = 0;
    double before = Double.NaN;
    for (double v : values) {
      if (!Double.isFinite(v)) {
        continue;
      }
      finite++;
      if (!Double.isNaN(before)) {
        pairs++;
        ascents += v > before ? 1 : 0;
      }
      before = v;
    }
    if (finite < FEWEST_VALUES || distinct < DISTINCT_SHARE * finite) {
      return false;
    }
    double up = (double) ascents / pairs;
    return up >= ORDER_LOW && up <= ORDER_HIGH;
  }

  /** Bytes per value in a plain-encoded dictionary of this type; 0 for types left alone. */
  static int plainBytes(DataType t) {
    if (t instanceof DoubleType || t instanceof LongType) {
      return 8;
    }
    if (t instanceof FloatType || t instanceof IntegerType) {
      return 4;
    }
    return 0;
  }
}
