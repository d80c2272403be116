package dev.sluice.treat;

import static dev.sluice.testing.Fixtures.doubles;
import static dev.sluice.testing.Fixtures.settings;
import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

import dev.sluice.Sluice;
import dev.sluice.plan.ColumnPlan;
import dev.sluice.testing.SharedSpark;
import java.util.Arrays;
import java.util.List;
import java.util.Random;
import org.apache.commons.math3.stat.descriptive.rank.Percentile;
import org.apache.commons.math3.stat.descriptive.rank.Percentile.EstimationType;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.extension.ExtendWith;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

/**
 * On tables larger than max-held-values the median that fills gaps is still the exact type 7
 * median of the values after the outlier step, found by a search aimed by a pilot sample.
 * Reference: Commons Math Percentile (R_7) of the values after the same step done by hand (D).
 */
@ExtendWith(SharedSpark.class)
class LargeTableFillTest {
  @ParameterizedTest
  @ValueSource(strings = {"cap", "set-missing"})
  void medianFillOfALargeTableMatchesTheTreatedValues(String action, SparkSession spark) {
    Random random = new Random(5);
    Double[] values = new Double[30_000];
    for (int i = 0; i < values.length; i++) {
      // Skewed door-opening durations with 3 % gaps and a few far values.
      values[i] = i % 33 == 0 ? null : i % 97 == 0 ? 500.0 + i % 7 : Math.exp(random.nextGaussian());
    }
    Sluice.Fit f = Sluice.fit(doubles(spark, "door_open_s", values),
        settings("quantiles.max-held-values=1000", "quantiles.pilot-rows=1000",
            "defaults.outliers.action=" + action), List.of());
    ColumnPlan cp = f.plan().column("door_open_s").orElseThrow();
    double lo = cp.outliers().lower();
    double hi = cp.outliers().upper();
    double[] treated = Arrays.stream(values).filter(v -> v != null)
        .mapToDouble(Double::doubleValue)
        .filter(v -> action.equals("cap") || (v >= lo && v <= hi))
        .map(v -> Math.min(hi, Math.max(lo, v))).sorted().toArray();
    double fill = cp.missing().fillNumber();
    double exact = new Percentile().withEstimationType(EstimationType.R_7).evaluate(treated, 50);
    // The plan publishes 12 significant digits.
    assertThat(fill).isCloseTo(exact, within(1e-11 * Math.abs(exact)));
    assertThat(fill).isEqualTo(dev.sluice.stats.Published.round(
        dev.sluice.stats.Quantiles.type7Of(treated, 0.5)[0]));
  }
}
