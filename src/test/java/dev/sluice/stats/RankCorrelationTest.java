package dev.sluice.stats;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;
import static org.assertj.core.api.Assertions.within;

import dev.sluice.testing.ReferenceData;
import java.math.BigDecimal;
import java.math.MathContext;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Random;
import java.util.TreeMap;
import org.apache.commons.math3.stat.correlation.PearsonsCorrelation;
import org.apache.commons.math3.stat.correlation.SpearmansCorrelation;
import org.apache.commons.math3.stat.ranking.NaturalRanking;
import org.apache.commons.math3.stat.ranking.TiesStrategy;
import org.junit.jupiter.api.Test;

/**
 * References: (S) Spearman's rho on the NIST StRD Longley data as published; (D) Commons Math 3
 * SpearmansCorrelation, or, for missing values, Commons Math PearsonsCorrelation of per-column
 * mid-ranks from Commons Math NaturalRanking (pairwiseReference), weighted rows expanded into
 * repeated rows; (D) for weights too large to expand, the definition evaluated in exact
 * java.math.BigDecimal arithmetic (exactSpearman). Random data come from fixed seeds.
 */
class RankCorrelationTest {
  private static final double NAN = Double.NaN;

  private static long[] ones(int n) {
    long[] w = new long[n];
    Arrays.fill(w, 1L);
    return w;
  }

  /** Each row repeated as often as its weight. */
  private static double[][] expand(double[][] rows, long[] weights) {
    List<double[]> out = new ArrayList<>();
    for (int i = 0; i < rows.length; i++) {
      for (long c = 0; c < weights[i]; c++) {
        out.add(rows[i]);
      }
    }
    return out.toArray(new double[0][]);
  }

  /** Small integer values (many ties) in p columns, loosely related to each other. */
  private static double[][] tiedRows(Random random, int n, int p, double missing) {
    double[][] rows = new double[n][p];
    for (double[] row : rows) {
      int base = random.nextInt(6);
      for (int j = 0; j < p; j++) {
        row[j] = random.nextDouble() < missing ? NAN : (j % 2 == 0 ? base : -base) + random.nextInt(3 + j);
      }
    }
    return rows;
  }

  /**
   * The pairwise-complete reference: each column's present values ranked by Commons Math
   * NaturalRanking (ties averaged), then Commons Math PearsonsCorrelation of those ranks over the
   * rows where both columns are present. NaN where fewer than two such rows or their ranks in
   * either column are all equal.
   */
  private static double[][] pairwiseReference(double[][] rows) {
    int n = rows.length;
    int p = rows[0].length;
    double[][] ranks = new double[p][n];
    for (int j = 0; j < p; j++) {
      List<Integer> present = new ArrayList<>();
      for (int i = 0; i < n; i++) {
        if (!Double.isNaN(rows[i][j])) {
          present.add(i);
        }
      }
      double[] values = new double[present.size()];
      for (int t = 0; t < values.length; t++) {
        values[t] = rows[present.get(t)][j];
      }
      double[] r = values.length == 0 ? values : new NaturalRanking(TiesStrategy.AVERAGE).rank(values);
      Arrays.fill(ranks[j], NAN);
      for (int t = 0; t < values.length; t++) {
        ranks[j][present.get(t)] = r[t];
      }
    }
    double[][] rho = new double[p][p];
    for (int j = 0; j < p; j++) {
      for (int k = 0; k < p; k++) {
        List<double[]> pairs = new ArrayList<>();
        for (int i = 0; i < n; i++) {
          if (!Double.isNaN(ranks[j][i]) && !Double.isNaN(ranks[k][i])) {
            pairs.add(new double[] {ranks[j][i], ranks[k][i]});
          }
        }
        double[] x = pairs.stream().mapToDouble(q -> q[0]).toArray();
        double[] y = pairs.stream().mapToDouble(q -> q[1]).toArray();
        boolean flat = Arrays.stream(x).distinct().count() < 2 || Arrays.stream(y).distinct().count() < 2;
        rho[j][k] = pairs.size() < 2 || flat ? NAN : new PearsonsCorrelation().correlation(x, y);
      }
    }
    return rho;
  }

  private static void assertMatrixClose(double[][] actual, double[][] expected, double tolerance) {
    assertThat(actual.length).isEqualTo(expected.length);
    for (int j = 0; j < expected.length; j++) {
      for (int k = 0; k < expected.length; k++) {
        if (Double.isNaN(expected[j][k])) {
          assertThat(actual[j][k]).as("rho[%d][%d]", j, k).isNaN();
        } else {
          assertThat(actual[j][k]).as("rho[%d][%d]", j, k).isCloseTo(expected[j][k], within(tolerance));
        }
      }
    }
  }

  // Spearman's rho on NIST StRD Longley (S, the values used in Apache Commons Math's own tests of
  // SpearmansCorrelation, checked there against R): y-x1 0.982352941176471, x3-x4
  // -0.3411764705882353.
  @Test
  void longleyMatchesPublishedValues() {
    double[][] rows = ReferenceData.longleyRows();
    double[][] rho = RankCorrelation.spearman(rows, ones(rows.length));
    assertThat(rho[0][1]).isCloseTo(0.982352941176471, within(1e-14));
    assertThat(rho[3][4]).isCloseTo(-0.3411764705882353, within(1e-14));
    assertThat(rho[1][0]).isEqualTo(rho[0][1]);
  }

  // (D) Commons Math SpearmansCorrelation (natural ranking, ties averaged) on seeded data with
  // many ties, unit weights.
  @Test
  void matchesCommonsMathWithTies() {
    Random random = new Random(20240611L);
    for (int trial = 0; trial < 5; trial++) {
      double[][] rows = tiedRows(random, 40 + 30 * trial, 6, 0.0);
      double[][] expected = new SpearmansCorrelation().computeCorrelationMatrix(rows).getData();
      assertMatrixClose(RankCorrelation.spearman(rows, ones(rows.length)), expected, 1e-13);
    }
  }

  // (D) Commons Math SpearmansCorrelation, and the pairwise reference below, on 13 columns: more
  // than one block of the column-wise steps and not a multiple of any block size.
  @Test
  void manyColumns() {
    Random random = new Random(1313L);
    double[][] rows = tiedRows(random, 90, 13, 0.0);
    double[][] expected = new SpearmansCorrelation().computeCorrelationMatrix(rows).getData();
    assertMatrixClose(RankCorrelation.spearman(rows, ones(rows.length)), expected, 1e-13);

    double[][] holes = tiedRows(random, 90, 13, 0.2);
    long[] weights = random.longs(holes.length, 1, 4).toArray();
    assertMatrixClose(RankCorrelation.spearman(holes, weights), pairwiseReference(expand(holes, weights)), 1e-13);
  }

  // (D) Commons Math SpearmansCorrelation on the weighted rows expanded into repeated rows.
  @Test
  void weightsCountAsRepeatedRows() {
    Random random = new Random(77L);
    for (int trial = 0; trial < 5; trial++) {
      double[][] rows = tiedRows(random, 50, 5, 0.0);
      long[] weights = random.longs(rows.length, 1, 9).toArray();
      double[][] expected = new SpearmansCorrelation().computeCorrelationMatrix(expand(rows, weights)).getData();
      assertMatrixClose(RankCorrelation.spearman(rows, weights), expected, 1e-13);
    }
  }

  // (D) Pairwise complete: Commons Math PearsonsCorrelation on the per-column mid-ranks by Commons
  // Math NaturalRanking (see pairwiseReference), weighted rows expanded into repeated rows.
  @Test
  void missingValuesArePairwiseComplete() {
    Random random = new Random(31337L);
    for (int trial = 0; trial < 8; trial++) {
      double[][] rows = tiedRows(random, 30 + 20 * trial, 5, 0.1 + 0.05 * trial);
      // A sparse column: few rows present, so that some pairs have fewer than two rows in common.
      for (double[] row : rows) {
        row[4] = random.nextDouble() < 0.9 ? NAN : row[4];
      }
      long[] weights = trial % 2 == 0 ? ones(rows.length) : random.longs(rows.length, 1, 5).toArray();
      double[][] expected = pairwiseReference(expand(rows, weights));
      assertMatrixClose(RankCorrelation.spearman(rows, weights), expected, 1e-13);
    }
  }

  // (D) As above (pairwiseReference on the expanded rows), with a total weight above 2^17, where
  // pairs with missing values are summed by a different route than below it.
  @Test
  void missingValuesWithLargeTotalWeight() {
    Random random = new Random(8086L);
    for (int trial = 0; trial < 3; trial++) {
      double[][] rows = tiedRows(random, 150, 4, 0.15);
      for (double[] row : rows) {
        row[3] = random.nextDouble() < 0.9 ? NAN : row[3];
      }
      long[] weights = random.longs(rows.length, 1, 2000).toArray();
      assertThat(Arrays.stream(weights).sum()).isGreaterThan(1L << 17);
      double[][] expected = pairwiseReference(expand(rows, weights));
      assertMatrixClose(RankCorrelation.spearman(rows, weights), expected, 1e-12);
    }
  }

  @Test
  void constantOrNearlyEmptyColumnsGiveNan() {
    double[][] rows = {
      {1, 3, 5, NAN},
      {2, 3, 4, 7},
      {3, 3, 2, NAN},
      {4, 3, 1, NAN},
    };
    double[][] rho = RankCorrelation.spearman(rows, new long[] {1, 2, 1, 1});
    // (D) Commons Math SpearmansCorrelation on the expanded columns 0 and 2: strictly decreasing.
    double[][] expanded = expand(new double[][] {{1, 5}, {2, 4}, {3, 2}, {4, 1}}, new long[] {1, 2, 1, 1});
    double expected = new SpearmansCorrelation().computeCorrelationMatrix(expanded).getEntry(0, 1);
    assertThat(rho[0][2]).isCloseTo(expected, within(1e-15));
    assertThat(rho[0][0]).isEqualTo(1.0);
    for (int j = 0; j < 4; j++) {
      assertThat(rho[1][j]).isNaN(); // constant column
      assertThat(rho[j][1]).isNaN();
      assertThat(rho[3][j]).isNaN(); // one present value (of weight 2)
      assertThat(rho[j][3]).isNaN();
    }
  }

  @Test
  void pairConstantWhereBothArePresentGivesNan() {
    // Column 0 varies, but on the rows where column 1 is present it is 1 twice.
    double[][] rows = {
      {1, 5, 1},
      {1, 6, 2},
      {2, NAN, 3},
      {3, NAN, 4},
    };
    double[][] rho = RankCorrelation.spearman(rows, ones(4));
    assertThat(rho[0][0]).isEqualTo(1.0);
    assertThat(rho[1][1]).isEqualTo(1.0);
    assertThat(rho[0][1]).isNaN();
    assertThat(rho[1][0]).isNaN();
    // (D) the pairwise reference agrees, and columns 1-2 over their two common rows give 1.
    assertMatrixClose(rho, pairwiseReference(rows), 1e-15);
    assertThat(rho[1][2]).isEqualTo(1.0);

    // The same with heavy weights: column 0 is 2 on all three rows where column 1 is present, but
    // its rank sums over them are no longer exact in double, so a variance computed by rounding
    // is not quite 0 (it gave rho = 0.0 here). Zero variance must be decided exactly.
    double[][] heavy = {{1, NAN}, {2, 1}, {2, 2}, {2, 3}};
    long[] weights = {100_000_768_535L, 568_009_992L, 542_735_601L, 645_908_755L};
    assertThat(RankCorrelation.spearman(heavy, weights)[0][1]).isNaN();
  }

  // Two rows: the ranks are (1, 2) against (1, 2) or (2, 1), so rho is exactly +1 or -1.
  @Test
  void twoRowsGivePlusOrMinusOne() {
    double[][] rows = {{1, 5, 10, NAN}, {2, 3, 20, 4}};
    double[][] rho = RankCorrelation.spearman(rows, ones(2));
    assertThat(rho[0][1]).isEqualTo(-1.0);
    assertThat(rho[0][2]).isEqualTo(1.0);
    assertThat(rho[1][2]).isEqualTo(-1.0);
    assertThat(rho[3][3]).isNaN();
    assertThat(rho[0][3]).isNaN();
    assertThat(RankCorrelation.spearman(new double[][] {{1, 2}}, ones(1))[0][1]).isNaN();
    assertThat(RankCorrelation.spearman(2, new double[0][], new long[0])[0][0]).isNaN();
  }

  // Over two rows rho is exactly +1 or -1, but in these two cases (the two rows column 0 shares
  // with columns 1 and 2 weigh 536 and 274 in the first, total weight up to 2^17; 32880 and
  // 75385 in the second, total above 2^17) the rounded sums give 1 + 2^-52 and -1 - 2^-52 before
  // the clamp (found by a search with the clamp removed; this test then fails).
  @Test
  void clampsToPlusMinusOne() {
    double[][] rows = {{0, 0, 0}, {1, NAN, NAN}, {2, NAN, NAN}, {3, -9, 3}};
    double[][] rho = RankCorrelation.spearman(rows, new long[] {536, 760, 658, 274});
    assertThat(rho[0][1]).isEqualTo(-1.0);
    assertThat(rho[0][2]).isEqualTo(1.0);
    assertThat(rho[1][2]).isEqualTo(-1.0);

    double[][] six = {{0, 0, 0}, {1, NAN, NAN}, {2, NAN, NAN}, {3, -9, 3}, {4, NAN, NAN}, {5, NAN, NAN}};
    rho = RankCorrelation.spearman(six, new long[] {32880, 78828, 74745, 75385, 47061, 71925});
    assertThat(rho[0][1]).isEqualTo(-1.0);
    assertThat(rho[0][2]).isEqualTo(1.0);
  }

  // Equal rank vectors give exactly 1 and reversed ones exactly -1 (the sums of squares and of
  // cross products are then the same sums), with or without missing values, whatever the weights.
  @Test
  void equalOrReversedRanksGiveExactlyPlusMinusOne() {
    Random random = new Random(5L);
    int checked = 0;
    for (int trial = 0; trial < 200; trial++) {
      int n = 3 + random.nextInt(60);
      double missing = trial % 2 == 0 ? 0.0 : 0.2;
      double[][] rows = new double[n][];
      for (int i = 0; i < n; i++) {
        double x = random.nextInt(1000) / 7.0;
        rows[i] = random.nextDouble() < missing
            ? new double[] {NAN, NAN, NAN, random.nextDouble()}
            : new double[] {x, Math.exp(x / 100), -x, random.nextDouble()};
      }
      long[] weights = random.longs(n, 1, 1_000_000_000L).toArray();
      double[][] rho = RankCorrelation.spearman(rows, weights);
      if (Double.isNaN(rho[0][0])) {
        continue;
      }
      checked++;
      assertThat(rho[0][1]).as("trial %d", trial).isEqualTo(1.0);
      assertThat(rho[0][2]).as("trial %d", trial).isEqualTo(-1.0);
      assertThat(rho[1][2]).as("trial %d", trial).isEqualTo(-1.0);
      for (double[] line : rho) {
        for (double r : line) {
          assertThat(Double.isNaN(r) || (r >= -1.0 && r <= 1.0)).isTrue();
        }
      }
    }
    assertThat(checked).isGreaterThan(150);
  }

  /**
   * Spearman's rho of columns j, k by the definition in exact decimal arithmetic
   * (java.math.BigDecimal): weighted mid-ranks W + (g + 1) / 2 per column, then the weighted
   * Pearson correlation over the rows present in both, as
   * (S_w S_ab - S_a S_b) / sqrt((S_w S_aa - S_a^2)(S_w S_bb - S_b^2)), every sum exact; only the
   * final square root and division round (to 34 digits).
   */
  private static double exactSpearman(double[][] rows, long[] weights, int j, int k) {
    BigDecimal[][] rank = new BigDecimal[2][rows.length];
    int[] cols = {j, k};
    for (int c = 0; c < 2; c++) {
      TreeMap<Double, Long> groups = new TreeMap<>();
      for (int i = 0; i < rows.length; i++) {
        if (!Double.isNaN(rows[i][cols[c]])) {
          groups.merge(rows[i][cols[c]], weights[i], Long::sum);
        }
      }
      TreeMap<Double, BigDecimal> midRank = new TreeMap<>();
      BigDecimal before = BigDecimal.ZERO;
      for (var group : groups.entrySet()) {
        BigDecimal g = BigDecimal.valueOf(group.getValue());
        midRank.put(group.getKey(), before.add(g.add(BigDecimal.ONE).divide(BigDecimal.valueOf(2))));
        before = before.add(g);
      }
      for (int i = 0; i < rows.length; i++) {
        rank[c][i] = midRank.get(rows[i][cols[c]]);
      }
    }
    BigDecimal sw = BigDecimal.ZERO, sa = BigDecimal.ZERO, sb = BigDecimal.ZERO;
    BigDecimal sab = BigDecimal.ZERO, saa = BigDecimal.ZERO, sbb = BigDecimal.ZERO;
    for (int i = 0; i < rows.length; i++) {
      if (rank[0][i] != null && rank[1][i] != null) {
        BigDecimal w = BigDecimal.valueOf(weights[i]);
        sw = sw.add(w);
        sa = sa.add(w.multiply(rank[0][i]));
        sb = sb.add(w.multiply(rank[1][i]));
        sab = sab.add(w.multiply(rank[0][i]).multiply(rank[1][i]));
        saa = saa.add(w.multiply(rank[0][i]).multiply(rank[0][i]));
        sbb = sbb.add(w.multiply(rank[1][i]).multiply(rank[1][i]));
      }
    }
    BigDecimal cov = sw.multiply(sab).subtract(sa.multiply(sb));
    BigDecimal va = sw.multiply(saa).subtract(sa.multiply(sa));
    BigDecimal vb = sw.multiply(sbb).subtract(sb.multiply(sb));
    MathContext mc = MathContext.DECIMAL128;
    return cov.divide(va.multiply(vb).sqrt(mc), mc).doubleValue();
  }

  // (D) by the definition in exact BigDecimal arithmetic (exactSpearman), with weights of about
  // 10^11 each and 10^12 in total: ranks near 10^12 whose halves and small differences matter.
  @Test
  void hugeWeightsKeepRanksExact() {
    Random random = new Random(1234L);
    for (int trial = 0; trial < 10; trial++) {
      int n = 12;
      double[][] rows = new double[n][];
      long[] weights = new long[n];
      for (int i = 0; i < n; i++) {
        rows[i] = new double[] {random.nextInt(5), random.nextInt(6), random.nextDouble() < 0.3 ? NAN : random.nextInt(4)};
        weights[i] = 80_000_000_000L + random.nextInt(3);
      }
      weights[trial] = 1 + random.nextInt(3); // one light row among heavy ones
      double[][] rho = RankCorrelation.spearman(rows, weights);
      for (int j = 0; j < 3; j++) {
        for (int k = j + 1; k < 3; k++) {
          assertThat(rho[j][k]).as("trial %d, %d-%d", trial, j, k).isCloseTo(exactSpearman(rows, weights, j, k), within(1e-13));
        }
      }
    }
  }

  // -0.0 and 0.0 are one value: (D) Commons Math SpearmansCorrelation with every -0.0 written 0.0.
  @Test
  void negativeZeroTiesWithZero() {
    double[][] rows = {{-0.0, 1}, {0.0, 2}, {1, 3}, {-1, 4}, {0.0, 5}};
    double[][] plain = {{0.0, 1}, {0.0, 2}, {1, 3}, {-1, 4}, {0.0, 5}};
    double expected = new SpearmansCorrelation().computeCorrelationMatrix(plain).getEntry(0, 1);
    assertThat(RankCorrelation.spearman(rows, ones(5))[0][1]).isCloseTo(expected, within(1e-15));
  }

  @Test
  void rejectsBadArguments() {
    assertThatThrownBy(() -> RankCorrelation.spearman(new double[][] {{1, Double.POSITIVE_INFINITY}, {2, 3}}, ones(2)))
        .isInstanceOf(IllegalArgumentException.class).hasMessageContaining("Infinity").hasMessageContaining("row 0, column 1");
    assertThatThrownBy(() -> RankCorrelation.spearman(new double[][] {{1, 2}, {2, 3}}, new long[] {1, 0}))
        .isInstanceOf(IllegalArgumentException.class).hasMessageContaining("row 1 by 0");
    assertThatThrownBy(() -> RankCorrelation.spearman(new double[][] {{1, 2}, {2, 3}}, ones(3)))
        .isInstanceOf(IllegalArgumentException.class).hasMessageContaining("2 rows with 3 weights");
    assertThatThrownBy(() -> RankCorrelation.spearman(new double[][] {{1, 2}, {2}}, ones(2)))
        .isInstanceOf(IllegalArgumentException.class).hasMessageContaining("row 1 of 1 values");
    assertThatThrownBy(() -> RankCorrelation.spearman(new double[0][], new long[0]))
        .isInstanceOf(IllegalArgumentException.class).hasMessageContaining("number of columns");
    assertThatThrownBy(() -> RankCorrelation.spearman(new double[][] {{1}, {2}}, new long[] {1L << 51, (1L << 51) + 1}))
        .isInstanceOf(IllegalArgumentException.class).hasMessageContaining("2^52");
  }
}
