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
 * per-column option of Parquet's writer); every other column keeps the writer's defaults.
 */
public final class ParquetEncoding {
  /** Parquet's switch for dictionary encoding; {@code #<column>} after it sets one column. */
  public static final String DICTIONARY = "parquet.enable.dictionary";
  /** Parquet's limit on one dictionary page, in bytes. */
  public static final String DICTIONARY_PAGE = "parquet.dictionary.page.size";
  /** Parquet's default {@value #DICTIONARY_PAGE}: 1 MiB. */
  public static final long DEFAULT_DICTIONARY_PAGE = 1L << 20;

  private ParquetEncoding() {}

  /**
   * The writer options for {@code schema}: the dictionary turned off for each numeric column
   * whose distinct values seen in the pilot ({@code pilotDistinct}, a lower bound on the column's)
   * would not fit one dictionary page of {@code dictionaryPageBytes}. Empty without a pilot.
   */
  public static Map<String, String> options(Map<String, Long> pilotDistinct, StructType schema,
      long dictionaryPageBytes) {
    Map<String, String> options = new LinkedHashMap<>();
    for (StructField f : schema.fields()) {
      Long distinct = pilotDistinct.get(f.name());
      int width = plainBytes(f.dataType());
      if (distinct != null && width > 0 && distinct * width > dictionaryPageBytes) {
        options.put(DICTIONARY + "#" + f.name(), "false");
      }
    }
    return options;
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
