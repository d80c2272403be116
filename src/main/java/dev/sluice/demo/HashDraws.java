package dev.sluice.demo;

import static org.apache.spark.sql.functions.col;
import static org.apache.spark.sql.functions.cos;
import static org.apache.spark.sql.functions.exp;
import static org.apache.spark.sql.functions.greatest;
import static org.apache.spark.sql.functions.least;
import static org.apache.spark.sql.functions.lit;
import static org.apache.spark.sql.functions.log;
import static org.apache.spark.sql.functions.shiftrightunsigned;
import static org.apache.spark.sql.functions.sqrt;
import static org.apache.spark.sql.functions.xxhash64;

import org.apache.spark.sql.Column;

/**
 * Pseudo-random numbers as Catalyst expressions of the row id.
 *
 * <p>Every draw is {@code xxhash64(id, seed, stream)}, a pure function of the row id, the seed and
 * a stream name. Unlike {@code rand(seed)}, whose sequence restarts in every partition, the value
 * of a row therefore does not depend on how the ids are split into partitions or tasks, and two
 * streams with different names are independent for practical purposes.
 */
final class HashDraws {
  /** 2^53: the top 53 bits of a hash are exactly representable in a double. */
  private static final double TWO_POW_53 = 9007199254740992.0;

  private final Column id;
  private final long seed;

  /**
   * @param idColumn name of the unique, non-null long column the draws are keyed on
   * @param seed changes every draw of every stream at once
   */
  HashDraws(String idColumn, long seed) {
    this.id = col(idColumn);
    this.seed = seed;
  }

  /** A uniform double in [0, 1) for the named stream. */
  Column uniform(String stream) {
    // Keep the top 53 bits, unsigned, so the quotient is exact and strictly below 1.
    Column bits = shiftrightunsigned(xxhash64(id, lit(seed), lit(stream)), 11);
    return bits.cast("double").divide(lit(TWO_POW_53));
  }

  /** A uniform double in [low, high). */
  Column uniform(String stream, double low, double high) {
    return lit(low).plus(uniform(stream).multiply(lit(high - low)));
  }

  /** A standard normal value by Box-Muller from two uniform streams derived from the name. */
  Column normal(String stream) {
    // 1 - u lies in (0, 1], so the logarithm is always finite.
    Column radius = sqrt(log(lit(1.0).minus(uniform(stream + "#r"))).multiply(lit(-2.0)));
    return radius.multiply(cos(uniform(stream + "#a").multiply(lit(2 * Math.PI))));
  }

  /** A normal value with the given mean and standard deviation, clamped to [low, high]. */
  Column normal(String stream, double mean, double sd, double low, double high) {
    return clamp(lit(mean).plus(normal(stream).multiply(lit(sd))), low, high);
  }

  /** A lognormal value: {@code median * exp(sigma * z)}, clamped to [low, high]. */
  Column logNormal(String stream, double median, double sigma, double low, double high) {
    return clamp(lit(median).multiply(exp(normal(stream).multiply(lit(sigma)))), low, high);
  }

  /**
   * A {@link Mixture} keyed on its own uniform stream, so the rows a column plants problems in are
   * independent of the rows of every other column.
   */
  Mixture mixture(String stream) {
    return new Mixture(uniform(stream + "#kind"));
  }

  /** Limits a value to [low, high]; the planted problems then stay the only values outside. */
  static Column clamp(Column value, double low, double high) {
    return least(greatest(value, lit(low)), lit(high));
  }
}
