package dev.sluice.plan;

import dev.sluice.config.ColumnSettings;
import dev.sluice.config.OutlierSettings;
import dev.sluice.profile.ColumnProfile;
import dev.sluice.stats.Fences;
import dev.sluice.stats.Published;
import java.util.Locale;

/**
 * Chooses each treated column's outlier limits from its pass-1 profile.
 *
 * <p>Edge-case policy: a column without usable values, or whose spread for the chosen method is
 * zero (IQR, standard deviation or MAD), gets no limits, because with zero spread every value
 * other than the centre would count as an outlier. The Tukey fences are still reported.
 */
final class OutlierPlanner {
  private OutlierPlanner() {}

  static OutlierPlan plan(ColumnProfile c, ColumnSettings s) {
    OutlierSettings o = s.outliers();
    String method = lower(o.method().name());
    if (!c.treated()) {
      return OutlierPlan.none("role " + lower(c.role().name()) + ": not treated");
    }
    if (c.usable() == 0) {
      return OutlierPlan.none("no usable values");
    }
    Fences inner = Fences.tukey(c.q1(), c.q3(), o.iqrK());
    Fences outer = Fences.tukey(c.q1(), c.q3(), o.outerK());
    Fences chosen;
    String why;
    switch (o.method()) {
      case IQR:
        chosen = c.iqr() > 0 ? inner : null;
        why = chosen == null ? "IQR is zero" : "Tukey fences with k = " + o.iqrK();
        break;
      case ZSCORE:
        boolean sdOk = c.stddev() > 0 && Double.isFinite(c.stddev());
        chosen = sdOk ? Fences.zScore(c.mean(), c.stddev(), o.zLimit()) : null;
        why = chosen == null ? "standard deviation is zero or undefined" : "|z| > " + o.zLimit();
        break;
      case MAD:
        boolean madOk = c.mad() > 0 && Double.isFinite(c.mad());
        chosen = madOk ? Fences.modifiedZ(c.median(), c.mad(), o.madLimit()) : null;
        why = chosen == null ? "MAD is zero or undefined" : "|modified z| > " + o.madLimit();
        break;
      default:
        chosen = null;
        why = "outlier method none";
    }
    if (chosen != null) {
      chosen = chosen.sides(o.direction().lowSide(), o.direction().highSide());
    }
    return new OutlierPlan(
        method,
        lower(o.direction().name()),
        chosen == null ? "keep" : kebab(o.action().name()),
        chosen == null ? null : finiteOrNull(chosen.lower()),
        chosen == null ? null : finiteOrNull(chosen.upper()),
        finiteOrNull(inner.lower()), finiteOrNull(inner.upper()),
        finiteOrNull(outer.lower()), finiteOrNull(outer.upper()),
        chosen == null ? why + ": no limits applied" : why + sideNote(o));
  }

  private static String sideNote(OutlierSettings o) {
    switch (o.direction()) {
      case LOW:
        return ", low side only";
      case HIGH:
        return ", high side only";
      default:
        return "";
    }
  }

  /** A finite limit at published precision; null for an infinite (absent) one. */
  static Double finiteOrNull(double x) {
    return Double.isFinite(x) ? Published.round(x) : null;
  }

  static String lower(String enumName) {
    return enumName.toLowerCase(Locale.ROOT);
  }

  static String kebab(String enumName) {
    return lower(enumName).replace('_', '-');
  }
}
