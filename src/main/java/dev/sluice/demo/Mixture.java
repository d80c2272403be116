package dev.sluice.demo;

import static org.apache.spark.sql.functions.lit;
import static org.apache.spark.sql.functions.when;

import org.apache.spark.sql.Column;

/**
 * Builds one column as a mixture of mutually exclusive kinds of row: missing, one or more planted
 * problems, and the ordinary values.
 *
 * <p>A single uniform draw per row is cut into consecutive bands, so a kind declared with rate
 * {@code p} covers exactly the rows whose draw falls in its band of width {@code p}. The rates are
 * thus exact probabilities per row, the kinds never overlap, and adding a kind does not move the
 * rows of the kinds declared before it.
 *
 * <pre>
 * draws.mixture("air").missing(0.02).plant(0.003, glitch).otherwise(ordinary)
 * </pre>
 */
final class Mixture {
  private final Column draw;
  private double upper;
  private Column chain;

  /** @param draw a uniform [0, 1) draw per row, used only by this mixture */
  Mixture(Column draw) {
    this.draw = draw;
  }

  /** The next {@code rate} of rows are null. */
  Mixture missing(double rate) {
    return plant(rate, lit(null));
  }

  /** The next {@code rate} of rows take {@code value} instead of the ordinary value. */
  Mixture plant(double rate, Column value) {
    if (rate < 0 || upper + rate > 1) {
      throw new IllegalArgumentException("rates must be non-negative and sum to at most 1");
    }
    upper += rate;
    Column inBand = draw.lt(lit(upper));
    chain = chain == null ? when(inBand, value) : chain.when(inBand, value);
    return this;
  }

  /** Completes the column: every remaining row takes {@code ordinary}. */
  Column otherwise(Column ordinary) {
    return chain == null ? ordinary : chain.otherwise(ordinary);
  }
}
