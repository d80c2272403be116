package dev.sluice.stats;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;
import static org.assertj.core.api.Assertions.within;

import dev.sluice.stats.Collinearity.Dependence;
import dev.sluice.stats.Collinearity.Pair;
import dev.sluice.stats.Collinearity.VifResult;
import java.util.Arrays;
import java.util.List;
import java.util.Random;
import org.apache.commons.math3.stat.correlation.PearsonsCorrelation;
import org.junit.jupiter.api.Test;

class CollinearityTest {
  private static final double NAN = Double.NaN;
  private static final List<String> FIVE = List.of("a", "b", "c", "d", "e");

  /** Columns a, b = 2.2046 a, c, d = a + c, e; a, c, e independent Gaussian. */
  private static double[][] dependentRows() {
    Random random = new Random(31L);
    double[][] rows = new double[50][];
    for (int i = 0; i < rows.length; i++) {
      double a = random.nextGaussian();
      double c = random.nextGaussian();
      rows[i] = new double[] {a, 2.2046 * a, c, a + c, random.nextGaussian()};
    }
    return rows;
  }

  private static double[][] correlationOf(double[][] rows) {
    return new PearsonsCorrelation(rows).getCorrelationMatrix().getData();
  }

  // Exact dependences built into the data; the finite VIFs are checked against Commons Math OLS
  // 1 / (1 - R^2) over the independent columns a, c, e.
  @Test
  void namesExactDependencesAndKeepsTheRest() {
    double[][] rows = dependentRows();
    VifResult result = Collinearity.vif(FIVE, correlationOf(rows));

    assertThat(result.singular()).isTrue();
    assertThat(result.dependences())
        .containsExactly(new Dependence("b", List.of("a")), new Dependence("d", List.of("a", "c")));
    double[] vif = result.vif();
    assertThat(vif[1]).isEqualTo(Double.POSITIVE_INFINITY);
    assertThat(vif[3]).isEqualTo(Double.POSITIVE_INFINITY);
    List<Integer> independent = List.of(0, 2, 4);
    for (int j : independent) {
      double expected = LongleyTest.olsVif(rows, j, independent);
      assertThat(vif[j]).as(FIVE.get(j)).isCloseTo(expected, within(1e-10 * expected));
    }
  }

  // Documented greedy rule: both dependent columns have VIF +Infinity, the later (d) goes first;
  // then b; a, c, e are independent draws with VIF near 1.
  @Test
  void suggestDropsTakesTheLaterOfTiedInfinities() {
    assertThat(Collinearity.suggestDrops(FIVE, correlationOf(dependentRows()), 10.0)).containsExactly("d", "b");
  }

  // By definition VIF = 1 / (1 - r^2) for two columns: r = 0.8 gives 1 / 0.36.
  @Test
  void twoColumnsGiveOneOverOneMinusRSquared() {
    double[] vif = Collinearity.vif(List.of("u", "v"), new double[][] {{1, 0.8}, {0.8, 1}}).vif();
    assertThat(vif).containsExactly(new double[] {1 / 0.36, 1 / 0.36}, within(1e-12));
  }

  @Test
  void zeroVarianceColumnIsLeftOut() {
    double[][] rows = dependentRows();
    CoMoments moments = new CoMoments(new double[5]);
    for (double[] row : rows) {
      moments.add(new double[] {row[0], row[2], 4.0, row[4], row[3] + 0.1 * row[4]});
    }
    double[][] r = moments.correlation(new double[5]);
    double[] vif = Collinearity.vif(FIVE, r).vif();

    assertThat(vif[2]).isNaN();
    double[][] without = Arrays.stream(rows)
        .map(row -> new double[] {row[0], row[2], row[4], row[3] + 0.1 * row[4]}).toArray(double[][]::new);
    List<Integer> all = List.of(0, 1, 2, 3);
    int[] positions = {0, 1, 3, 4};
    for (int i = 0; i < 4; i++) {
      double expected = LongleyTest.olsVif(without, i, all);
      assertThat(vif[positions[i]]).isCloseTo(expected, within(1e-9 * expected));
    }
  }

  // Policy: a NaN between two columns leaves both out; the one left has VIF 1 by definition.
  @Test
  void nanCorrelationLeavesBothColumnsOut() {
    double[][] r = {{1, 0.5, NAN}, {0.5, 1, 0.2}, {NAN, 0.2, 1}};
    VifResult result = Collinearity.vif(List.of("p", "q", "s"), r);
    assertThat(result.vif()[0]).isNaN();
    assertThat(result.vif()[1]).isEqualTo(1.0);
    assertThat(result.vif()[2]).isNaN();
    assertThat(Collinearity.suggestDrops(List.of("p", "q", "s"), r, 1.0)).isEmpty();
  }

  @Test
  void noColumnsGiveAnEmptyResult() {
    VifResult result = Collinearity.vif(List.of(), new double[0][0]);
    assertThat(result.vif()).isEmpty();
    assertThat(result.singular()).isFalse();
  }

  // Hand-built matrix: |r| >= 0.85 holds for a-c (0.95), a-b (0.9), b-d (0.9) and c-d (0.85);
  // a-b precedes b-d on the tie by column order; NaN b-c never qualifies.
  @Test
  void strongPairsStrongestFirstTiesInColumnOrder() {
    double[][] r = {
      {1.0, 0.9, -0.95, 0.5},
      {0.9, 1.0, NAN, -0.9},
      {-0.95, NAN, 1.0, 0.85},
      {0.5, -0.9, 0.85, 1.0}
    };
    assertThat(Collinearity.strongPairs(List.of("a", "b", "c", "d"), r, 0.85)).containsExactly(
        new Pair("a", "c", -0.95), new Pair("a", "b", 0.9), new Pair("b", "d", -0.9), new Pair("c", "d", 0.85));
    assertThat(Collinearity.strongPairs(List.of("a", "b", "c", "d"), r, 0.99)).isEmpty();
  }

  @Test
  void rejectsMismatchedShapesAndBadLimits() {
    assertThatThrownBy(() -> Collinearity.vif(List.of("a", "b"), new double[][] {{1}}))
        .isInstanceOf(IllegalArgumentException.class).hasMessage("Need a 2 x 2 correlation matrix for [a, b]");
    assertThatThrownBy(() -> Collinearity.suggestDrops(List.of("a"), new double[][] {{1}}, 0.5))
        .isInstanceOf(IllegalArgumentException.class);
    assertThatThrownBy(() -> Collinearity.strongPairs(List.of("a"), new double[][] {{1}}, NAN))
        .isInstanceOf(IllegalArgumentException.class);
  }
}
