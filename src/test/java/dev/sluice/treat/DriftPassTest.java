package dev.sluice.treat;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

import java.util.List;
import org.junit.jupiter.api.Test;

/** The drift index and the bin shares it is taken over, on worked examples. */
class DriftPassTest {
  @Test
  void psiOfAWorkedExample() {
    // Fit shares 0.25 each, now 0.1, 0.2, 0.3, 0.4 (worked by hand):
    // 0.15 ln 2.5 + 0.05 ln 1.25 + 0.05 ln 1.2 + 0.15 ln 1.6 = 0.13744 + 0.01116 + 0.00912 + 0.07050 = 0.22822.
    assertThat(DriftPass.psi(List.of(0.25, 0.25, 0.25, 0.25), new double[] {0.1, 0.2, 0.3, 0.4}))
        .isCloseTo(0.2282174, within(1e-6));
    assertThat(DriftPass.psi(List.of(0.25, 0.25, 0.25, 0.25), new double[] {0.25, 0.25, 0.25, 0.25})).isZero();
    // An empty bin counts as 0.0001 (common practice), so the index stays finite.
    double empty = DriftPass.psi(List.of(0.25, 0.25, 0.25, 0.25), new double[] {0.0, 0.25, 0.25, 0.5});
    assertThat(empty).isFinite().isCloseTo((0.0001 - 0.25) * Math.log(0.0001 / 0.25) + 0.25 * Math.log(2), within(1e-12));
  }

  @Test
  void binSharesFromCountsBelowEachEdge() {
    // 100 usable values, 20 below Q1, 45 below the median, 80 below Q3 (by hand: 20, 25, 35, 20 %).
    assertThat(DriftPass.shares(new long[] {20, 45, 80}, 100)).containsExactly(0.2, 0.25, 0.35, 0.2);
  }
}
