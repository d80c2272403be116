package dev.sluice.stats;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;
import static org.assertj.core.api.Assertions.within;

import org.junit.jupiter.api.Test;

class ScalingTest {
  // NIST StRD NumAcc2: values 1.1, 1.2, 1.3; certified mean 1.2 and s 0.1 (exact); every quantile
  // type gives median 1.2 and IQR 1.3 - 1.1 = 0.2 (REFERENCES.md, D).
  private static final double[] NUMACC2_VALUES = {1.1, 1.2, 1.3};

  @Test
  void minMaxMapsNumAcc2OntoTheUnitInterval() {
    Scaling s = Scaling.minMax(1.1, 1.3);
    assertThat(s.zeroSpread()).isFalse();
    assertThat(s.apply(1.1)).isCloseTo(0.0, within(1e-12));
    assertThat(s.apply(1.2)).isCloseTo(0.5, within(1e-12));
    assertThat(s.apply(1.3)).isCloseTo(1.0, within(1e-12));
  }

  @Test
  void robustScalingOfNumAcc2() {
    Scaling s = Scaling.robust(1.2, 0.2);
    double[] expected = {-0.5, 0.0, 0.5};
    for (int i = 0; i < NUMACC2_VALUES.length; i++) {
      assertThat(s.apply(NUMACC2_VALUES[i])).isCloseTo(expected[i], within(1e-12));
    }
  }

  @Test
  void standardScalingOfNumAcc2() {
    Scaling s = Scaling.standard(1.2, 0.1);
    assertThat(s.apply(1.1)).isCloseTo(-1.0, within(1e-12));
    assertThat(s.apply(1.3)).isCloseTo(1.0, within(1e-12));
  }

  @Test
  void maxAbsUsesTheLargerMagnitude() {
    assertThat(Scaling.maxAbs(-4.0, 2.0)).isEqualTo(new Scaling(0.0, 4.0, false));
    assertThat(Scaling.maxAbs(1.0, 5.0).apply(-5.0)).isEqualTo(-1.0);
  }

  /** Policy: zero, NaN or infinite spread gives scale 1 and the zero-spread flag. */
  @Test
  void degenerateSpreadGivesUnitScale() {
    assertThat(Scaling.standard(3.0, 0.0)).isEqualTo(new Scaling(3.0, 1.0, true));
    assertThat(Scaling.standard(3.0, Double.NaN)).isEqualTo(new Scaling(3.0, 1.0, true));
    assertThat(Scaling.minMax(3.0, 3.0)).isEqualTo(new Scaling(3.0, 1.0, true));
    assertThat(Scaling.robust(3.0, Double.POSITIVE_INFINITY)).isEqualTo(new Scaling(3.0, 1.0, true));
    assertThat(Scaling.maxAbs(0.0, 0.0)).isEqualTo(new Scaling(0.0, 1.0, true));
    assertThat(Scaling.minMax(3.0, 3.0).apply(3.0)).isZero();
  }

  @Test
  void identityChangesNothing() {
    assertThat(Scaling.IDENTITY.apply(-12.5)).isEqualTo(-12.5);
  }

  @Test
  void rejectsUnfittedStatistics() {
    assertThatThrownBy(() -> Scaling.standard(Double.NaN, 1.0)).isInstanceOf(IllegalArgumentException.class)
        .hasMessage("Cannot scale around a centre of NaN");
    assertThatThrownBy(() -> Scaling.robust(0.0, -1.0)).isInstanceOf(IllegalArgumentException.class)
        .hasMessage("Cannot scale by a negative spread -1.0");
    assertThatThrownBy(() -> Scaling.minMax(2.0, 1.0)).isInstanceOf(IllegalArgumentException.class);
    assertThatThrownBy(() -> new Scaling(0.0, 0.0, false)).isInstanceOf(IllegalArgumentException.class);
  }
}
