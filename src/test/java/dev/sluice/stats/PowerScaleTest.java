package dev.sluice.stats;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;
import static org.assertj.core.api.Assertions.within;

import java.math.BigDecimal;
import java.math.MathContext;
import org.apache.commons.math3.stat.correlation.PearsonsCorrelation;
import org.junit.jupiter.api.Test;

/**
 * Very large magnitudes. References: exact arithmetic with java.math.BigDecimal, and Commons Math
 * 3 PearsonsCorrelation on the same data divided by 1e300 (correlation does not depend on scale).
 */
class PowerScaleTest {
  private static final MathContext MC = MathContext.DECIMAL128;

  @Test
  void ordinaryMagnitudesAreNotScaled() {
    assertThat(PowerScale.forMagnitude(1e150)).isEqualTo(1.0);
    assertThat(PowerScale.forMagnitude(0.0)).isEqualTo(1.0);
    assertThat(PowerScale.forMagnitude(Double.NaN)).isEqualTo(1.0);
    assertThat(PowerScale.forMagnitude(Double.POSITIVE_INFINITY)).isEqualTo(1.0);
  }

  @Test
  void largeMagnitudesAreBroughtNearOneByAnExactPowerOfTwo() {
    double f = PowerScale.forMagnitude(Double.MAX_VALUE);
    assertThat(f).isEqualTo(Math.scalb(1.0, -1023));
    assertThat(Double.MAX_VALUE * f).isBetween(1.0, 2.0);
    assertThat(Double.MAX_VALUE * f / f).isEqualTo(Double.MAX_VALUE);
  }

  @Test
  void filledMomentsOfHugeValuesMatchExactArithmetic() {
    // Four values near the top of the double range plus two gaps filled with 1.0e308.
    double[] x = {1.7e308, 1.6e308, 1.2e308, 1.5e308};
    double[] all = {1.7e308, 1.6e308, 1.2e308, 1.5e308, 1.0e308, 1.0e308};
    ScaledMoments before = new ScaledMoments();
    for (double v : x) {
      before.add(v);
    }
    FilledMoments m = FilledMoments.of(x.length, before.mean(), before.stddev(),
        1.2e308, 1.7e308, 1.0e308, 2);
    assertThat(m.count()).isEqualTo(6);
    assertThat(m.mean()).isCloseTo(exactMean(all), within(1e-12 * 1.0e308));
    assertThat(m.stddev()).isCloseTo(exactSd(all), within(1e-12 * exactSd(all)));
    assertThat(m.min()).isEqualTo(1.0e308);
    assertThat(m.max()).isEqualTo(1.7e308);
  }

  @Test
  void scaledCoMomentsGiveTheSameCorrelationAndTheCovarianceInOwnUnits() {
    double[][] rows = {{1.7e308, 1.0e307}, {1.1e308, 3.0e307}, {-0.4e308, 2.0e307}, {0.9e308, 6.0e307}};
    double[] f = {PowerScale.forMagnitude(1.7e308), PowerScale.forMagnitude(6.0e307)};
    CoMoments m = new CoMoments(new double[] {1.0e308, 2.5e307}, f);
    double[][] small = new double[rows.length][];
    for (int i = 0; i < rows.length; i++) {
      m.add(rows[i]);
      small[i] = new double[] {rows[i][0] / 1e300, rows[i][1] / 1e300};
    }
    double[] none = {Double.NaN, Double.NaN};
    double r = new PearsonsCorrelation().correlation(column(small, 0), column(small, 1));
    assertThat(m.correlation(none)[0][1]).isCloseTo(r, within(1e-12));
    double[][] cov = m.covariance(none);
    assertThat(cov[1][1]).isCloseTo(exactSd(column(rows, 1)) * exactSd(column(rows, 1)),
        within(1e-12 * cov[1][1]));
    assertThat(Double.isInfinite(cov[0][0])).as("a variance beyond the double range").isTrue();
  }

  @Test
  void scalesMustBePowersOfTwo() {
    assertThatThrownBy(() -> new CoMoments(new double[] {0.0}, new double[] {0.3}))
        .hasMessageContaining("power of two");
  }

  private static double[] column(double[][] rows, int j) {
    double[] out = new double[rows.length];
    for (int i = 0; i < rows.length; i++) {
      out[i] = rows[i][j];
    }
    return out;
  }

  private static double exactMean(double[] x) {
    BigDecimal sum = BigDecimal.ZERO;
    for (double v : x) {
      sum = sum.add(new BigDecimal(v));
    }
    return sum.divide(BigDecimal.valueOf(x.length), MC).doubleValue();
  }

  private static double exactSd(double[] x) {
    BigDecimal mean = new BigDecimal(exactMean(x));
    BigDecimal ss = BigDecimal.ZERO;
    for (double v : x) {
      BigDecimal d = new BigDecimal(v).subtract(mean);
      ss = ss.add(d.multiply(d));
    }
    return ss.divide(BigDecimal.valueOf(x.length - 1), MC).sqrt(MC).doubleValue();
  }
}
