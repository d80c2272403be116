package dev.sluice.profile;

import static org.apache.spark.sql.functions.lit;
import static org.apache.spark.sql.functions.when;

import dev.sluice.io.Names;
import java.util.OptionalDouble;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.functions;

/**
 * The Catalyst expressions that every pass shares, so that the profile, the treated statistics and
 * the writing pass agree on which values are usable.
 *
 * <p>NaN policy: NaN and +/-Infinity are never used in a statistic. They are counted apart and
 * treated as missing, like a value outside the validity bounds.
 */
public final class ValueExprs {
  private ValueExprs() {}

  /** The column as DOUBLE. */
  public static Column asDouble(String name) {
    return Names.col(name).cast("double");
  }

  public static Column isNan(Column x) {
    return functions.isnan(x);
  }

  public static Column isInfinite(Column x) {
    return x.equalTo(lit(Double.POSITIVE_INFINITY)).or(x.equalTo(lit(Double.NEGATIVE_INFINITY)));
  }

  /**
   * True where x is neither null, NaN nor infinite: two comparisons, because Spark orders NaN
   * above every other double, so {@code NaN <= MAX_VALUE} is false, as is an infinity's test.
   */
  public static Column isFinite(Column x) {
    return within(x, OptionalDouble.empty(), OptionalDouble.empty());
  }

  /** True where x is finite and within the bounds (null where x is null). */
  public static Column within(Column x, OptionalDouble min, OptionalDouble max) {
    return x.geq(lit(min.orElse(-Double.MAX_VALUE))).and(x.leq(lit(max.orElse(Double.MAX_VALUE))));
  }

  /** True where a finite x lies outside the validity bounds; false where there are none. */
  public static Column outsideBounds(Column x, OptionalDouble min, OptionalDouble max) {
    Column out = lit(false);
    if (min.isPresent()) {
      out = out.or(x.lt(lit(min.getAsDouble())));
    }
    if (max.isPresent()) {
      out = out.or(x.gt(lit(max.getAsDouble())));
    }
    return out;
  }

  /** x where it is finite and within bounds, else null: the values statistics are taken from. */
  public static Column usable(Column x, OptionalDouble min, OptionalDouble max) {
    return when(within(x, min, max), x);
  }
}
