package dev.sluice.stats;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;
import static org.assertj.core.api.Assertions.within;

import dev.sluice.testing.ReferenceData;
import dev.sluice.testing.ReferenceData.Strd;
import java.io.ByteArrayInputStream;
import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.ObjectInputStream;
import java.io.ObjectOutputStream;
import java.math.BigDecimal;
import java.math.MathContext;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Collections;
import java.util.List;
import java.util.Random;
import java.util.function.Function;
import org.apache.commons.math3.stat.descriptive.DescriptiveStatistics;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.MethodSource;

/**
 * References: the NIST StRD univariate data sets with their certified values (commons-math3 3.6.1
 * tests jar), Commons Math 3 DescriptiveStatistics on the same doubles, and exact arithmetic with
 * java.math.BigDecimal for values near the ends of the double range (BigDecimal is the reference
 * there: Commons Math overflows on such values).
 */
class ScaledMomentsTest {
  private static final double MAX = Double.MAX_VALUE;
  private static final MathContext MC = new MathContext(60);

  static List<String> strdSets() {
    return List.of("NumAcc1", "NumAcc2", "NumAcc3", "NumAcc4", "Michelso", "Mavro", "Lew", "Lottery", "PiDigits");
  }

  // ---- tolerances, as in MomentsTest: each datum is stored as a double to within half an ulp of
  // the largest magnitude, which bounds what any algorithm on doubles can reach.

  private static double meanTolerance(Strd set) {
    return 2 * Math.ulp(maxAbs(set.data())) + 1e-14 * Math.abs(set.certifiedMean());
  }

  private static double stddevTolerance(Strd set) {
    return 2 * Math.ulp(maxAbs(set.data())) + 1e-13 * set.certifiedStddev();
  }

  // ---- splitting into parts and merging them in several orders

  private static ScaledMoments part(double[] values, int from, int to) {
    ScaledMoments m = new ScaledMoments();
    for (int i = from; i < to; i++) {
      m.add(values[i]);
    }
    return m;
  }

  /** The parts between consecutive cut points (0 and the length are added). */
  private static List<ScaledMoments> parts(double[] values, int... cuts) {
    List<ScaledMoments> out = new ArrayList<>();
    int from = 0;
    for (int cut : cuts) {
      out.add(part(values, from, cut));
      from = cut;
    }
    out.add(part(values, from, values.length));
    return out;
  }

  /** Ways of combining parts: left fold, right fold, balanced tree, seeded shuffle then fold. */
  private static List<Function<List<ScaledMoments>, ScaledMoments>> mergeOrders() {
    return List.of(
        ps -> {
          ScaledMoments acc = ps.get(0);
          for (int i = 1; i < ps.size(); i++) {
            acc.merge(ps.get(i));
          }
          return acc;
        },
        ps -> {
          ScaledMoments acc = ps.get(ps.size() - 1);
          for (int i = ps.size() - 2; i >= 0; i--) {
            acc.merge(ps.get(i));
          }
          return acc;
        },
        ScaledMomentsTest::tree,
        ps -> {
          List<ScaledMoments> copy = new ArrayList<>(ps);
          Collections.shuffle(copy, new Random(7));
          ScaledMoments acc = new ScaledMoments();
          copy.forEach(acc::merge);
          return acc;
        });
  }

  private static ScaledMoments tree(List<ScaledMoments> ps) {
    if (ps.size() == 1) {
      return ps.get(0);
    }
    int mid = ps.size() / 2;
    return tree(ps.subList(0, mid)).merge(tree(ps.subList(mid, ps.size())));
  }

  /** Cut points for several splits of n values: thirds, uneven fifths, and (small sets) singletons. */
  private static List<int[]> splits(int n) {
    List<int[]> out = new ArrayList<>();
    out.add(validCuts(n, n / 3, 2 * n / 3));
    out.add(validCuts(n, 1, n / 7, n / 2, n / 2 + 1, n - 2));
    if (n <= 5000) {
      int[] singletons = new int[n - 1];
      for (int i = 0; i < singletons.length; i++) {
        singletons[i] = i + 1;
      }
      out.add(singletons);
    }
    return out;
  }

  /** The distinct cut points strictly inside (0, n), in increasing order. */
  private static int[] validCuts(int n, int... cuts) {
    return Arrays.stream(cuts).filter(c -> c > 0 && c < n).sorted().distinct().toArray();
  }

  // ---- NIST StRD

  // NIST StRD univariate summary statistics; certified mean and standard deviation (n - 1) read
  // from each file's header (S).
  @ParameterizedTest(name = "{0}")
  @MethodSource("strdSets")
  void onePartMatchesNistCertifiedValues(String name) {
    Strd set = ReferenceData.strd(name);
    ScaledMoments m = part(set.data(), 0, set.data().length);

    assertThat(m.count()).isEqualTo(set.data().length);
    assertThat(m.mean()).as("certified mean").isCloseTo(set.certifiedMean(), within(meanTolerance(set)));
    assertThat(m.stddev()).as("certified s").isCloseTo(set.certifiedStddev(), within(stddevTolerance(set)));
    // (D) smallest and largest datum of the file, by Commons Math DescriptiveStatistics.
    DescriptiveStatistics reference = new DescriptiveStatistics(set.data());
    assertThat(m.min()).isEqualTo(reference.getMin());
    assertThat(m.max()).isEqualTo(reference.getMax());
  }

  // NIST StRD certified values (S) from the data split into parts (thirds, uneven, one value per
  // part) merged in four orders.
  @ParameterizedTest(name = "{0}")
  @MethodSource("strdSets")
  void mergedPartsMatchNistCertifiedValuesInEveryOrder(String name) {
    Strd set = ReferenceData.strd(name);
    for (int[] cuts : splits(set.data().length)) {
      for (Function<List<ScaledMoments>, ScaledMoments> order : mergeOrders()) {
        ScaledMoments m = order.apply(parts(set.data(), cuts));
        String what = cuts.length + 1 + " parts";
        assertThat(m.count()).as(what).isEqualTo(set.data().length);
        assertThat(m.mean()).as(what).isCloseTo(set.certifiedMean(), within(meanTolerance(set)));
        assertThat(m.stddev()).as(what).isCloseTo(set.certifiedStddev(), within(stddevTolerance(set)));
      }
    }
  }

  // ---- Commons Math on seeded random data

  /** Seeded samples: offset normal, heavy-tailed lognormal, and uniform over +/-1e200. */
  private static List<double[]> randomSamples() {
    Random random = new Random(20240611L);
    double[] normal = new double[20_000];
    double[] lognormal = new double[20_000];
    double[] huge = new double[20_000];
    for (int i = 0; i < normal.length; i++) {
      normal[i] = 1e6 + 3.0 * random.nextGaussian();
      lognormal[i] = Math.exp(4.0 * random.nextGaussian());
      huge[i] = (2 * random.nextDouble() - 1) * 1e200;
    }
    return List.of(normal, lognormal, huge);
  }

  // (D) Commons Math 3 DescriptiveStatistics (two-pass, corrected) on the same doubles. For the
  // values up to 1e200 its sum of squares would overflow, so it gets the data times 2^-600 (exact)
  // and its results are multiplied back by 2^600 (exact).
  @Test
  void copiesOfOneValueAreAddedAtOnce() {
    // Reference: Commons Math DescriptiveStatistics on the values with the copies written out
    // (D): a sample capped at 2.5 from above and at -1.0 from below.
    Random random = new Random(3);
    ScaledMoments m = new ScaledMoments();
    DescriptiveStatistics reference = new DescriptiveStatistics();
    for (int i = 0; i < 500; i++) {
      double x = random.nextGaussian();
      m.add(x);
      reference.addValue(x);
    }
    m.addCopies(2.5, 37).addCopies(-1.0, 12).addCopies(9.0, 0);
    for (int i = 0; i < 37; i++) {
      reference.addValue(2.5);
    }
    for (int i = 0; i < 12; i++) {
      reference.addValue(-1.0);
    }
    assertThat(m.count()).isEqualTo(549);
    assertThat(m.mean()).isCloseTo(reference.getMean(), within(1e-14));
    assertThat(m.stddev()).isCloseTo(reference.getStandardDeviation(), within(1e-13));
    assertThat(m.max()).isEqualTo(Math.max(2.5, reference.getMax()));
    assertThat(new ScaledMoments().addCopies(1.5e300, 4).stddev()).isZero();
    assertThatThrownBy(() -> m.addCopies(1.0, -1)).isInstanceOf(IllegalArgumentException.class);
  }

  @Test
  void agreesWithCommonsMathOnSeededRandomDataInOneAndManyParts() {
    for (double[] x : randomSamples()) {
      double scale = maxAbs(x) > 1e150 ? 0x1p-600 : 1.0;
      DescriptiveStatistics reference = new DescriptiveStatistics(Arrays.stream(x).map(v -> v * scale).toArray());
      double mean = reference.getMean() / scale;
      double sd = reference.getStandardDeviation() / scale;

      List<ScaledMoments> results = new ArrayList<>();
      results.add(part(x, 0, x.length));
      for (Function<List<ScaledMoments>, ScaledMoments> order : mergeOrders()) {
        results.add(order.apply(parts(x, 1, 999, 5000, 5001, 12_345, 19_000)));
      }
      for (ScaledMoments m : results) {
        assertThat(m.scaled()).isEqualTo(scale != 1.0);
        assertThat(m.count()).isEqualTo(x.length);
        assertThat(m.mean()).isCloseTo(mean, within(1e-13 * maxAbs(x)));
        assertThat(m.stddev()).isCloseTo(sd, within(1e-12 * sd));
        assertThat(m.min()).isEqualTo(reference.getMin() / scale);
        assertThat(m.max()).isEqualTo(reference.getMax() / scale);
      }
    }
  }

  // ---- the ends of the double range, against exact BigDecimal arithmetic (D)

  private static BigDecimal exactMean(double[] x) {
    BigDecimal sum = BigDecimal.ZERO;
    for (double v : x) {
      sum = sum.add(new BigDecimal(v));
    }
    return sum.divide(BigDecimal.valueOf(x.length), MC);
  }

  private static BigDecimal exactSd(double[] x) {
    BigDecimal mean = exactMean(x);
    BigDecimal ss = BigDecimal.ZERO;
    for (double v : x) {
      BigDecimal d = new BigDecimal(v).subtract(mean);
      ss = ss.add(d.multiply(d));
    }
    return ss.divide(BigDecimal.valueOf(x.length - 1), MC).sqrt(MC);
  }

  /** Checks one result against BigDecimal: mean to 1e-14 of the largest magnitude, sd to 1e-13 relative. */
  private static void assertMatchesExact(ScaledMoments m, double[] x) {
    double mean = exactMean(x).doubleValue();
    BigDecimal sd = exactSd(x);
    assertThat(m.count()).isEqualTo(x.length);
    assertThat(m.mean()).isFinite().isCloseTo(mean, within(1e-14 * maxAbs(x)));
    if (sd.compareTo(new BigDecimal(MAX)) > 0) {
      assertThat(m.stddev()).as("a standard deviation beyond the double range").isEqualTo(Double.POSITIVE_INFINITY);
    } else {
      assertThat(m.stddev()).isCloseTo(sd.doubleValue(), within(1e-13 * sd.doubleValue()));
    }
    assertThat(m.min()).isEqualTo(Arrays.stream(x).min().orElseThrow());
    assertThat(m.max()).isEqualTo(Arrays.stream(x).max().orElseThrow());
  }

  /** Checks x in one part, in reverse, and in two splits merged in every order. */
  private static void assertAllWaysMatchExact(double[] x) {
    assertMatchesExact(part(x, 0, x.length), x);
    double[] reversed = new double[x.length];
    for (int i = 0; i < x.length; i++) {
      reversed[i] = x[x.length - 1 - i];
    }
    assertMatchesExact(part(reversed, 0, x.length), x);
    for (int[] cuts : List.of(new int[] {x.length / 2}, new int[] {1, x.length - 1})) {
      for (Function<List<ScaledMoments>, ScaledMoments> order : mergeOrders()) {
        assertMatchesExact(order.apply(parts(x, cuts)), x);
      }
    }
  }

  @Test
  void valuesNearTheLargestDoubleMatchExactArithmetic() {
    assertAllWaysMatchExact(new double[] {MAX, MAX / 2, -MAX / 3, 0.75 * MAX, -MAX / 7, MAX / 5, -MAX / 2, 1.0});
    assertAllWaysMatchExact(new double[] {MAX, MAX, Math.nextDown(MAX), 0.999999 * MAX});
    assertAllWaysMatchExact(new double[] {-MAX, -MAX / 2, -0.9 * MAX});
  }

  // (D) BigDecimal: the mean of -MAX and +MAX is 0 and their sd is MAX * sqrt(2), beyond the
  // double range.
  @Test
  void spreadBeyondTheDoubleRangeIsInfiniteWhileTheMeanStaysFinite() {
    double[] x = {-MAX, MAX};
    assertThat(exactSd(x).compareTo(new BigDecimal(MAX))).isPositive();
    assertAllWaysMatchExact(x);
    ScaledMoments m = part(x, 0, 2);
    assertThat(m.mean()).isZero();
    assertThat(m.stddev()).isEqualTo(Double.POSITIVE_INFINITY);
  }

  // By hand: the mean of three copies of MAX is MAX, their spread 0; both exactly.
  @Test
  void copiesOfTheLargestDoubleHaveThatMeanAndNoSpread() {
    ScaledMoments m = part(new double[] {MAX, MAX, MAX}, 0, 3);
    assertThat(m.mean()).isEqualTo(MAX);
    assertThat(m.stddev()).isZero();
  }

  @Test
  void tinyAndHugeValuesMixedMatchExactArithmetic() {
    assertAllWaysMatchExact(new double[] {
        Double.MIN_VALUE, 1e-300, 3.0, -1e308, 2e307, 1e-10, 5e306, -Double.MIN_NORMAL, 42.0, 7e305});
    // Values on both sides of 2^500 (about 3.27e150), the smaller ones first: the state built on
    // them (m2 about 1e301) is rescaled when 4e151 arrives.
    assertAllWaysMatchExact(new double[] {1e150, -3e150, 2e150, 2.5e150, 4e151, -1e151, 3e150});
  }

  @Test
  void switchInOnePartOnlyBeforeTheMerge() {
    double[] ordinary = {1e150, -3e150, 2e150, 7.5, 2.9e150};
    double[] large = {4e151, -1e151, 1e200, -2e199};
    double[] all = new double[ordinary.length + large.length];
    System.arraycopy(ordinary, 0, all, 0, ordinary.length);
    System.arraycopy(large, 0, all, ordinary.length, large.length);

    ScaledMoments a = part(ordinary, 0, ordinary.length);
    ScaledMoments b = part(large, 0, large.length);
    assertThat(a.scaled()).isFalse();
    assertThat(b.scaled()).isTrue();
    ScaledMoments ab = a.merge(b);
    assertThat(ab.scaled()).isTrue();
    assertMatchesExact(ab, all);

    ScaledMoments ba = part(large, 0, large.length).merge(part(ordinary, 0, ordinary.length));
    assertMatchesExact(ba, all);
    assertThat(b.count()).as("the merged-in part is unchanged").isEqualTo(large.length);
  }

  // ---- small cases, by hand

  @Test
  void emptyHasCountZeroAndNaNFigures() {
    ScaledMoments m = new ScaledMoments();
    assertThat(m.count()).isZero();
    assertThat(m.mean()).isNaN();
    assertThat(m.stddev()).isNaN();
    assertThat(m.min()).isNaN();
    assertThat(m.max()).isNaN();
    assertThat(m.merge(new ScaledMoments()).count()).isZero();
    assertThat(m.mean()).isNaN();
  }

  @Test
  void oneValueHasNoStandardDeviation() {
    ScaledMoments m = part(new double[] {-12.5}, 0, 1);
    assertThat(m.count()).isEqualTo(1);
    assertThat(m.mean()).isEqualTo(-12.5);
    assertThat(m.stddev()).isNaN();
    assertThat(m.min()).isEqualTo(-12.5);
    assertThat(m.max()).isEqualTo(-12.5);

    ScaledMoments huge = part(new double[] {-1e300}, 0, 1);
    assertThat(huge.mean()).isEqualTo(-1e300);
    assertThat(huge.stddev()).isNaN();
  }

  // By hand: {1, 4} has mean 2.5 and s^2 = ((1.5)^2 + (1.5)^2) / 1 = 4.5, both exact in doubles,
  // so s is the correctly rounded square root of 4.5.
  @Test
  void twoValues() {
    ScaledMoments oneThenFour = part(new double[] {1.0, 4.0}, 0, 2);
    ScaledMoments merged = part(new double[] {4.0}, 0, 1).merge(part(new double[] {1.0}, 0, 1));
    for (ScaledMoments m : List.of(oneThenFour, merged)) {
      assertThat(m.count()).isEqualTo(2);
      assertThat(m.mean()).isEqualTo(2.5);
      assertThat(m.stddev()).isEqualTo(Math.sqrt(4.5));
      assertThat(m.min()).isEqualTo(1.0);
      assertThat(m.max()).isEqualTo(4.0);
    }
  }

  @Test
  void allEqualValuesHaveExactlyZeroSpreadHoweverSplit() {
    for (double v : new double[] {0.1, -3e-200, 1e300, -MAX}) {
      double[] x = new double[1000];
      Arrays.fill(x, v);
      List<ScaledMoments> results = new ArrayList<>(List.of(part(x, 0, x.length)));
      for (Function<List<ScaledMoments>, ScaledMoments> order : mergeOrders()) {
        results.add(order.apply(parts(x, 1, 333, 500, 999)));
      }
      for (ScaledMoments m : results) {
        assertThat(m.mean()).isEqualTo(v);
        assertThat(m.stddev()).isZero();
        assertThat(m.min()).isEqualTo(v);
        assertThat(m.max()).isEqualTo(v);
      }
    }
  }

  @Test
  void negativeAndPositiveZeroAreEqualValues() {
    for (double[] x : List.of(new double[] {-0.0, 0.0}, new double[] {0.0, -0.0})) {
      ScaledMoments m = part(x, 0, 2);
      assertThat(m.mean()).isZero();
      assertThat(m.stddev()).isZero();
      assertThat(bits(m.min())).isEqualTo(bits(-0.0));
      assertThat(bits(m.max())).isEqualTo(bits(0.0));
    }
  }

  @Test
  void rejectsNonFiniteValuesNamingThemAndKeepsItsState() {
    ScaledMoments m = part(new double[] {1.0, 2.0}, 0, 2);
    assertThatThrownBy(() -> m.add(Double.NaN)).isInstanceOf(IllegalArgumentException.class)
        .hasMessage("Cannot summarise the non-finite value NaN");
    assertThatThrownBy(() -> m.add(Double.POSITIVE_INFINITY)).isInstanceOf(IllegalArgumentException.class)
        .hasMessage("Cannot summarise the non-finite value Infinity");
    assertThatThrownBy(() -> m.add(Double.NEGATIVE_INFINITY)).isInstanceOf(IllegalArgumentException.class)
        .hasMessage("Cannot summarise the non-finite value -Infinity");
    assertThat(m.count()).isEqualTo(2);
    assertThat(m.scaled()).isFalse();
    assertThat(m.mean()).isEqualTo(1.5);
  }

  // ---- Java serialization

  @Test
  void survivesJavaSerializationInBothStates() throws Exception {
    double[] ordinary = {3.0, -1.0, 8.25};
    double[] large = {1e300, -4e299};
    for (double[] first : List.of(ordinary, large)) {
      ScaledMoments original = part(first, 0, first.length);
      ScaledMoments copy = roundTrip(original);
      assertThat(copy.scaled()).isEqualTo(original.scaled());
      assertThat(copy.count()).isEqualTo(original.count());
      assertThat(bits(copy.mean())).isEqualTo(bits(original.mean()));
      assertThat(bits(copy.stddev())).isEqualTo(bits(original.stddev()));
      assertThat(bits(copy.min())).isEqualTo(bits(original.min()));
      assertThat(bits(copy.max())).isEqualTo(bits(original.max()));
      // Merging continues from the copy exactly as from the original.
      original.merge(part(ordinary, 0, ordinary.length));
      copy.merge(part(ordinary, 0, ordinary.length));
      assertThat(bits(copy.stddev())).isEqualTo(bits(original.stddev()));
    }
  }

  static <T> T roundTrip(T value) throws IOException, ClassNotFoundException {
    ByteArrayOutputStream bytes = new ByteArrayOutputStream();
    try (ObjectOutputStream out = new ObjectOutputStream(bytes)) {
      out.writeObject(value);
    }
    try (ObjectInputStream in = new ObjectInputStream(new ByteArrayInputStream(bytes.toByteArray()))) {
      @SuppressWarnings("unchecked")
      T read = (T) in.readObject();
      return read;
    }
  }

  private static long bits(double v) {
    return Double.doubleToRawLongBits(v);
  }

  private static double maxAbs(double[] values) {
    return Arrays.stream(values).map(Math::abs).max().orElse(0.0);
  }

  @Test
  void blocksOfValuesKeepTheDigitsOfTrendsAndFarValues() {
    // Reference: exact mean and variance in BigDecimal (MathContext.DECIMAL128) of the same
    // values. Cases where summing each block relative to a shift could lose digits: a steady
    // trend (each block far from the first value), and far values opening blocks.
    Random random = new Random(29);
    double[][] cases = new double[3][];
    cases[0] = new double[100_000];
    for (int i = 0; i < cases[0].length; i++) {
      cases[0][i] = 1_000_000.0 + i * 0.25 + random.nextGaussian() * 1e-3;
    }
    cases[1] = new double[10_000];
    for (int i = 0; i < cases[1].length; i++) {
      cases[1][i] = i % 256 == 0 ? 1e9 * (1 + i % 3) : 5.0 + random.nextGaussian();
    }
    cases[2] = new double[1_000];
    for (int i = 0; i < cases[2].length; i++) {
      cases[2][i] = 1e-3 * random.nextGaussian() + 7.0;
    }
    for (double[] values : cases) {
      ScaledMoments m = new ScaledMoments();
      for (double v : values) {
        m.add(v);
      }
      MathContext mc = MathContext.DECIMAL128;
      BigDecimal sum = BigDecimal.ZERO;
      for (double v : values) {
        sum = sum.add(new BigDecimal(v), mc);
      }
      BigDecimal mean = sum.divide(BigDecimal.valueOf(values.length), mc);
      BigDecimal ss = BigDecimal.ZERO;
      for (double v : values) {
        BigDecimal d = new BigDecimal(v).subtract(mean, mc);
        ss = ss.add(d.multiply(d, mc), mc);
      }
      double sd = Math.sqrt(ss.divide(BigDecimal.valueOf(values.length - 1), mc).doubleValue());
      assertThat(m.mean()).isCloseTo(mean.doubleValue(), within(1e-14 * Math.abs(mean.doubleValue())));
      assertThat(m.stddev()).isCloseTo(sd, within(1e-12 * sd));
    }
  }

  @Test
  void valuesAddedAtOnceGiveTheSameStateBitForBitAsOneAtATime() {
    // Not an outside reference: addAll must be add in a loop (the tests above check add against
    // Commons Math). Slices cross the 256-value blocks; the huge sample switches to the scaled
    // state part-way, and a value of 2^600 arrives inside a slice.
    for (double[] x : randomSamples()) {
      double[] data = x.clone();
      data[7_000] = 0x1p600;
      data[7_001] = -0.0;
      ScaledMoments one = new ScaledMoments();
      ScaledMoments all = new ScaledMoments();
      int[] cuts = {0, 1, 255, 256, 700, 6_999, 7_002, 7_003, 19_000, data.length};
      for (int c = 0; c + 1 < cuts.length; c++) {
        for (int i = cuts[c]; i < cuts[c + 1]; i++) {
          one.add(data[i]);
        }
        all.addAll(data, cuts[c], cuts[c + 1]);
        assertThat(all.count()).isEqualTo(one.count());
      }
      // Read only at the end: reading folds the open block, and slices must start inside one.
      assertThat(bits(all)).containsExactly(bits(one));
    }
    ScaledMoments partial = new ScaledMoments();
    assertThatThrownBy(() -> partial.addAll(new double[] {1.0, 2.0, Double.NaN, 4.0}, 0, 4))
        .hasMessage("Cannot summarise the non-finite value NaN");
    assertThat(partial.count()).isEqualTo(2);
    assertThat(partial.mean()).isEqualTo(1.5);
  }

  private static long[] bits(ScaledMoments m) {
    return new long[] {Double.doubleToRawLongBits(m.mean()), Double.doubleToRawLongBits(m.stddev()),
        Double.doubleToRawLongBits(m.min()), Double.doubleToRawLongBits(m.max())};
  }
}
