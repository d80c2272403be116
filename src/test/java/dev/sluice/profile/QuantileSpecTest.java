package dev.sluice.profile;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;

import org.apache.datasketches.kll.KllSketch;
import org.junit.jupiter.api.Test;

/** Choice of the KLL k, against the rank-error function Apache DataSketches publishes. */
class QuantileSpecTest {
  @Test
  void kllKIsTheSmallestWhoseRankErrorMeetsTheSetting() {
    for (double e : new double[] {0.01, 0.001, 0.0005}) {
      int k = QuantileSpec.kllK(e);
      assertThat(KllSketch.getNormalizedRankError(k, false)).isLessThanOrEqualTo(e);
      assertThat(KllSketch.getNormalizedRankError(k - 1, false)).isGreaterThan(e);
    }
    // The DataSketches default k = 200 has a single-sided rank error of about 1.33 % (from memory
    // of the DataSketches KLL documentation).
    assertThat(QuantileSpec.kllK(0.0133)).isBetween(190, 210);
  }

  @Test
  void kllRefusesAnUnreachableRankError() {
    assertThatThrownBy(() -> QuantileSpec.kllK(1e-6)).hasMessageContaining("cannot reach");
  }
}
