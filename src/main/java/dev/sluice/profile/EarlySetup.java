package dev.sluice.profile;

import dev.sluice.config.ColumnSettings;
import dev.sluice.config.Direction;
import dev.sluice.config.ImputeStrategy;
import dev.sluice.config.OutlierMethod;
import dev.sluice.config.OutlierSettings;
import dev.sluice.config.Role;
import dev.sluice.config.Settings;
import dev.sluice.stats.CoMoments;
import dev.sluice.stats.Fences;
import dev.sluice.stats.NumericSteps;
import dev.sluice.stats.PowerScale;
import dev.sluice.stats.RankSearch;
import java.util.ArrayList;
import java.util.List;

/**
 * Decides, before pass 1, whether it can take on pass 2's work, and with which bands of values.
 *
 * <p>It can when the table is large enough to have a pilot, every treated column uses Tukey's
 * fences (or no outlier method) and no mode imputation (which needs every treated value's count),
 * and the pilot brackets each column's quartiles tightly enough that the IQR is surely positive.
 * The bands then follow from the brackets ({@link Fences#tukeyRange}): where each inner and outer
 * fence can fall. Pass 1's windows cover them, so that counts beyond any fence inside them are
 * exact; the values between the inner bands are surely left as they are. The brackets here are
 * the pilot's tightest (six standard errors of a sample quantile), and the bands must be expected
 * to hold no more than half a window's budget of values, so the extra windows stay small. The
 * rows the pilot shows with a value inside an inner band, scaled to one partition, must be
 * expected to fill at most 80 % of what a partition may keep aside; on wide tables most rows have
 * some value near a fence, and pass 2 runs then.
 */
final class EarlySetup {
  /** Pilot values a column needs for its brackets to be trusted with the bands. */
  static final int MIN_PILOT = 100;
  /**
   * The share of the rows that may be kept aside that the pilot may predict: its count of such
   * rows (thousands on a 200,000-row pilot) has a relative standard error of a few per cent.
   */
  static final double ASIDE_SHARE = 0.8;
  /** The share of one window's budget that a column's four bands may be expected to fill. */
  static final double BAND_SHARE = 0.5;

  /** Per measured column, the ranges of values its windows must also cover. */
  final List<List<double[]>> cover;
  /** The co-moment share for the sampled columns, or null when there is no analysis. */
  final EarlyTreatment treatment;

  private EarlySetup(List<List<double[]>> cover, EarlyTreatment treatment) {
    this.cover = cover;
    this.treatment = treatment;
  }

  /** The setup, or null when pass 1 cannot take on pass 2's work for this table and settings. */
  static EarlySetup of(Settings settings, ProfileLayout layout, NumericSteps[] validity,
      double[][] pilot, double[][] sortedUsable, long rows, int partitions, int[] sampled,
      int perWindow) {
    int[] measured = layout.measuredAt;
    List<List<double[]>> cover = new ArrayList<>();
    double[][][] inner = new double[measured.length][][];
    double[] centre = new double[measured.length];
    double[] scale = new double[measured.length];
    for (int j = 0; j < measured.length; j++) {
      cover.add(List.of());
      Role role = layout.roles[measured[j]];
      if (role != Role.TREAT && role != Role.REQUIRED) {
        continue;
      }
      double[] usable = sortedUsable[j];
      ColumnSettings cs = settings.column(layout.names[measured[j]]);
      long expected = Profiler.expected(rows, usable.length, pilot[0].length);
      double[] in = innerBands(cs, usable, expected);
      List<double[]> bands = in == null ? null : bands(cs, usable, in, expected);
      if (bands == null || expectedHeld(usable, bands, expected) > BAND_SHARE * perWindow) {
        return null;
      }
      cover.set(j, bands);
      inner[j] = new double[][] {{in[0], in[1]}, {in[2], in[3]}};
      centre[j] = usable[usable.length / 2];
      scale[j] = PowerScale.forMagnitude(Math.max(Math.abs(usable[0]), Math.abs(usable[usable.length - 1])));
    }
    EarlyTreatment treatment = sampled.length >= 2
        ? treatment(settings, layout, validity, sampled, inner, centre, scale) : null;
    if (treatment != null && expectedAside(treatment, pilot, sampled, rows) / Math.max(1, partitions)
        > ASIDE_SHARE * treatment.limit()) {
      // Too many rows would be kept aside (many columns, or wide bands): pass 1 would do the
      // co-moments for nothing and pass 2 again.
      return null;
    }
    return new EarlySetup(cover, treatment);
  }

  /** The bands of the column's inner fences, or null when its settings or pilot allow none. */
  private static double[] innerBands(ColumnSettings cs, double[] usable, long expected) {
    OutlierMethod method = cs.outliers().method();
    boolean methodOk = method == OutlierMethod.IQR || method == OutlierMethod.NONE;
    if (!methodOk || cs.missing().strategy() == ImputeStrategy.MODE || usable.length < MIN_PILOT) {
      return null;
    }
    return fenceBands(usable, cs.outliers().iqrK(), expected);
  }

  /**
   * {lowerMin, lowerMax, upperMin, upperMax}: where the Tukey fences with multiplier k can fall
   * while the quartiles lie in the pilot's tightest brackets (no widening for memory); null when a
   * bracket is unbounded or the IQR could be zero.
   */
  private static double[] fenceBands(double[] usable, double k, long expected) {
    double[] q1 = RankSearch.bracket(usable, 0.25, expected, 1);
    double[] q3 = RankSearch.bracket(usable, 0.75, expected, 1);
    if (!Double.isFinite(q1[0]) || !Double.isFinite(q3[1]) || !(q1[1] < q3[0])) {
      return null;
    }
    double[] r = Fences.tukeyRange(q1[0], q1[1], q3[0], q3[1], k);
    return Double.isFinite(r[0]) && Double.isFinite(r[3]) ? r : null;
  }

  /**
   * The ranges pass 1's windows must also cover: the inner and outer fence bands, and where the
   * quartiles after removal can lie when the action removes values and they are needed; null when
   * a range is unbounded.
   */
  private static List<double[]> bands(ColumnSettings cs, double[] usable, double[] in, long expected) {
    double[] out = fenceBands(usable, cs.outliers().outerK(), expected);
    if (out == null) {
      return null;
    }
    List<double[]> bands = new ArrayList<>(List.of(new double[] {in[0], in[1]},
        new double[] {in[2], in[3]}, new double[] {out[0], out[1]}, new double[] {out[2], out[3]}));
    boolean removes = assumedAction(cs.outliers()) == NumericSteps.Action.REMOVE;
    if (removes && cs.usesTreatedQuartiles()) {
      List<double[]> shifted = afterRemoval(usable, in, cs.outliers().direction(), expected);
      if (shifted == null) {
        return null;
      }
      bands.addAll(shifted);
    }
    return bands;
  }

  /** The rows the treatment is expected to keep aside, scaled up from the pilot's rows. */
  static double expectedAside(EarlyTreatment treatment, double[][] pilot, int[] sampled, long rows) {
    int m = pilot[0].length;
    double[] raw = new double[sampled.length];
    long aside = 0;
    for (int r = 0; r < m; r++) {
      for (int s = 0; s < sampled.length; s++) {
        raw[s] = pilot[sampled[s]][r];
      }
      if (treatment.inBand(raw)) {
        aside++;
      }
    }
    return (aside + 1.0) * rows / m;
  }

  /**
   * Where the quartiles of the values kept after removal can lie. With shares fb and fa of the
   * values removed below and above, the kept values' quantile p is the whole column's quantile at
   * fb + p (1 - fb - fa); the pilot bounds fb and fa by the values below and inside the bands,
   * widened by six standard errors of a share, and brackets the quantile at each end.
   */
  private static List<double[]> afterRemoval(double[] usable, double[] in, Direction direction,
      long expected) {
    double m = usable.length;
    double fbMin = direction.lowSide() ? lowerBound(usable, in[0]) / m : 0;
    double fbMax = direction.lowSide() ? lowerBound(usable, Math.nextUp(in[1])) / m : 0;
    double faMin = direction.highSide() ? (m - lowerBound(usable, Math.nextUp(in[3]))) / m : 0;
    double faMax = direction.highSide() ? (m - lowerBound(usable, in[2])) / m : 0;
    double margin = RankSearch.BRACKET_ERRORS * Math.sqrt(Math.max(fbMax, faMax) / m) + 2.0 / m;
    List<double[]> out = new ArrayList<>();
    for (double p : new double[] {0.25, 0.5, 0.75}) {
      double from = p + fbMin * (1 - p) - faMax * p - margin;
      double to = p + fbMax * (1 - p) - faMin * p + margin;
      double low = RankSearch.bracket(usable, Math.max(from, 0.0), expected, 1)[0];
      double high = RankSearch.bracket(usable, Math.min(to, 1.0), expected, 1)[1];
      if (!Double.isFinite(low) || !Double.isFinite(high)) {
        return null;
      }
      out.add(new double[] {low, high});
    }
    return out;
  }

  /** The values the bands are expected to hold, scaled up from the pilot (with one to spare each). */
  static double expectedHeld(double[] sortedPilot, List<double[]> bands, long expected) {
    double held = 0;
    for (double[] b : bands) {
      int from = lowerBound(sortedPilot, b[0]);
      int to = lowerBound(sortedPilot, Math.nextUp(b[1]));
      held += (to - from + 1.0) * expected / sortedPilot.length;
    }
    return held;
  }

  /** The first index whose value is at least x. */
  static int lowerBound(double[] sorted, double x) {
    int lo = 0;
    int hi = sorted.length;
    while (lo < hi) {
      int mid = (lo + hi) >>> 1;
      if (sorted[mid] < x) {
        lo = mid + 1;
      } else {
        hi = mid;
      }
    }
    return lo;
  }

  /** What the column's outlier step will do to a value beyond its limit, by its settings. */
  private static NumericSteps.Action assumedAction(OutlierSettings o) {
    if (o.method() == OutlierMethod.NONE) {
      return NumericSteps.Action.LEAVE;
    }
    return switch (o.action()) {
      case CAP -> NumericSteps.Action.CAP;
      case SET_MISSING, QUARANTINE -> NumericSteps.Action.REMOVE;
      default -> NumericSteps.Action.LEAVE;
    };
  }

  private static EarlyTreatment treatment(Settings settings, ProfileLayout layout,
      NumericSteps[] validity, int[] sampled, double[][][] inner, double[] centre, double[] scale) {
    int p = sampled.length;
    NumericSteps[] v = new NumericSteps[p];
    NumericSteps.Action[] mode = new NumericSteps.Action[p];
    double[][] low = new double[p][];
    double[][] high = new double[p][];
    double[] c = new double[p];
    double[] f = new double[p];
    for (int s = 0; s < p; s++) {
      int j = sampled[s];
      OutlierSettings o = settings.column(layout.names[layout.measuredAt[j]]).outliers();
      v[s] = validity[j];
      c[s] = centre[j];
      f[s] = scale[j];
      mode[s] = assumedAction(o);
      if (mode[s] != NumericSteps.Action.LEAVE) {
        low[s] = o.direction().lowSide() ? inner[j][0] : null;
        high[s] = o.direction().highSide() ? inner[j][1] : null;
      }
    }
    // Rows one partition keeps aside hold at most half the pass's value budget.
    int limit = Math.max(1_000, settings.quantiles().maxHeldValues() / (2 * p));
    return new EarlyTreatment(v, mode, low, high, new CoMoments(c, f), limit);
  }
}
