package dev.sluice.treat;

import dev.sluice.config.ColumnSettings;
import dev.sluice.config.Settings;
import dev.sluice.plan.OutlierPlan;
import dev.sluice.plan.TreatedStats;
import dev.sluice.profile.ColumnProfile;
import dev.sluice.profile.PassOneShare;
import dev.sluice.profile.TableProfile;
import dev.sluice.stats.CoMoments;
import dev.sluice.stats.NumericSteps;
import dev.sluice.stats.OrderWindows;
import dev.sluice.stats.Quantiles;
import dev.sluice.stats.RankSearch;
import dev.sluice.stats.ScaledMoments;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.OptionalDouble;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The statistics of the treated values from what pass 1 gathered, now that the outlier limits are
 * known, when every figure can be read off exactly; empty otherwise, and pass 2 runs.
 *
 * <p>A figure can be read off when each limit lies inside a window of its column's first pass that
 * kept its values: the counts below the limit are then exact, and so are the moments after the
 * outlier step (the regions below the lower limit's window hold values surely below it, each
 * becoming the limit when capped, those above the upper limit's window likewise, and the values of
 * the two windows themselves are treated one by one). The quartiles after capping follow from the
 * order statistics; after removal, from the order statistics at ranks shifted by the values
 * removed below, when pass 1's windows hold them. The co-moments were kept with capped entries as
 * constants; the rows held back because a value fell inside a band are added now.
 */
final class PassOneFinish {
  private static final Logger LOG = LoggerFactory.getLogger(PassOneFinish.class);

  private PassOneFinish() {}

  /** Empty, with the reason pass 2 must run in the log. */
  private static <T> Optional<T> cannot(String why) {
    LOG.info("Pass 2 runs: {}", why);
    return Optional.empty();
  }

  static Optional<TreatedStats> of(TableProfile profile, Map<String, OutlierPlan> outliers, Settings settings) {
    PassOneShare share = profile.share();
    if (share == null) {
      return Optional.empty();
    }
    if (share.overflowed()) {
      return cannot("more rows had a value near an outlier limit than pass 1 could keep");
    }
    Map<String, TreatedStats.ColumnStats> stats = new LinkedHashMap<>();
    for (ColumnProfile c : profile.columns()) {
      if (!c.treated()) {
        continue;
      }
      Optional<TreatedStats.ColumnStats> s = column(c, profile, share, outliers.get(c.name()), settings);
      if (s.isEmpty()) {
        return Optional.empty();
      }
      stats.put(c.name(), s.get());
    }
    List<String> names = new ArrayList<>();
    for (String name : share.corrColumns()) {
      if (profile.column(name).orElseThrow().usable() > 0) {
        names.add(name);
      }
    }
    boolean correlate = settings.collinearity().enabled() && names.size() >= 2
        && names.size() <= settings.collinearity().maxColumns();
    if (!correlate) {
      return Optional.of(new TreatedStats(stats, List.of(), null));
    }
    if (share.comoments() == null) {
      return cannot("pass 1 did not gather co-moments");
    }
    Optional<CoMoments> comoments = comoments(profile, share, outliers, settings, names);
    comoments.ifPresent(m -> LOG.info("Pass 1 gave the treated statistics; {} rows near a limit were"
        + " kept aside and added now", share.aside().count()));
    return comoments.map(m -> new TreatedStats(stats, List.copyOf(names), m));
  }

  private static Optional<TreatedStats.ColumnStats> column(ColumnProfile c, TableProfile profile,
      PassOneShare share, OutlierPlan o, Settings settings) {
    int j = share.measured().indexOf(c.name());
    OrderWindows w = share.windows()[j];
    ColumnSettings cs = settings.column(c.name());
    NumericSteps steps = o.steps(cs);
    long usable = c.usable();
    long[] beyond = new long[6];
    Double[] limits = {o.innerLower(), o.innerUpper(), o.outerLower(), o.outerUpper(), o.lower(), o.upper()};
    for (int i = 0; i < 6; i++) {
      if (limits[i] == null) {
        continue;
      }
      long below = w.countBelow(limits[i], i % 2 == 1);
      if (below < 0) {
        return cannot("limit " + limits[i] + " of column " + c.name() + " is outside pass 1's windows");
      }
      beyond[i] = i % 2 == 0 ? below : usable - below;
    }
    ScaledMoments m = treatedMoments(w, share.regionMoments()[j], steps, o);
    if (m == null) {
      return cannot("an outlier limit of column " + c.name() + " is outside pass 1's windows");
    }
    double[] q = {Double.NaN, Double.NaN, Double.NaN};
    if (cs.usesTreatedQuartiles() && m.count() > 0) {
      RankSearch search = profile.quartiles().get(c.name());
      if (steps.removes()) {
        Optional<double[]> shifted = afterRemoval(w, search, o.lower() == null ? 0 : beyond[4], m.count());
        if (shifted.isEmpty()) {
          return cannot("the quartiles of column " + c.name() + " after removal are outside pass 1's windows");
        }
        q = shifted.get();
      } else {
        q = profile.quartilesKeepingOrder(c.name(), steps).orElseThrow();
      }
    }
    return Optional.of(new TreatedStats.ColumnStats(m.count(), m.mean(), m.stddev(), m.min(), m.max(),
        q[0], q[1], q[2], Double.NaN, beyond[0], beyond[1], beyond[2], beyond[3], beyond[4], beyond[5]));
  }

  /**
   * Moments of the values after the outlier step: whole regions where every value is treated
   * alike, and one by one the values of the windows holding a limit. Null when a limit is not
   * inside a window whose values were kept.
   */
  static ScaledMoments treatedMoments(OrderWindows w, ScaledMoments[] regions,
      NumericSteps steps, OutlierPlan o) {
    boolean changes = steps.removes() || o.action().equals("cap");
    if (!changes || !o.active()) {
      ScaledMoments all = new ScaledMoments();
      for (ScaledMoments r : regions) {
        all.merge(r);
      }
      return all;
    }
    int lowRegion = o.lower() == null ? -1 : w.regionOf(o.lower());
    int highRegion = o.upper() == null ? regions.length : w.regionOf(o.upper());
    for (int r : new int[] {lowRegion, highRegion}) {
      if (r >= 0 && r < regions.length && (r % 2 == 0 || !held(w, (r - 1) / 2))) {
        return null;
      }
    }
    ScaledMoments out = new ScaledMoments();
    for (int r = 0; r < regions.length; r++) {
      if (r == lowRegion || r == highRegion) {
        for (double v : w.heldValues((r - 1) / 2)) {
          double t = steps.afterOutliers(v);
          if (!Double.isNaN(t)) {
            out.add(t);
          }
        }
      } else if (r < lowRegion) {
        if (!steps.removes()) {
          out.addCopies(o.lower(), regions[r].count());
        }
      } else if (r > highRegion) {
        if (!steps.removes()) {
          out.addCopies(o.upper(), regions[r].count());
        }
      } else {
        out.merge(regions[r]);
      }
    }
    return out;
  }

  /** A window that kept its values (a single-key window has none to treat one by one). */
  private static boolean held(OrderWindows w, int window) {
    return w.resolved(window) && !w.singleKey(window);
  }

  /**
   * Type 7 quartiles of the values left after removal: the kept values are the order statistics
   * from rank removedBelow + 1 on, so their quartiles are order statistics at shifted ranks.
   */
  static Optional<double[]> afterRemoval(OrderWindows first, RankSearch search,
      long removedBelow, long kept) {
    return afterRemoval(first, search, removedBelow, kept, new double[] {0.25, 0.5, 0.75});
  }

  /** As {@link #afterRemoval(OrderWindows, RankSearch, long, long)}, the type 7 quantiles at {@code ps}. */
  static Optional<double[]> afterRemoval(OrderWindows first, RankSearch search,
      long removedBelow, long kept, double[] ps) {
    double[] out = new double[ps.length];
    for (int i = 0; i < ps.length; i++) {
      double h = (kept - 1) * ps[i];
      long below = (long) Math.floor(h);
      OptionalDouble a = orderStatistic(first, search, removedBelow + below + 1);
      if (a.isEmpty()) {
        return Optional.empty();
      }
      double fraction = h - below;
      if (below + 1 >= kept || fraction == 0.0) {
        out[i] = a.getAsDouble();
        continue;
      }
      OptionalDouble b = orderStatistic(first, search, removedBelow + below + 2);
      if (b.isEmpty()) {
        return Optional.empty();
      }
      out[i] = Quantiles.between(a.getAsDouble(), b.getAsDouble(), fraction);
    }
    return Optional.of(out);
  }

  /** From pass 1's windows (which also cover where these ranks were expected) or the search's last. */
  private static OptionalDouble orderStatistic(OrderWindows first, RankSearch search, long rank) {
    OptionalDouble v = first.orderStatistic(rank);
    return v.isPresent() ? v : search.orderStatistic(rank);
  }

  /**
   * The co-moments of the analysed columns: pass 1's, with the rows it kept aside treated now
   * (where pass 1 left them); empty when the plan's outlier step is not what pass 1 assumed or a
   * column's scale for very large values turned out different from the pilot's.
   */
  private static Optional<CoMoments> comoments(TableProfile profile, PassOneShare share,
      Map<String, OutlierPlan> outliers, Settings settings, List<String> names) {
    List<String> all = share.corrColumns();
    CoMoments m = share.comoments().emptyCopy().merge(share.comoments());
    NumericSteps[] steps = new NumericSteps[all.size()];
    for (int s = 0; s < all.size(); s++) {
      steps[s] = outliers.get(all.get(s)).steps(settings.column(all.get(s)));
    }
    for (int s = 0; s < all.size(); s++) {
      if (!agrees(share.actions()[s], share.bands()[s], outliers.get(all.get(s)))) {
        return cannot("the outlier step of column " + all.get(s) + " is not what pass 1 assumed");
      }
    }
    int[] keep = new int[names.size()];
    for (int i = 0; i < keep.length; i++) {
      keep[i] = all.indexOf(names.get(i));
      double expected = profile.column(names.get(i)).orElseThrow().momentScale();
      if (m.scale(keep[i]) != expected) {
        return cannot("column " + names.get(i) + " holds larger values than its pilot");
      }
    }
    // One small job over the rows pass 1 kept aside, where they are.
    m.merge(share.aside().treated(steps, share.comoments().emptyCopy()));
    return Optional.of(m.subset(keep));
  }

  /**
   * True when the plan's outlier step does to each value what pass 1 assumed: the same action, and
   * each limit inside the band pass 1 set aside for it (values below the lower band beyond the
   * limit, values between the bands within it), or no limit where pass 1 assumed none.
   */
  static boolean agrees(NumericSteps.Action assumed, double[] band, OutlierPlan o) {
    NumericSteps.Action actual = o.active() ? o.stepAction() : NumericSteps.Action.LEAVE;
    if (actual != assumed) {
      return false;
    }
    if (assumed == NumericSteps.Action.LEAVE) {
      return true;
    }
    return inBand(o.lower(), band[0], band[1]) && inBand(o.upper(), band[2], band[3]);
  }

  /** A limit inside [low, high], or no limit where the band is infinite (none assumed). */
  private static boolean inBand(Double limit, double low, double high) {
    if (Double.isInfinite(low)) {
      return limit == null;
    }
    return limit != null && low <= limit && limit <= high;
  }
}
