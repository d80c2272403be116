package dev.sluice.io;

import static org.assertj.core.api.Assertions.assertThat;

import java.util.Map;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.StructType;
import org.junit.jupiter.api.Test;

/**
 * Not an outside reference: the rule of ParquetEncoding. The page limit and the per-column option
 * key are Parquet's own (parquet-hadoop's ParquetOutputFormat and its column configuration).
 */
class ParquetEncodingTest {
  private static final StructType SCHEMA = new StructType()
      .add("reading", DataTypes.DoubleType)
      .add("level", DataTypes.DoubleType)
      .add("count", DataTypes.IntegerType)
      .add("big count", DataTypes.LongType)
      .add("dépôt.name", DataTypes.DoubleType)
      .add("label", DataTypes.StringType);

  @Test
  void columnsWhosePilotOverflowsADictionaryPageGoPlain() {
    // 1 MiB holds 131,072 doubles or longs, 262,144 ints.
    Map<String, Long> distinct = Map.of("reading", 131_073L, "level", 131_072L, "count", 200_000L,
        "big count", 150_000L, "dépôt.name", 10_000_000L, "label", 10_000_000L);
    assertThat(ParquetEncoding.options(distinct, SCHEMA, ParquetEncoding.DEFAULT_DICTIONARY_PAGE))
        .containsOnly(Map.entry("parquet.enable.dictionary#reading", "false"),
            Map.entry("parquet.enable.dictionary#big count", "false"),
            Map.entry("parquet.enable.dictionary#dépôt.name", "false"));
  }

  @Test
  void withoutAPilotNothingChanges() {
    assertThat(ParquetEncoding.options(Map.of(), SCHEMA, 1024)).isEmpty();
    // A smaller page takes fewer values: the limit follows the configured page size.
    assertThat(ParquetEncoding.options(Map.of("level", 129L), SCHEMA, 1024))
        .containsOnly(Map.entry("parquet.enable.dictionary#level", "false"));
  }
}
