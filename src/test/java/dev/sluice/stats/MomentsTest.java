package dev.sluice.stats;

import dev.sluice.testing.ReferenceData;
import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;
import static org.assertj.core.api.Assertions.within;

import dev.sluice.testing.ReferenceData.Strd;
import java.util.Arrays;
import java.util.List;
import org.apache.commons.math3.stat.descriptive.DescriptiveStatistics;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

class MomentsTest {
  /** The NIST StRD univariate summary statistics data sets. */
  static List<String> strdSets() {
    return List.of("NumAcc1", "NumAcc2", "NumAcc3", "NumAcc4", "Michelso", "Mavro", "Lew", "Lottery", "PiDigits");
  }

  /**
   * The certified values are for the decimal data; each datum is stored as a double to within half
   * an ulp of the largest magnitude, which bounds what any algorithm on doubles can reach
   * (NumAcc4: ulp(1e7) / 0.1, about 2e-8 relative on the standard deviation).
   */
  private static double meanTolerance(Strd set) {
    return 2 * Math.ulp(maxAbs(set.data())) + 1e-14 * Math.abs(set.certifiedMean());
  }

  private static double stddevTolerance(Strd set) {
    return 2 * Math.ulp(maxAbs(set.data())) + 1e-13 * set.certifiedStddev();
  }

  /** Moments of values[from, to), accumulated by the pass accumulator {@link ScaledMoments}. */
  private static Moments accumulate(double[] values, int from, int to) {
    ScaledMoments acc = new ScaledMoments();
    for (int i = from; i < to; i++) {
      acc.add(values[i]);
    }
    return Moments.of(acc.count(), acc.mean(), acc.stddev(), acc.min(), acc.max());
  }

  // NIST StRD univariate summary statistics; certified mean and standard deviation (n - 1) read
  // from each file's header (files as shipped in the commons-math3 3.6.1 tests jar).
  @ParameterizedTest(name = "{0}")
  @MethodSource("strdSets")
  void accumulatorMatchesNistCertifiedValues(String name) {
    Strd set = ReferenceData.strd(name);
    Moments m = accumulate(set.data(), 0, set.data().length);

    assertThat(m.count()).isEqualTo(set.data().length);
    assertThat(m.mean()).as("certified mean").isCloseTo(set.certifiedMean(), within(meanTolerance(set)));
    assertThat(m.stddev()).as("certified s").isCloseTo(set.certifiedStddev(), within(stddevTolerance(set)));
  }

  // Commons Math 3 DescriptiveStatistics (two-pass, corrected) on the very same doubles: agreement
  // well beyond the input rounding shows the accumulator loses no digits of its own.
  @ParameterizedTest(name = "{0}")
  @MethodSource("strdSets")
  void accumulatorMatchesCommonsMathOnTheSameDoubles(String name) {
    Strd set = ReferenceData.strd(name);
    DescriptiveStatistics reference = new DescriptiveStatistics(set.data());
    Moments m = accumulate(set.data(), 0, set.data().length);

    assertThat(m.mean()).isCloseTo(reference.getMean(), within(4 * Math.ulp(reference.getMean())));
    assertThat(m.stddev()).isCloseTo(reference.getStandardDeviation(), within(1e-12 * reference.getStandardDeviation()));
    assertThat(m.min()).isEqualTo(reference.getMin());
    assertThat(m.max()).isEqualTo(reference.getMax());
  }

  // NIST StRD certified values again, now from two halves combined by merge.
  @ParameterizedTest(name = "{0}")
  @MethodSource("strdSets")
  void mergedHalvesMatchNistCertifiedValues(String name) {
    Strd set = ReferenceData.strd(name);
    int half = set.data().length / 3;
    Moments merged = accumulate(set.data(), 0, half).merge(accumulate(set.data(), half, set.data().length));

    assertThat(merged.count()).isEqualTo(set.data().length);
    assertThat(merged.mean()).isCloseTo(set.certifiedMean(), within(meanTolerance(set)));
    assertThat(merged.stddev()).isCloseTo(set.certifiedStddev(), within(stddevTolerance(set)));
  }

  // NIST StRD NumAcc4 header: 10000000.2 then 500 pairs 10000000.1, 10000000.3; certified mean
  // 10000000.2 and s 0.1 (exact). Built from an EMPTY start by point masses alone.
  @Test
  void pointMassesFromEmptyRebuildNumAcc4() {
    Strd set = ReferenceData.strd("NumAcc4");
    assertThat(Arrays.stream(set.data()).filter(v -> v == 10000000.1).count()).isEqualTo(500);
    assertThat(Arrays.stream(set.data()).filter(v -> v == 10000000.3).count()).isEqualTo(500);

    Moments m = Moments.EMPTY.withPointMass(10000000.2, 1)
        .withPointMass(10000000.1, 500).withPointMass(10000000.3, 500);

    assertThat(m.count()).isEqualTo(1001);
    assertThat(m.mean()).isCloseTo(set.certifiedMean(), within(meanTolerance(set)));
    assertThat(m.stddev()).isCloseTo(set.certifiedStddev(), within(stddevTolerance(set)));
    assertThat(m.min()).isEqualTo(10000000.1);
    assertThat(m.max()).isEqualTo(10000000.3);
  }

  // Reference: Commons Math DescriptiveStatistics of the NIST Lew data with 37 copies of 250
  // appended by hand.
  @Test
  void pointMassMatchesCommonsMathOnAppendedCopies() {
    double[] lew = ReferenceData.strd("Lew").data();
    double[] appended = Arrays.copyOf(lew, lew.length + 37);
    Arrays.fill(appended, lew.length, appended.length, 250.0);
    DescriptiveStatistics reference = new DescriptiveStatistics(appended);

    Moments m = accumulate(lew, 0, lew.length).withPointMass(250.0, 37);

    assertThat(m.count()).isEqualTo(appended.length);
    assertThat(m.mean()).isCloseTo(reference.getMean(), within(1e-12 * Math.abs(reference.getMean())));
    assertThat(m.stddev()).isCloseTo(reference.getStandardDeviation(), within(1e-12 * reference.getStandardDeviation()));
  }

  @Test
  void pointMassOnEmptyIsThePointItself() {
    assertThat(Moments.EMPTY.withPointMass(3.5, 4)).isEqualTo(new Moments(4, 3.5, 0.0, 3.5, 3.5));
    assertThat(Moments.EMPTY.withPointMass(3.5, 0)).isSameAs(Moments.EMPTY);
  }

  // NIST StRD Lew header: n 200, mean -177.435, s 277.332168044316, and its "R generated values"
  // variance 76913.13143, min -579, max 300.
  @Test
  void ofRebuildsFromSummaryAsSparkReportsIt() {
    Moments m = Moments.of(200, -177.435, 277.332168044316, -579, 300);

    assertThat(m.m2()).isCloseTo(76913.13143 * 199, within(0.00001 * 199));
    assertThat(m.variance()).isCloseTo(76913.13143, within(0.00001));
    assertThat(m.stddev()).isCloseTo(277.332168044316, within(1e-12));
  }

  @Test
  void ofHandlesNoAndOneValue() {
    assertThat(Moments.of(0, Double.NaN, Double.NaN, Double.NaN, Double.NaN)).isEqualTo(Moments.EMPTY);
    Moments one = Moments.of(1, 7.0, Double.NaN, 7.0, 7.0);
    assertThat(one.m2()).isZero();
    assertThat(one.variance()).isNaN();
  }

  @Test
  void mergeWithEmptyKeepsTheOtherPart() {
    Moments part = new Moments(3, 2.0, 8.0, 0.0, 4.0);
    assertThat(part.merge(Moments.EMPTY)).isSameAs(part);
    assertThat(Moments.EMPTY.merge(part)).isSameAs(part);
  }

  @Test
  void rejectsNonFinitePointMasses() {
    assertThatThrownBy(() -> Moments.EMPTY.withPointMass(Double.NaN, 2)).isInstanceOf(IllegalArgumentException.class);
    assertThatThrownBy(() -> Moments.EMPTY.withPointMass(1.0, -1)).isInstanceOf(IllegalArgumentException.class);
  }

  private static double maxAbs(double[] values) {
    return Arrays.stream(values).map(Math::abs).max().orElse(0.0);
  }
}
