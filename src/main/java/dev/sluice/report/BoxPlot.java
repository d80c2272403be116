package dev.sluice.report;

import static dev.sluice.report.Html.esc;
import static dev.sluice.report.Html.num;
import static dev.sluice.report.Html.xy;

import java.util.List;

/**
 * A box-and-whisker figure drawn from profile figures, not from the rows: the box spans Q1 to Q3
 * with a line at the median; the whiskers reach the fences, or the data's extremes where those
 * lie inside the fences; values beyond the fences are shown as their count and the extreme value.
 *
 * @param label the row's text label, shown beside it (colour is never the only cue)
 * @param low the lower whisker's end
 * @param high the upper whisker's end
 * @param below values beyond the lower fence (0 when none or unknown)
 * @param above values beyond the upper fence
 * @param min the smallest value (drawn as a mark when {@code below > 0})
 * @param max the largest value
 */
record BoxPlot(String label, double low, double q1, double median, double q3, double high,
    long below, long above, double min, double max) {

  /** Whiskers at the fences or at the extremes, whichever is nearer the box. */
  static BoxPlot of(String label, double min, double q1, double median, double q3, double max,
      Double fenceLow, Double fenceHigh, long below, long above) {
    double low = fenceLow == null ? min : Math.max(min, fenceLow);
    double high = fenceHigh == null ? max : Math.min(max, fenceHigh);
    return new BoxPlot(label, low, q1, median, q3, high, below, above, min, max);
  }

  boolean drawable() {
    return !Double.isNaN(q1) && !Double.isNaN(q3) && !Double.isNaN(median)
        && !Double.isNaN(low) && !Double.isNaN(high);
  }

  /**
   * A linear map from values to x pixels over [from, to] onto [x0, x1]; values outside the domain
   * are pinned to its edge (and marked so by the caller).
   */
  record Scale(double from, double to, double x0, double x1) {
    double x(double v) {
      double c = Math.max(from, Math.min(to, v));
      return x0 + (c - from) / (to - from) * (x1 - x0);
    }

    boolean inside(double v) {
      return v >= from && v <= to;
    }

    /**
     * The domain that shows every box and whisker of {@code plots}, padded by 8 % each side for
     * the marks beyond the whiskers; a single value gets a unit-wide domain around it.
     */
    static Scale covering(List<BoxPlot> plots, double x0, double x1) {
      double lo = Double.POSITIVE_INFINITY;
      double hi = Double.NEGATIVE_INFINITY;
      for (BoxPlot p : plots) {
        if (p.drawable()) {
          lo = Math.min(lo, p.low);
          hi = Math.max(hi, p.high);
        }
      }
      if (lo > hi) {
        return new Scale(0, 1, x0, x1);
      }
      double span = hi - lo;
      double pad = span > 0 ? 0.08 * span : Math.max(0.5, 0.1 * Math.abs(lo));
      return new Scale(lo - pad, hi + pad, x0, x1);
    }
  }

  /** Height of one box, in pixels. */
  static final int BOX = 16;

  /** This figure as SVG elements centred on the line {@code y}, in CSS class {@code css}. */
  String svg(Scale s, double y, String css) {
    StringBuilder b = new StringBuilder();
    double top = y - BOX / 2.0;
    b.append("<g class=\"").append(css).append("\">");
    b.append("<text class=\"rowlabel\" x=\"4\" y=\"").append(xy(y + 4)).append("\">").append(esc(label))
        .append("</text>");
    if (!drawable()) {
      String why = Double.isNaN(min) ? "no values" : "quartiles not computed (values from "
          + num(min) + " to " + num(max) + ")";
      b.append("<text x=\"").append(xy(s.x0())).append("\" y=\"").append(xy(y + 4))
          .append("\">").append(esc(why)).append("</text></g>");
      return b.toString();
    }
    line(b, s.x(low), y, s.x(q1), y, "whisker");
    line(b, s.x(q3), y, s.x(high), y, "whisker");
    line(b, s.x(low), top + 3, s.x(low), top + BOX - 3, "whisker");
    line(b, s.x(high), top + 3, s.x(high), top + BOX - 3, "whisker");
    b.append("<rect class=\"box\" x=\"").append(xy(s.x(q1))).append("\" y=\"").append(xy(top))
        .append("\" width=\"").append(xy(Math.max(1, s.x(q3) - s.x(q1)))).append("\" height=\"")
        .append(BOX).append("\"><title>Q1 ").append(num(q1)).append(", median ").append(num(median))
        .append(", Q3 ").append(num(q3)).append("</title></rect>");
    line(b, s.x(median), top, s.x(median), top + BOX, "median");
    if (below > 0) {
      beyond(b, s, min, y, below, true);
    }
    if (above > 0) {
      beyond(b, s, max, y, above, false);
    }
    b.append("</g>");
    return b.toString();
  }

  /** The extreme beyond a fence: a mark at it (pinned to the edge if off the scale) and a count. */
  private static void beyond(StringBuilder b, Scale s, double extreme, double y, long count, boolean lowSide) {
    double x = s.x(extreme);
    b.append("<circle class=\"beyond\" cx=\"").append(xy(x)).append("\" cy=\"").append(xy(y))
        .append("\" r=\"3.5\"><title>").append(lowSide ? "smallest " : "largest ").append(num(extreme))
        .append("</title></circle>");
    String text = count + (lowSide ? " below" : " above") + (s.inside(extreme) ? "" : " (to " + num(extreme) + ")");
    b.append("<text class=\"count\" x=\"").append(xy(lowSide ? x + 6 : x - 6)).append("\" y=\"")
        .append(xy(y - BOX / 2.0 - 2)).append("\" text-anchor=\"").append(lowSide ? "start" : "end")
        .append("\">").append(esc(text)).append("</text>");
  }

  private static void line(StringBuilder b, double x1, double y1, double x2, double y2, String css) {
    b.append("<line class=\"").append(css).append("\" x1=\"").append(xy(x1)).append("\" y1=\"")
        .append(xy(y1)).append("\" x2=\"").append(xy(x2)).append("\" y2=\"").append(xy(y2)).append("\"/>");
  }
}
