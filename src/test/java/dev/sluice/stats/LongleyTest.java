package dev.sluice.stats;

import dev.sluice.testing.ReferenceData;
import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.within;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import org.apache.commons.math3.stat.correlation.PearsonsCorrelation;
import org.apache.commons.math3.stat.regression.OLSMultipleLinearRegression;
import org.junit.jupiter.api.Test;

/** Checks on the NIST StRD Longley data (src/test/resources/reference/longley.csv). */
class LongleyTest {
  private static final double[][] ROWS = ReferenceData.longleyRows();
  private static final List<String> PREDICTORS = List.of("x1", "x2", "x3", "x4", "x5", "x6");

  /** The predictor columns x1..x6 as rows. */
  private static double[][] predictors() {
    return Arrays.stream(ROWS).map(r -> Arrays.copyOfRange(r, 1, 7)).toArray(double[][]::new);
  }

  private static double[][] predictorCorrelation() {
    return new PearsonsCorrelation(predictors()).getCorrelationMatrix().getData();
  }

  /**
   * VIF of predictor {@code target} among {@code among} as 1 / (1 - R^2) of its regression on the
   * others, by Commons Math OLS (with intercept). One predictor alone has VIF 1.
   */
  static double olsVif(double[][] x, int target, List<Integer> among) {
    List<Integer> others = new ArrayList<>(among);
    others.remove(Integer.valueOf(target));
    if (others.isEmpty()) {
      return 1.0;
    }
    double[][] design = Arrays.stream(x).map(r -> others.stream().mapToDouble(i -> r[i]).toArray())
        .toArray(double[][]::new);
    OLSMultipleLinearRegression ols = new OLSMultipleLinearRegression();
    ols.newSampleData(ReferenceData.column(x, target), design);
    return 1.0 / (1.0 - ols.calculateRSquared());
  }

  // NIST StRD Longley certified values (S): B1 15.0618722713733, B6 1829.15146461355,
  // R^2 0.995479004577296. Refitting them with Commons Math OLS checks the hand transcription.
  @Test
  void dataFileReproducesNistCertifiedRegression() {
    assertThat(ROWS).hasNumberOfRows(16);
    OLSMultipleLinearRegression ols = new OLSMultipleLinearRegression();
    ols.newSampleData(ReferenceData.column(ROWS, 0), predictors());
    double[] beta = ols.estimateRegressionParameters();
    assertThat(beta[1]).isCloseTo(15.0618722713733, within(1e-8));
    assertThat(beta[6]).isCloseTo(1829.15146461355, within(1e-7));
    assertThat(ols.calculateRSquared()).isCloseTo(0.995479004577296, within(1e-12));
  }

  // Pearson on Longley (REFERENCES.md S, as in Commons Math's tests, checked against R):
  // y-x1 0.970898525061056, x3-x4 -0.1774206295018783; here from co-moments centred on row one.
  @Test
  void coMomentsGivePublishedPearsonCorrelations() {
    CoMoments moments = new CoMoments(ROWS[0]);
    Arrays.stream(ROWS).forEach(moments::add);
    double[][] r = moments.correlation(new double[7]);
    assertThat(r[0][1]).isCloseTo(0.970898525061056, within(1e-14));
    assertThat(r[3][4]).isCloseTo(-0.1774206295018783, within(1e-14));
  }

  // Published VIF of the six Longley predictors (REFERENCES.md S, 2-3 decimals): 135.53, 1788.51,
  // 33.619, 3.589, 399.15, 758.98; tolerance half a unit of the last printed digit.
  @Test
  void vifMatchesPublishedValues() {
    Collinearity.VifResult result = Collinearity.vif(PREDICTORS, predictorCorrelation());
    assertThat(result.singular()).isFalse();
    assertThat(result.columns()).isEqualTo(PREDICTORS);
    double[] vif = result.vif();
    assertThat(vif[0]).isCloseTo(135.53, within(0.005));
    assertThat(vif[1]).isCloseTo(1788.51, within(0.005));
    assertThat(vif[2]).isCloseTo(33.619, within(0.0005));
    assertThat(vif[3]).isCloseTo(3.589, within(0.0005));
    assertThat(vif[4]).isCloseTo(399.15, within(0.005));
    assertThat(vif[5]).isCloseTo(758.98, within(0.005));
  }

  // Reference: Commons Math OLSMultipleLinearRegression, 1 / (1 - R^2) per predictor. The
  // ill-conditioning (largest VIF 1788) costs a few digits on each side, hence 1e-9 relative.
  @Test
  void vifMatchesOlsPerPredictor() {
    double[] vif = Collinearity.vif(PREDICTORS, predictorCorrelation()).vif();
    List<Integer> all = List.of(0, 1, 2, 3, 4, 5);
    for (int j = 0; j < 6; j++) {
      double expected = olsVif(predictors(), j, all);
      assertThat(vif[j]).as(PREDICTORS.get(j)).isCloseTo(expected, within(1e-9 * expected));
    }
  }

  // The expected drop order comes from running the documented greedy rule (highest VIF, later
  // column on ties, until all are at most 10) on OLS-derived VIFs.
  @Test
  void suggestDropsFollowsTheGreedyRuleOnOlsVifs() {
    double[][] x = predictors();
    List<Integer> kept = new ArrayList<>(List.of(0, 1, 2, 3, 4, 5));
    List<String> expected = new ArrayList<>();
    while (true) {
      int worst = -1;
      double worstVif = Double.NEGATIVE_INFINITY;
      for (int j : kept) {
        double v = olsVif(x, j, kept);
        if (v >= worstVif) {
          worst = j;
          worstVif = v;
        }
      }
      if (worstVif <= 10.0) {
        break;
      }
      expected.add(PREDICTORS.get(worst));
      kept.remove(Integer.valueOf(worst));
    }
    assertThat(expected).isNotEmpty();
    assertThat(Collinearity.suggestDrops(PREDICTORS, predictorCorrelation(), 10.0)).isEqualTo(expected);
  }
}
