package dev.sluice.demo;

import static dev.sluice.demo.ColdStorageTable.LB_PER_KG;
import static org.apache.spark.sql.functions.col;
import static org.apache.spark.sql.functions.xxhash64;
import static org.apache.spark.sql.functions.sum;
import static org.apache.spark.sql.functions.shiftrightunsigned;
import static org.apache.spark.sql.functions.count;
import static org.apache.spark.sql.functions.bit_xor;
import static org.apache.spark.sql.functions.corr;
import static org.apache.spark.sql.functions.count_distinct;
import static org.apache.spark.sql.functions.count_if;
import static org.apache.spark.sql.functions.lit;
import static org.apache.spark.sql.functions.max;
import static org.apache.spark.sql.functions.min;
import static org.apache.spark.sql.functions.not;
import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;

import dev.sluice.testing.SharedSpark;
import java.nio.file.Files;
import java.nio.file.Path;
import java.sql.Date;
import java.util.Arrays;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.stream.Stream;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.StructField;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.ExtendWith;
import org.junit.jupiter.api.io.TempDir;

@ExtendWith(SharedSpark.class)
class ColdStorageTableTest {
  private static final long SEED = 20261201L;
  private static final long ROWS = 20_000;

  @Test
  void hasTheDocumentedColumnsInOrder(SparkSession spark) {
    StructField[] fields = ColdStorageTable.generate(spark, 10, SEED).schema().fields();

    assertThat(Stream.of(fields).map(f -> f.name() + ":" + f.dataType().simpleString()))
        .containsExactly(
            "depot:string", "check_date:date", "pallet_id:string", "air_temp_c:double",
            "rel_humidity_pct:double", "dwell_hours:double", "gross_weight_kg:double",
            "gross_weight_lb:double", "door_openings:int", "compressor_load_pct:double",
            "energy_kwh:double", "inspection_score:int", "product_class:string");
  }

  @Test
  void rowsDoNotDependOnPartitioning(SparkSession spark) {
    Dataset<Row> one = ColdStorageTable.fromIds(spark.range(0, 3_000, 1, 1).toDF(), SEED);
    Dataset<Row> seven = ColdStorageTable.fromIds(spark.range(0, 3_000, 1, 7).toDF(), SEED);

    assertThat(seven.rdd().getNumPartitions()).isEqualTo(7);
    assertThat(checksum(seven)).isEqualTo(checksum(one));
  }

  @Test
  void anotherSeedGivesOtherValues(SparkSession spark) {
    Dataset<Row> a = ColdStorageTable.generate(spark, 500, SEED);
    Dataset<Row> b = ColdStorageTable.generate(spark, 500, SEED + 1);

    assertThat(checksum(b)).isNotEqualTo(checksum(a));
  }

  @Test
  void plantsEachProblemAtItsRate(SparkSession spark) {
    Map<String, Column> kinds = new LinkedHashMap<>();
    kinds.put("glitch", col("air_temp_c").isin(-99.9, 999.9));
    kinds.put("excursion", col("air_temp_c").between(9.0, 14.0));
    kinds.put("humidity", col("rel_humidity_pct").gt(100));
    kinds.put("dwell", col("dwell_hours").geq(400));
    kinds.put("perfect", col("inspection_score").equalTo(100));
    Map<String, Long> counts = countIf(ColdStorageTable.generate(spark, ROWS, SEED), kinds);

    assertBinomial(counts.get("glitch"), ColdStorageTable.AIR_GLITCH_RATE);
    assertBinomial(counts.get("excursion"), ColdStorageTable.AIR_EXCURSION_RATE);
    assertBinomial(counts.get("humidity"), ColdStorageTable.HUMIDITY_IMPOSSIBLE_RATE);
    assertBinomial(counts.get("dwell"), ColdStorageTable.DWELL_EXTREME_RATE);
    assertBinomial(counts.get("perfect"), ColdStorageTable.PERFECT_SCORE_RATE);
  }

  @Test
  void plantedValuesAreTheOnlyOnesBeyondTheOrdinaryRanges(SparkSession spark) {
    Map<String, Column> strays = new LinkedHashMap<>();
    Column air = col("air_temp_c");
    Column planted = air.between(9.0, 14.0).or(air.isin(-99.9, 999.9));
    strays.put("air", not(air.between(-1.0, 8.0).or(planted)));
    strays.put("humidity", col("rel_humidity_pct").between(99.95, 100.45));
    strays.put("dwell", col("dwell_hours").between(300.005, 399.995));
    strays.put("score", col("inspection_score").equalTo(99));
    strays.put("weight", outside("gross_weight_kg", 350.0, 950.0));
    strays.put("doors", outside("door_openings", 0, 20));
    strays.put("load", outside("compressor_load_pct", 20.0, 95.0));

    assertThat(countIf(ColdStorageTable.generate(spark, ROWS, SEED), strays))
        .allSatisfy((name, count) -> assertThat(count).as(name).isZero());
  }

  @Test
  void missesAFewPercentPerColumn(SparkSession spark) {
    Map<String, Double> rates = new LinkedHashMap<>();
    rates.put("air_temp_c", ColdStorageTable.MISSING_AIR_TEMP);
    rates.put("rel_humidity_pct", ColdStorageTable.MISSING_HUMIDITY);
    rates.put("dwell_hours", ColdStorageTable.MISSING_DWELL);
    rates.put("gross_weight_kg", ColdStorageTable.MISSING_WEIGHT);
    rates.put("door_openings", ColdStorageTable.MISSING_DOOR_OPENINGS);
    rates.put("compressor_load_pct", ColdStorageTable.MISSING_LOAD);
    rates.put("energy_kwh", ColdStorageTable.MISSING_ENERGY);
    rates.put("inspection_score", ColdStorageTable.MISSING_SCORE);
    rates.put("product_class", ColdStorageTable.MISSING_PRODUCT_CLASS);
    Map<String, Column> nulls = new LinkedHashMap<>();
    rates.keySet().forEach(c -> nulls.put(c, col(c).isNull()));

    Map<String, Long> counts = countIf(ColdStorageTable.generate(spark, ROWS, SEED), nulls);

    rates.forEach((c, rate) -> assertBinomial(counts.get(c), rate));
  }

  @Test
  void poundsAreKilogramsTimesTheFactorWithTheSameGaps(SparkSession spark) {
    Map<String, Column> checks = new LinkedHashMap<>();
    checks.put("present", col("gross_weight_kg").isNotNull());
    Column kg = col("gross_weight_kg");
    Column lb = col("gross_weight_lb");
    checks.put("gapsDiffer", kg.isNull().notEqual(lb.isNull()));
    checks.put("mismatch", lb.notEqual(kg.multiply(lit(LB_PER_KG))));

    Map<String, Long> counts = countIf(ColdStorageTable.generate(spark, 5_000, SEED), checks);

    assertThat(counts.get("present")).isGreaterThan(4_500);
    assertThat(counts.get("gapsDiffer")).isZero();
    assertThat(counts.get("mismatch")).isZero();
  }

  @Test
  void loadAndEnergyAreStronglyButNotPerfectlyCorrelated(SparkSession spark) {
    Row r = ColdStorageTable.generate(spark, ROWS, SEED)
        .agg(corr("compressor_load_pct", "energy_kwh"), min("energy_kwh"), max("energy_kwh"))
        .head();

    assertThat(r.getDouble(0)).isBetween(0.9, 0.99);
    assertThat(r.getDouble(1)).isGreaterThan(1_000);
    assertThat(r.getDouble(2)).isGreaterThan(10_000);
  }

  @Test
  void spreadsChecksOverSixDepotsAndFourWeeksWithUniquePallets(SparkSession spark) {
    Row r = ColdStorageTable.generate(spark, ROWS, SEED)
        .agg(count_distinct(col("depot")), min("check_date"), max("check_date"),
            count_distinct(col("pallet_id")), count_distinct(col("product_class")))
        .head();

    assertThat(r.getLong(0)).isEqualTo(6);
    assertThat(r.getDate(1)).isEqualTo(Date.valueOf("2026-10-01"));
    assertThat(r.getDate(2)).isEqualTo(Date.valueOf("2026-10-28"));
    assertThat(r.getLong(3)).isEqualTo(ROWS);
    assertThat(r.getLong(4)).isEqualTo(ColdStorageTable.PRODUCT_CLASSES.size());
  }

  @Test
  void wideTableHasNumberedMeasuresGapsOutliersAndCorrelatedPairs(SparkSession spark) {
    Dataset<Row> wide = ColdStorageTable.generateWide(spark, ROWS, 8, SEED);
    // m02 has mean 5 and sd 1: its planted outliers lie in [13, 20), its ordinary values below.
    Row r = wide.agg(corr("m01", "m02"), count_if(col("m05").isNull()), count_if(col("m02").gt(12)))
        .head();
    // Outliers would dilute r, so the pair is measured on ordinary values (under 7 sd).
    double pair = wide.where(col("m03").lt(120).and(col("m04").lt(1_200)))
        .agg(corr("m03", "m04")).head().getDouble(0);

    assertThat(wide.columns()).containsExactly(
        "depot", "m01", "m02", "m03", "m04", "m05", "m06", "m07", "m08", "product_class");
    assertThat(Stream.of(wide.schema().fields()).skip(1).limit(8).map(StructField::dataType))
        .containsOnly(DataTypes.DoubleType);
    assertThat(pair).isBetween(0.87, 0.93);
    assertThat(Math.abs(r.getDouble(0))).isLessThan(0.05);
    assertBinomial(r.getLong(1), ColdStorageTable.WIDE_MISSING_RATE);
    assertBinomial(r.getLong(2), ColdStorageTable.WIDE_OUTLIER_RATE);
  }

  @Test
  void wideTableWantsAtLeastOneMeasure(SparkSession spark) {
    assertThatThrownBy(() -> ColdStorageTable.generateWide(spark, 10, 0, SEED))
        .isInstanceOf(IllegalArgumentException.class);
  }

  @Test
  void writesOneTidyFilePerDepot(SparkSession spark, @TempDir Path dir) throws Exception {
    Path out = dir.resolve("sample");
    String[] args = {"--output", out.toString(), "--rows", "600"};
    GenerateSample.write(spark, GenerateSample.Options.parse(args));

    List<String> names;
    try (Stream<Path> walk = Files.walk(out)) {
      names = walk.filter(Files::isRegularFile).map(p -> p.getFileName().toString()).toList();
    }
    assertThat(names).filteredOn(n -> n.endsWith(".parquet")).hasSize(6);
    assertThat(names).noneMatch(n -> n.endsWith(".crc"));
    assertThat(spark.read().parquet(out.toString()).count()).isEqualTo(600);
  }

  @Test
  void rejectsUnknownOptions() {
    assertThatThrownBy(() -> GenerateSample.Options.parse("--output", "x", "--colour", "red"))
        .hasMessageContaining("--colour");
    assertThatThrownBy(() -> GenerateSample.Options.parse("--rows", "5"))
        .hasMessageContaining("usage");
  }

  /**
   * An order-independent fingerprint of a table: the row count, and the xor and the sum of a
   * 64-bit hash of every row (shifted so the sum cannot overflow).
   */
  private static List<Object> checksum(Dataset<Row> table) {
    Column rowHash = xxhash64(Stream.of(table.columns()).map(c -> col(c)).toArray(Column[]::new));
    Row r = table.agg(count(lit(1)), bit_xor(rowHash), sum(shiftrightunsigned(rowHash, 20))).head();
    return List.of(r.get(0), r.get(1), r.get(2));
  }

  /** Non-null values of the column outside [low, high]. */
  private static Column outside(String column, double low, double high) {
    return not(col(column).between(low, high));
  }

  /** Counts the rows meeting each condition, all in one aggregate. */
  private static Map<String, Long> countIf(Dataset<Row> table, Map<String, Column> conditions) {
    Column[] counts = conditions.values().stream().map(c -> count_if(c)).toArray(Column[]::new);
    Row row = table.agg(counts[0], Arrays.copyOfRange(counts, 1, counts.length)).head();
    Map<String, Long> result = new LinkedHashMap<>();
    int i = 0;
    for (String name : conditions.keySet()) {
      result.put(name, row.getLong(i++));
    }
    return result;
  }

  /** A count of ROWS Bernoulli(rate) trials lies within five standard deviations of its mean. */
  private static void assertBinomial(long count, double rate) {
    double mean = ROWS * rate;
    double slack = 5 * Math.sqrt(ROWS * rate * (1 - rate));
    assertThat((double) count).isBetween(mean - slack, mean + slack);
  }
}
