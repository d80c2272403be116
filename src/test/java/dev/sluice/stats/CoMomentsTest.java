package dev.sluice.stats;

import dev.sluice.testing.ReferenceData;
import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;
import static org.assertj.core.api.Assertions.within;

import java.io.ByteArrayInputStream;
import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.ObjectInputStream;
import java.io.ObjectOutputStream;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Random;
import java.util.stream.Stream;
import org.apache.commons.math3.stat.correlation.Covariance;
import org.apache.commons.math3.stat.correlation.PearsonsCorrelation;
import org.apache.commons.math3.stat.descriptive.moment.Variance;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.Arguments;
import org.junit.jupiter.params.provider.MethodSource;

/**
 * References: Commons Math 3 Covariance and PearsonsCorrelation on the generated data after the
 * missing entries were filled in by hand (or, for pairwise complete, on the rows where a pair is
 * present).
 */
class CoMomentsTest {
  private static final double NAN = Double.NaN;
  private static final int ROWS = 300;
  private static final int P = 4;

  /** Correlated columns of differing scales around an offset of 1000; about 15 % missing in 0-2. */
  static double[][] generated(long seed) {
    Random random = new Random(seed);
    double[][] rows = new double[ROWS][];
    for (int i = 0; i < ROWS; i++) {
      double a = random.nextGaussian();
      double b = 0.6 * a + 0.8 * random.nextGaussian();
      double[] row = {1000 + 3 * a, 1000 + 0.5 * b, -1000 + 20 * (a - b) + random.nextGaussian(), 7 * random.nextGaussian()};
      for (int j = 0; j < 3; j++) {
        if (random.nextDouble() < 0.15) {
          row[j] = NAN;
        }
      }
      rows[i] = row;
    }
    return rows;
  }

  static double[][] filled(double[][] rows, double[] imputed) {
    double[][] result = new double[rows.length][];
    for (int i = 0; i < rows.length; i++) {
      result[i] = rows[i].clone();
      for (int j = 0; j < P; j++) {
        if (Double.isNaN(result[i][j]) && !Double.isNaN(imputed[j])) {
          result[i][j] = imputed[j];
        }
      }
    }
    return result;
  }

  /** Accumulates the rows in four parts of uneven size (one empty) and merges them. */
  static CoMoments accumulate(double[][] rows, double[] centres) {
    List<CoMoments> parts = new ArrayList<>();
    for (int part = 0; part < 4; part++) {
      parts.add(new CoMoments(centres));
    }
    for (int i = 0; i < rows.length; i++) {
      parts.get(i < 40 ? 0 : i < 200 ? 2 : 3).add(rows[i]);
    }
    return parts.get(0).merge(parts.get(1)).merge(parts.get(2)).merge(parts.get(3));
  }

  static Stream<Arguments> imputations() {
    double[] good = {1000, 1000, -1000, 0};
    double[] far = {1050, 950, -1050, 50};
    List<Arguments> cases = new ArrayList<>();
    for (double[] imputed : List.of(new double[] {1000, 1000, -1000, 0}, new double[] {0, 0, 0, 0},
        new double[] {1003.5, 998.25, -950, 12}, new double[] {-5e3, 2e4, 1e3, 0})) {
      // The sums are of centred values, so a centre d away from the mean costs about
      // (d / sd)^2 units of roundoff in a variance. A centre 50 away, against column spreads of
      // 0.5 to 20 (up to 100 standard deviations), stays within 1e-9; a good centre leaves only
      // rounding. In the job the centre is the pass-1 median, within one sd of the mean.
      cases.add(Arguments.of(imputed, good, 1e-11));
      cases.add(Arguments.of(imputed, far, 1e-9));
    }
    return cases.stream();
  }

  @ParameterizedTest
  @MethodSource("imputations")
  void covarianceAfterImputationMatchesCommonsMathOnFilledData(double[] imputed, double[] centres, double relative) {
    double[][] rows = generated(11L);
    double[][] expected = new Covariance(filled(rows, imputed)).getCovarianceMatrix().getData();
    double[][] actual = accumulate(rows, centres).covariance(imputed);
    for (int j = 0; j < P; j++) {
      for (int k = 0; k < P; k++) {
        double scale = Math.sqrt(expected[j][j] * expected[k][k]);
        assertThat(actual[j][k]).as("cov %d %d", j, k).isCloseTo(expected[j][k], within(relative * scale));
      }
    }
  }

  @ParameterizedTest
  @MethodSource("imputations")
  void correlationAfterImputationMatchesCommonsMathOnFilledData(double[] imputed, double[] centres, double relative) {
    double[][] rows = generated(12L);
    double[][] expected = new PearsonsCorrelation(filled(rows, imputed)).getCorrelationMatrix().getData();
    double[][] actual = accumulate(rows, centres).correlation(imputed);
    for (int j = 0; j < P; j++) {
      assertThat(actual[j]).as("row %d", j).containsExactly(expected[j], within(relative));
    }
  }

  // NaN imputation: Commons Math on the rows where each pair (after filling the imputed columns)
  // is present; the variances of a pair's correlation come from the same rows.
  @ParameterizedTest
  @MethodSource("pairwiseCases")
  void pairwiseCompleteMatchesCommonsMathOnPresentPairs(double[] imputed) {
    double[][] rows = filled(generated(13L), imputed);
    CoMoments moments = accumulate(generated(13L), new double[] {1000, 1000, -1000, 0});
    double[][] cov = moments.covariance(imputed);
    double[][] cor = moments.correlation(imputed);
    for (int j = 0; j < P; j++) {
      for (int k = 0; k < P; k++) {
        double[][] pair = presentPairs(rows, j, k);
        double expectedCov = j == k ? new Variance().evaluate(pair[0]) : new Covariance().covariance(pair[0], pair[1]);
        double expectedCor = j == k ? 1.0 : new PearsonsCorrelation().correlation(pair[0], pair[1]);
        assertThat(cov[j][k]).as("cov %d %d", j, k).isCloseTo(expectedCov, within(1e-11 * Math.abs(expectedCov) + 1e-12));
        assertThat(cor[j][k]).as("cor %d %d", j, k).isCloseTo(expectedCor, within(1e-12));
      }
    }
  }

  static Stream<double[]> pairwiseCases() {
    return Stream.of(new double[] {NAN, NAN, NAN, NAN}, new double[] {NAN, 1001.5, NAN, 0.0});
  }

  @Test
  void constantColumnHasNaNCorrelationAndZeroCovariance() {
    double[][] rows = generated(14L);
    for (double[] row : rows) {
      row[3] = 2.5;
    }
    CoMoments moments = accumulate(rows, new double[] {1000, 1000, -1000, 2.5});
    double[] imputed = {1000, 1000, -1000, NAN};
    double[][] cor = moments.correlation(imputed);
    assertThat(moments.covariance(imputed)[3][3]).isZero();
    assertThat(cor[3]).containsOnly(NAN);
    assertThat(cor[0][3]).isNaN();
    assertThat(cor[0][0]).isEqualTo(1.0);
  }

  @Test
  void survivesSerializationMidStream() throws IOException, ClassNotFoundException {
    double[][] rows = generated(15L);
    double[] centres = {1000, 1000, -1000, 0};
    CoMoments first = new CoMoments(centres);
    for (int i = 0; i < ROWS / 2; i++) {
      first.add(rows[i]);
    }
    CoMoments copy = roundTrip(first);
    for (int i = ROWS / 2; i < ROWS; i++) {
      copy.add(rows[i]);
    }
    double[] imputed = {999, 1001, -1000, 0};
    double[][] expected = new Covariance(filled(rows, imputed)).getCovarianceMatrix().getData();
    assertThat(copy.rows()).isEqualTo(ROWS);
    assertThat(copy.covariance(imputed)[0]).containsExactly(expected[0], within(1e-10));
  }

  @Test
  void fewerThanTwoRowsGiveNaN() {
    CoMoments moments = new CoMoments(new double[] {0, 0});
    assertThat(moments.covariance(new double[] {0, 0})[0]).containsOnly(NAN);
    moments.add(new double[] {1, 2});
    assertThat(moments.rows()).isEqualTo(1);
    assertThat(moments.covariance(new double[] {0, 0})[0]).containsOnly(NAN);
    assertThat(moments.correlation(new double[] {0, 0})[1]).containsOnly(NAN);
  }

  @Test
  void countsRowsWithMissingEntries() {
    CoMoments moments = new CoMoments(new double[] {0, 0, 0});
    moments.add(new double[] {1, NAN, 3});
    moments.add(new double[] {NAN, NAN, NAN});
    moments.add(new double[] {1, 2, 3});
    assertThat(moments.rows()).isEqualTo(3);
    assertThat(moments.dimension()).isEqualTo(3);
  }

  @Test
  void constantStatesMatchTheRowsWithTheirConstantsFilledIn() {
    // Rows whose entries are values, missing, below or above; each state's constant is given only
    // when the sums are read (as capping limits are known only after the pass). Reference:
    // Commons Math Covariance and PearsonsCorrelation on the same rows with the constants written
    // in (D). Split into parts and merged, as the passes do.
    Random random = new Random(41);
    int p = 4;
    int n = 3_000;
    double[][] values = new double[n][p];
    byte[][] states = new byte[n][p];
    double[][] constants = {{-1.5, -3.0, 3.0}, {10.0, 2.0, 30.0}, {0.25, -0.5, 1.5}, {7.0, 5.0, 9.0}};
    double[][] filled = new double[n][p];
    for (int r = 0; r < n; r++) {
      for (int j = 0; j < p; j++) {
        values[r][j] = random.nextGaussian() * (j + 1) + (j == 3 ? values[r][0] : 0.0);
        double u = random.nextDouble();
        states[r][j] = u < 0.08 ? CoMoments.MISSING : u < 0.12 ? CoMoments.BELOW : u < 0.16 ? CoMoments.ABOVE : CoMoments.VALUE;
        filled[r][j] = states[r][j] == CoMoments.VALUE ? values[r][j] : constants[j][states[r][j] - 1];
      }
    }
    double[] centres = {0.1, -0.2, 0.3, 0.0};
    CoMoments whole = null;
    for (int part = 0; part < 3; part++) {
      CoMoments m = new CoMoments(centres);
      for (int r = part; r < n; r += 3) {
        m.add(values[r], states[r]);
      }
      whole = whole == null ? m : whole.merge(m);
    }
    double[][] cov = whole.covariance(constants);
    double[][] cor = whole.correlation(constants);
    double[][] refCov = new Covariance(filled).getCovarianceMatrix().getData();
    double[][] refCor = new PearsonsCorrelation(filled).getCorrelationMatrix().getData();
    for (int j = 0; j < p; j++) {
      for (int k = 0; k < p; k++) {
        assertThat(cov[j][k]).as("cov %d %d", j, k).isCloseTo(refCov[j][k], within(1e-10 * Math.abs(refCov[j][j])));
        assertThat(cor[j][k]).as("r %d %d", j, k).isCloseTo(refCor[j][k], within(1e-12));
      }
    }
    // A NaN constant leaves that state's rows out of the column's pairs (pairwise complete).
    double[][] noBelow = {{-1.5, Double.NaN, 3.0}, constants[1], constants[2], constants[3]};
    double[][] kept = Arrays.stream(java.util.stream.IntStream.range(0, n).toArray())
        .filter(r -> states[r][0] != CoMoments.BELOW).mapToObj(r -> new double[] {filled[r][0], filled[r][1]})
        .toArray(double[][]::new);
    double ref01 = new PearsonsCorrelation(kept).getCorrelationMatrix().getEntry(0, 1);
    assertThat(whole.correlation(noBelow)[0][1]).isCloseTo(ref01, within(1e-12));
    assertThatThrownBy(() -> new CoMoments(centres).add(new double[] {1, 2, 3, 4}, new byte[] {0, 0, 0, 9}))
        .hasMessage("Cannot add an entry in state 9 in column 3");
  }

  @Test
  void rowsGivenColumnByColumnGiveTheSameSumsAsRowByRow() {
    // Not an outside reference: addColumns must add exactly what add does on the same rows in the
    // same order (the test above checks add against Commons Math). Batches of uneven sizes cross
    // the block of pending rows; every third row is left out, as rows kept aside are.
    Random random = new Random(47);
    int p = 5;
    double[] centres = {0.5, -1.0, 2.0, 0.0, 10.0};
    CoMoments byRow = new CoMoments(centres);
    CoMoments byColumn = new CoMoments(centres);
    // The last batch has column 0 missing in more rows than one chunk of counts holds (65,535).
    for (int batch : new int[] {1, 63, 64, 65, 200, 7, 0, 130, 100_000}) {
      double[][] values = new double[p][batch];
      byte[][] states = new byte[p][batch];
      int[] which = new int[batch];
      int count = 0;
      for (int r = 0; r < batch; r++) {
        for (int j = 0; j < p; j++) {
          double u = batch == 100_000 && j == 0 ? 0.0 : random.nextDouble();
          states[j][r] = u < 0.1 ? CoMoments.MISSING : u < 0.13 ? CoMoments.BELOW : u < 0.16 ? CoMoments.ABOVE : CoMoments.VALUE;
          // An entry in a constant state may hold anything: it is ignored.
          values[j][r] = states[j][r] == CoMoments.VALUE ? random.nextGaussian() * (j + 1) : u < 0.05 ? NAN : 1e300;
        }
        if (r % 3 != 2) {
          which[count++] = r;
          double[] row = new double[p];
          byte[] rowStates = new byte[p];
          for (int j = 0; j < p; j++) {
            row[j] = states[j][r] == CoMoments.VALUE ? values[j][r] : 0.0;
            rowStates[j] = states[j][r];
          }
          byRow.add(row, rowStates);
        }
      }
      byColumn.addColumns(values, states, which, count);
    }
    double[][] constants = {{1, -3, 3}, {0, -2, 2}, {4, 1, 5}, {0.5, -9, 9}, {10, 8, 12}};
    assertThat(byColumn.rows()).isEqualTo(byRow.rows());
    assertThat(byColumn.covariance(constants)).isDeepEqualTo(byRow.covariance(constants));
    assertThat(byColumn.correlation(new double[] {NAN, 0, NAN, 1, NAN}))
        .isDeepEqualTo(byRow.correlation(new double[] {NAN, 0, NAN, 1, NAN}));
    assertThatThrownBy(() -> byColumn.addColumns(new double[2][1], new byte[2][1], new int[] {0}, 1))
        .hasMessage("Cannot add rows of 2 columns to 5 columns");
  }

  @Test
  void aSubsetOfColumnsHasTheSumsOfThoseColumnsAlone() {
    // Not an outside reference: the subset must equal an accumulator fed those columns only.
    Random random = new Random(43);
    double[] centres = {1.0, 2.0, 3.0};
    CoMoments all = new CoMoments(centres);
    CoMoments two = new CoMoments(new double[] {3.0, 1.0});
    for (int r = 0; r < 500; r++) {
      double[] row = {random.nextGaussian(), random.nextDouble() < 0.1 ? NAN : random.nextGaussian(),
          random.nextDouble() < 0.2 ? NAN : random.nextGaussian() * 3};
      all.add(row);
      two.add(new double[] {row[2], row[0]});
    }
    double[] fill = {0.5, -0.5};
    assertThat(all.subset(new int[] {2, 0}).covariance(fill)).isDeepEqualTo(two.covariance(fill));
  }

  @Test
  void rejectsBadInput() {
    CoMoments moments = new CoMoments(new double[] {0, 0});
    assertThatThrownBy(() -> moments.add(new double[] {1})).isInstanceOf(IllegalArgumentException.class)
        .hasMessage("Cannot add a row of 1 values to 2 columns");
    assertThatThrownBy(() -> moments.add(new double[] {1, Double.NEGATIVE_INFINITY}))
        .isInstanceOf(IllegalArgumentException.class);
    assertThat(moments.rows()).isZero();
    assertThatThrownBy(() -> moments.covariance(new double[] {0})).isInstanceOf(IllegalArgumentException.class);
    assertThatThrownBy(() -> moments.merge(new CoMoments(new double[] {0, 1})))
        .isInstanceOf(IllegalArgumentException.class);
    assertThatThrownBy(() -> new CoMoments(new double[] {NAN})).isInstanceOf(IllegalArgumentException.class);
    assertThatThrownBy(() -> new CoMoments(new double[0])).isInstanceOf(IllegalArgumentException.class);
  }

  private static double[][] presentPairs(double[][] rows, int j, int k) {
    double[][] pair = Arrays.stream(rows).filter(r -> !Double.isNaN(r[j]) && !Double.isNaN(r[k]))
        .map(r -> new double[] {r[j], r[k]}).toArray(double[][]::new);
    return new double[][] {ReferenceData.column(pair, 0), ReferenceData.column(pair, 1)};
  }

  private static CoMoments roundTrip(CoMoments moments) throws IOException, ClassNotFoundException {
    ByteArrayOutputStream bytes = new ByteArrayOutputStream();
    try (ObjectOutputStream out = new ObjectOutputStream(bytes)) {
      out.writeObject(moments);
    }
    try (ObjectInputStream in = new ObjectInputStream(new ByteArrayInputStream(bytes.toByteArray()))) {
      return (CoMoments) in.readObject();
    }
  }
}
