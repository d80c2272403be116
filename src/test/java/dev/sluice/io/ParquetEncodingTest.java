package dev.sluice.io;

import static org.assertj.core.api.Assertions.assertThat;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.Collections;
import java.util.List;
import java.util.Map;
import java.util.Random;
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
    assertThat(ParquetEncoding.options(distinct, Map.of(), SCHEMA, ParquetEncoding.DEFAULT_DICTIONARY_PAGE))
        .containsOnly(Map.entry("parquet.enable.dictionary#reading", "false"),
            Map.entry("parquet.enable.dictionary#big count", "false"),
            Map.entry("parquet.enable.dictionary#dépôt.name", "false"));
  }

  @Test
  void mostlyDistinctPilotsInNoParticularOrderGoPlainToo() {
    double[] shuffled = shuffled(20_000, 7L);
    double[] sorted = shuffled.clone();
    Arrays.sort(sorted);
    double[] repeats = new double[20_000];
    for (int i = 0; i < repeats.length; i++) {
      repeats[i] = shuffled[i] % 100; // 100 values, each many times
    }
    double[] few = Arrays.copyOf(shuffled, 999);
    Map<String, double[]> pilot = Map.of("reading", shuffled, "level", sorted, "count", repeats,
        "big count", few, "label", shuffled);
    // Far below a page each (1 MiB holds 131,072 doubles): only the new rule can turn them off.
    Map<String, Long> distinct = Map.of("reading", 20_000L, "level", 20_000L, "count", 100L,
        "big count", 999L, "label", 20_000L);
    assertThat(ParquetEncoding.options(distinct, pilot, SCHEMA, ParquetEncoding.DEFAULT_DICTIONARY_PAGE))
        .containsOnly(Map.entry("parquet.enable.dictionary#reading", "false"));
  }

  @Test
  void theDistinctShareAndTheOrderBandAreTheirBounds() {
    double[] values = shuffled(10_000, 11L);
    assertThat(ParquetEncoding.mostlyDistinct(values, 9_900)).isTrue();
    assertThat(ParquetEncoding.mostlyDistinct(values, 9_899)).isFalse();
    // Missing values (NaN) and infinities are not counted.
    double[] gaps = Arrays.copyOf(values, 12_000);
    Arrays.fill(gaps, 10_000, 11_000, Double.NaN);
    Arrays.fill(gaps, 11_000, 12_000, Double.POSITIVE_INFINITY);
    assertThat(ParquetEncoding.mostlyDistinct(gaps, 9_900)).isTrue();
    // Runs of 4 ascend 3 pairs in 4 (7,500 of 10,000 pairs): the edge of the band; runs of 5 pass it.
    assertThat(ParquetEncoding.mostlyDistinct(sawtooth(10_001, 4), 10_001)).isTrue();
    assertThat(ParquetEncoding.mostlyDistinct(sawtooth(10_000, 5), 10_000)).isFalse();
  }

  /** 0 .. n - 1 in an order of its own (a fixed seed). */
  private static double[] shuffled(int n, long seed) {
    List<Double> list = new ArrayList<>();
    for (int i = 0; i < n; i++) {
      list.add((double) i);
    }
    Collections.shuffle(list, new Random(seed));
    return list.stream().mapToDouble(Double::doubleValue).toArray();
  }

  /** Distinct values in runs of {@code run} ascending ones, each run starting below the last. */
  private static double[] sawtooth(int n, int run) {
    double[] out = new double[n];
    for (int i = 0; i < n; i++) {
      out[i] = -(i / run) * 10.0 * run + i % run;
    }
    return out;
  }

  @Test
  void withoutAPilotNothingChanges() {
    assertThat(ParquetEncoding.options(Map.of(), Map.of(), SCHEMA, 1024)).isEmpty();
    // A smaller page takes fewer values: the limit follows the configured page size.
    assertThat(ParquetEncoding.options(Map.of("level", 129L), Map.of(), SCHEMA, 1024))
        .containsOnly(Map.entry("parquet.enable.dictionary#level", "false"));
  }
}
