package dev.sluice.demo;

import static org.apache.spark.sql.functions.array;
import static org.apache.spark.sql.functions.col;
import static org.apache.spark.sql.functions.concat;
import static org.apache.spark.sql.functions.date_add;
import static org.apache.spark.sql.functions.element_at;
import static org.apache.spark.sql.functions.floor;
import static org.apache.spark.sql.functions.format_string;
import static org.apache.spark.sql.functions.lit;
import static org.apache.spark.sql.functions.round;
import static org.apache.spark.sql.functions.when;

import java.time.LocalDate;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;

/**
 * The demo table: a fictional cold-storage operator logs one row per pallet check across six
 * depots ({@code D1} .. {@code D6}) over the 28 days from 2026-10-01.
 *
 * <p>Columns, in this order: {@code depot} STRING, {@code check_date} DATE, {@code pallet_id}
 * STRING (unique, {@code PL-000001} for row id 0), {@code air_temp_c} DOUBLE, {@code
 * rel_humidity_pct} DOUBLE, {@code dwell_hours} DOUBLE, {@code gross_weight_kg} DOUBLE, {@code
 * gross_weight_lb} DOUBLE, {@code door_openings} INT, {@code compressor_load_pct} DOUBLE, {@code
 * energy_kwh} DOUBLE, {@code inspection_score} INT, {@code product_class} STRING.
 *
 * <p>Ordinary values: air temperature normal around a depot set point (3.0 .. 4.0 deg C, overall
 * mean 3.5, sd about 0.9) in steps of 0.1, clamped to [-1, 8]; humidity normal 85 +- 5 % clamped
 * to [55, 99.9]; dwell lognormal with median 30 h and log-sd 0.6, clamped to [0.25, 300], in
 * hundredths of an hour; weight normal 650 +- 120 kg clamped to [350, 950] in steps of 0.1 kg;
 * door openings normal 6 +- 2.5 rounded and clamped to [0, 20]; compressor load normal 58 +- 14 %
 * clamped to [20, 95]; energy {@code 2000 + 200 * load + 950 * z} kWh (about 3,000 .. 24,000,
 * Pearson r with load about 0.95); inspection score normal 85 +- 4.5 rounded and clamped to [0,
 * 98]; product class one of {@link #PRODUCT_CLASSES} with weights {@link #PRODUCT_WEIGHTS}.
 *
 * <p>Planted problems, each an exact probability per row (the realised counts are binomial), the
 * kinds of one column mutually exclusive and the columns independent of each other:
 *
 * <ul>
 *   <li>sensor glitch codes: {@code air_temp_c} is -99.9 or 999.9 (half each) in {@value
 *       #AIR_GLITCH_RATE} of rows; validity bounds [-40, 40] declare them invalid;
 *   <li>real temperature excursions: {@code air_temp_c} in [9, 14] in {@value #AIR_EXCURSION_RATE}
 *       of rows; valid, and the only valid values above 8, so outlier fences flag them;
 *   <li>impossible humidity: {@code rel_humidity_pct} in [100.5, 140] in {@value
 *       #HUMIDITY_IMPOSSIBLE_RATE} of rows, the only values above 100 (validity [0, 100]);
 *   <li>real extreme dwell: {@code dwell_hours} in [400, 900) in {@value #DWELL_EXTREME_RATE} of
 *       rows, the only values above 300;
 *   <li>perfect scores: {@code inspection_score} = 100 in {@value #PERFECT_SCORE_RATE} of rows,
 *       the only values above 98: high outliers that are the best records;
 *   <li>missing values (null) per column: see the {@code MISSING_*} constants, 2 % .. 5 %; {@code
 *       gross_weight_lb} is null in exactly the rows where {@code gross_weight_kg} is null;
 *   <li>a perfectly collinear pair: {@code gross_weight_lb = gross_weight_kg * }{@value #LB_PER_KG}
 *       (one double multiplication, not rounded) in every row;
 *   <li>a strongly correlated pair: {@code compressor_load_pct} and {@code energy_kwh}, r about
 *       0.95, each missing independently;
 *   <li>scales from hundredths (dwell) to tens of thousands (energy).
 * </ul>
 *
 * <p>Every value is a pure function of the row id and the seed (see {@link HashDraws}), so the
 * table is the same however the ids are partitioned.
 */
public final class ColdStorageTable {
  /** Pounds per kilogram, the factor between the two weight columns. */
  public static final double LB_PER_KG = 2.20462262185;

  /** Probabilities per row of the planted problems, see the class comment. */
  public static final double AIR_GLITCH_RATE = 0.003;

  public static final double AIR_EXCURSION_RATE = 0.002;
  public static final double HUMIDITY_IMPOSSIBLE_RATE = 0.005;
  public static final double DWELL_EXTREME_RATE = 0.002;
  public static final double PERFECT_SCORE_RATE = 0.004;

  /** Probabilities per row of a null value in each column. */
  public static final double MISSING_AIR_TEMP = 0.020;

  public static final double MISSING_HUMIDITY = 0.030;
  public static final double MISSING_DWELL = 0.025;
  /** Shared by both weight columns: the same rows are missing in kg and lb. */
  public static final double MISSING_WEIGHT = 0.040;

  public static final double MISSING_DOOR_OPENINGS = 0.022;
  public static final double MISSING_LOAD = 0.035;
  public static final double MISSING_ENERGY = 0.028;
  public static final double MISSING_SCORE = 0.050;
  public static final double MISSING_PRODUCT_CLASS = 0.015;

  /** The glitch codes the air sensors report instead of a reading. */
  public static final double GLITCH_LOW = -99.9;

  public static final double GLITCH_HIGH = 999.9;

  public static final LocalDate FIRST_DATE = LocalDate.of(2026, 10, 1);
  public static final int DAYS = 28;
  public static final List<String> DEPOTS = List.of("D1", "D2", "D3", "D4", "D5", "D6");
  public static final List<String> PRODUCT_CLASSES =
      List.of("dairy", "produce", "meat", "bakery", "frozen-dessert", "vaccine-cold-chain");

  /** Relative frequencies of {@link #PRODUCT_CLASSES}, summing to 1. */
  public static final List<Double> PRODUCT_WEIGHTS = List.of(0.28, 0.26, 0.16, 0.10, 0.12, 0.08);

  /** Rates and pair correlation of {@link #generateWide}. */
  public static final double WIDE_MISSING_RATE = 0.05;

  public static final double WIDE_OUTLIER_RATE = 0.005;
  public static final double WIDE_PAIR_R = 0.9;

  /** Air set point of each depot in {@link #DEPOTS} order, so per-depot fences have a purpose. */
  private static final double[] SET_POINTS = {3.0, 3.5, 4.0, 3.2, 3.8, 3.5};

  private static final String LOAD = "compressor_load_pct";

  private ColdStorageTable() {}

  /** The demo table with {@code rows} rows (row ids 0 .. rows - 1) for the given seed. */
  public static Dataset<Row> generate(SparkSession spark, long rows, long seed) {
    return fromIds(spark.range(rows).toDF(), seed);
  }

  /**
   * The demo table for the ids in the long column {@code id} of {@code ids}; the row of an id is
   * the same whatever else is in the input or how it is partitioned.
   */
  public static Dataset<Row> fromIds(Dataset<Row> ids, long seed) {
    HashDraws draws = new HashDraws("id", seed);
    Column depotIndex = depotIndex(draws);
    Column load = round(draws.normal("load", 58, 14, 20, 95), 1);
    List<Column> columns = new ArrayList<>();
    columns.add(depot(depotIndex).as("depot"));
    columns.add(date_add(lit(FIRST_DATE), dayOffset(draws)).as("check_date"));
    columns.add(format_string("PL-%06d", col("id").plus(1)).as("pallet_id"));
    columns.add(airTemp(draws, depotIndex).as("air_temp_c"));
    columns.add(humidity(draws).as("rel_humidity_pct"));
    columns.add(dwell(draws).as("dwell_hours"));
    columns.addAll(weights(draws));
    columns.add(doorOpenings(draws).as("door_openings"));
    columns.add(draws.mixture("load").missing(MISSING_LOAD).otherwise(load).as(LOAD));
    columns.add(energy(draws, load).as("energy_kwh"));
    columns.add(score(draws).as("inspection_score"));
    columns.add(productClass(draws, MISSING_PRODUCT_CLASS).as("product_class"));
    return ids.select(columns.toArray(new Column[0]));
  }

  /**
   * A wide table for benchmarks: {@code depot}, then {@code numericColumns} DOUBLE columns {@code
   * m01} .. {@code mNN} (zero-padded to at least two digits, more when there are over 99), then
   * {@code product_class}.
   *
   * <p>Column {@code j} (1-based) is normal with sd {@code s = 10^((j - 1) % 5 - 1)} (0.1 .. 1000)
   * and mean {@code 5 s}. Every fourth column shares a latent draw with the column before it, so
   * the pairs (m03, m04), (m07, m08), ... have r about {@value #WIDE_PAIR_R}. In every numeric
   * column and in {@code product_class}, {@value #WIDE_MISSING_RATE} of rows are null, and {@value
   * #WIDE_OUTLIER_RATE} of the rows of each numeric column hold high outliers 8 to 15 sd above
   * the mean.
   */
  public static Dataset<Row> generateWide(
      SparkSession spark, long rows, int numericColumns, long seed) {
    if (numericColumns < 1) {
      throw new IllegalArgumentException("numericColumns must be at least 1: " + numericColumns);
    }
    HashDraws draws = new HashDraws("id", seed);
    int digits = Math.max(2, String.valueOf(numericColumns).length());
    List<Column> columns = new ArrayList<>();
    columns.add(depot(depotIndex(draws)).as("depot"));
    for (int j = 1; j <= numericColumns; j++) {
      columns.add(wideMeasure(draws, j).as(String.format("m%0" + digits + "d", j)));
    }
    columns.add(productClass(draws, WIDE_MISSING_RATE).as("product_class"));
    return spark.range(rows).select(columns.toArray(new Column[0]));
  }

  /** Numeric column {@code j} of the wide table, see {@link #generateWide}. */
  private static Column wideMeasure(HashDraws draws, int j) {
    double sd = Math.pow(10, (j - 1) % 5 - 1);
    Column z = draws.normal("m" + j);
    if (j % 4 == 0) {
      // Mixing in the previous column's latent draw gives correlation r with that column.
      double own = Math.sqrt(1 - WIDE_PAIR_R * WIDE_PAIR_R);
      z = draws.normal("m" + (j - 1)).multiply(lit(WIDE_PAIR_R)).plus(z.multiply(lit(own)));
    }
    Column ordinary = lit(5 * sd).plus(z.multiply(lit(sd)));
    Column outlier = lit(5 * sd).plus(draws.uniform("m" + j + "#outlier", 8, 15).multiply(lit(sd)));
    return draws
        .mixture("m" + j)
        .missing(WIDE_MISSING_RATE)
        .plant(WIDE_OUTLIER_RATE, outlier)
        .otherwise(ordinary);
  }

  /** Zero-based depot number, uniform over the six depots. */
  static Column depotIndex(HashDraws draws) {
    return floor(draws.uniform("depot").multiply(lit(DEPOTS.size()))).cast("int");
  }

  /** Depot code "D1" .. "D6" for a zero-based depot number. */
  static Column depot(Column depotIndex) {
    return concat(lit("D"), depotIndex.plus(1).cast("string"));
  }

  /** A product class from the fixed weights, null in {@code missingRate} of rows. */
  static Column productClass(HashDraws draws, double missingRate) {
    Mixture mixture = draws.mixture("product_class").missing(missingRate);
    int last = PRODUCT_CLASSES.size() - 1;
    for (int i = 0; i < last; i++) {
      // Weights apply to the rows that are not missing, so scale them by the remaining share.
      mixture.plant(PRODUCT_WEIGHTS.get(i) * (1 - missingRate), lit(PRODUCT_CLASSES.get(i)));
    }
    return mixture.otherwise(lit(PRODUCT_CLASSES.get(last)));
  }

  private static Column dayOffset(HashDraws draws) {
    return floor(draws.uniform("check_date").multiply(lit(DAYS))).cast("int");
  }

  /** Set point plus noise, with glitch codes and real excursions planted, in steps of 0.1. */
  private static Column airTemp(HashDraws draws, Column depotIndex) {
    Column[] setPoints = Arrays.stream(SET_POINTS).mapToObj(p -> lit(p)).toArray(Column[]::new);
    Column setPoint = element_at(array(setPoints), depotIndex.plus(1));
    Column ordinary = HashDraws.clamp(setPoint.plus(draws.normal("air").multiply(lit(0.8))), -1, 8);
    Column lowCode = draws.uniform("air#code").lt(lit(0.5));
    Column code = when(lowCode, lit(GLITCH_LOW)).otherwise(lit(GLITCH_HIGH));
    Column air =
        draws
            .mixture("air")
            .missing(MISSING_AIR_TEMP)
            .plant(AIR_GLITCH_RATE, code)
            .plant(AIR_EXCURSION_RATE, draws.uniform("air#excursion", 9, 14))
            .otherwise(ordinary);
    return round(air, 1);
  }

  private static Column humidity(HashDraws draws) {
    Column humidity =
        draws
            .mixture("humidity")
            .missing(MISSING_HUMIDITY)
            .plant(HUMIDITY_IMPOSSIBLE_RATE, draws.uniform("humidity#impossible", 100.5, 140))
            .otherwise(draws.normal("humidity", 85, 5, 55, 99.9));
    return round(humidity, 1);
  }

  private static Column dwell(HashDraws draws) {
    Column dwell =
        draws
            .mixture("dwell")
            .missing(MISSING_DWELL)
            .plant(DWELL_EXTREME_RATE, draws.uniform("dwell#extreme", 400, 900))
            .otherwise(draws.logNormal("dwell", 30, 0.6, 0.25, 300));
    return round(dwell, 2);
  }

  /** Both weight columns; lb is derived from kg, so it shares kg's missing rows. */
  private static List<Column> weights(HashDraws draws) {
    Column ordinary = round(draws.normal("weight", 650, 120, 350, 950), 1);
    Column kg = draws.mixture("weight").missing(MISSING_WEIGHT).otherwise(ordinary);
    return List.of(kg.as("gross_weight_kg"), kg.multiply(lit(LB_PER_KG)).as("gross_weight_lb"));
  }

  private static Column doorOpenings(HashDraws draws) {
    Column ordinary = round(draws.normal("doors", 6, 2.5, 0, 20)).cast("int");
    return draws.mixture("doors").missing(MISSING_DOOR_OPENINGS).otherwise(ordinary);
  }

  /**
   * The energy meter reading, driven by the load before its missing values are planted, so the
   * two columns are missing independently and stay correlated where both are present.
   */
  private static Column energy(HashDraws draws, Column load) {
    Column noise = draws.normal("energy").multiply(lit(950.0));
    Column ordinary = round(lit(2000.0).plus(load.multiply(lit(200.0))).plus(noise), 2);
    return draws.mixture("energy").missing(MISSING_ENERGY).otherwise(ordinary);
  }

  private static Column score(HashDraws draws) {
    Column ordinary = round(draws.normal("score", 85, 4.5, 0, 98)).cast("int");
    return draws
        .mixture("score")
        .missing(MISSING_SCORE)
        .plant(PERFECT_SCORE_RATE, lit(100))
        .otherwise(ordinary);
  }
}
