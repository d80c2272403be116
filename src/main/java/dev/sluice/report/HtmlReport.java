package dev.sluice.report;

import static dev.sluice.report.Html.esc;
import static dev.sluice.report.Html.num;
import static dev.sluice.report.Html.pct;
import static dev.sluice.report.Html.xy;

import dev.sluice.config.Settings;
import dev.sluice.plan.CollinearityFindings;
import dev.sluice.plan.ColumnPlan;
import dev.sluice.plan.OutlierPlan;
import dev.sluice.plan.Plan;
import dev.sluice.plan.PlanText;
import dev.sluice.plan.TreatedStats;
import dev.sluice.profile.ColumnProfile;
import dev.sluice.profile.TableProfile;
import dev.sluice.stats.NumericSteps;
import dev.sluice.stats.RowSample;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * report.html: one self-contained page (inline SVG and CSS, no script, nothing fetched) drawn from
 * the run record, the profile, the treated statistics and the plan. No figure here is computed
 * from the rows; the page only shows what the passes measured and what the plan decided.
 *
 * <p>Sections: cautions; the run; one block per numeric column (box plots before and after the
 * outlier step, and the decisions with their reasons); missing values; collinearity.
 */
public final class HtmlReport {
  /** Column blocks are open when there are at most this many; with more, each opens on a click. */
  static final int OPEN_BLOCKS = 30;
  /** The heatmaps show at most this many columns: those most correlated with another one. */
  static final int HEATMAP_COLUMNS = 40;
  /** Values are written in the heatmap's cells up to this many columns. */
  static final int CELL_VALUES = 16;
  /** Width of the figures, in pixels. */
  static final int WIDTH = 720;
  private static final int LABEL = 150;
  /** Height of one row of a bar chart, and where its bars start. */
  private static final int BAR_ROW = 20;
  private static final int BAR_X0 = 220;

  private HtmlReport() {}

  /** Everything the page shows. */
  public record Inputs(Map<String, Object> record, TableProfile profile, Plan plan, TreatedStats stats,
      Settings settings, List<String> changedSettings) {}

  public static String render(Inputs in) {
    StringBuilder b = new StringBuilder(64 * 1024);
    b.append("<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">")
        .append("<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">")
        .append("<title>Sluice report: ").append(esc(path(in.record(), "input", "path"))).append("</title>")
        .append("<style>").append(CSS).append("</style></head><body>\n");
    b.append("<header><h1>Sluice report</h1><p class=\"sub\">").append(esc(in.record().get("command")))
        .append(" of ").append(esc(path(in.record(), "input", "path"))).append(", finished ")
        .append(esc(in.record().get("finished"))).append("</p>")
        .append("<nav><a href=\"#cautions\">Cautions</a> · <a href=\"#run\">Run</a> · ")
        .append("<a href=\"#columns\">Columns</a> · <a href=\"#missing\">Missing values</a> · ")
        .append("<a href=\"#collinearity\">Collinearity</a></nav></header>\n");
    cautions(b);
    run(b, in);
    columns(b, in);
    missing(b, in);
    collinearity(b, in.plan().collinearity());
    b.append("</body></html>\n");
    return b.toString();
  }

  private static void cautions(StringBuilder b) {
    b.append("<section id=\"cautions\"><h2>Cautions</h2><ul>")
        .append("<li><strong>Treated values are for analysis, not a system of record.</strong> Capping ")
        .append("an outlier, filling a gap or dropping a column changes what the data says: a capped ")
        .append("value can hide a real event, and a filled value is an estimate, not a measurement.</li>")
        .append("<li><strong>The raw input was only read, never modified.</strong> Keep it as the record.</li>")
        .append("<li><strong>An outlier is not always an error.</strong> A value beyond a fence may be the ")
        .append("most important row of the table; an impossible value is an incorrect entry, which the ")
        .append("validity bounds handle apart from the fences.</li>")
        .append("<li><strong>Safety-relevant and regulated data need a person.</strong> Decisions on such ")
        .append("data must be reviewed under your local rules and by a qualified person.</li>")
        .append("</ul></section>\n");
  }

  private static void run(StringBuilder b, Inputs in) {
    Map<String, Object> r = in.record();
    b.append("<section id=\"run\"><h2>Run</h2><table class=\"kv\">");
    kv(b, "command", r.get("command"));
    kv(b, "input", path(r, "input", "path") + " (" + path(r, "input", "format") + ")");
    kv(b, "output", r.get("output"));
    if (r.get("where") != null) {
      kv(b, "rows selected by", r.get("where"));
    }
    kv(b, "settings file", r.get("config_file") == null ? "none (defaults)" : r.get("config_file"));
    kv(b, "started", r.get("started"));
    kv(b, "finished", r.get("finished"));
    if (r.get("rows") instanceof Map<?, ?> rows) {
      StringBuilder t = new StringBuilder();
      rows.forEach((k, v) -> t.append(t.length() == 0 ? "" : ", ").append(k).append(" ").append(v));
      kv(b, "rows", t.toString());
      if (rows.containsKey("reconciled")) {
        b.append("<tr><th>reconciled</th><td>").append(Boolean.TRUE.equals(rows.get("reconciled"))
            ? "<span class=\"ok\">yes</span>: every row read is treated or quarantined"
            : "<span class=\"bad\">no</span>").append("</td></tr>");
      }
    }
    if (r.get("gates") instanceof Map<?, ?> g) {
      b.append("<tr><th>gates</th><td>");
      if (g.get("passed") instanceof List<?> passed && !passed.isEmpty()) {
        b.append("<span class=\"bad\">").append(passed.size()).append(" limit(s) passed</span> (exit code 4; ")
            .append(esc(g.get("outcome"))).append("):<ul>");
        for (Object p : passed) {
          b.append("<li>").append(esc(((Map<?, ?>) p).get("message"))).append("</li>");
        }
        b.append("</ul>");
      } else if (g.get("column_limits") instanceof Map<?, ?> limits && limits.isEmpty()
          && g.get("quarantined_share_limit") == null) {
        b.append("no limits set");
      } else {
        b.append("<span class=\"ok\">every limit kept</span>");
      }
      b.append("</td></tr>");
    }
    if (r.get("seconds") instanceof Map<?, ?> seconds) {
      StringBuilder t = new StringBuilder();
      seconds.forEach((k, v) -> t.append(t.length() == 0 ? "" : ", ").append(k).append(" ").append(v).append(" s"));
      kv(b, "passes and their time", t.toString());
    }
    if (r.get("versions") instanceof Map<?, ?> v) {
      kv(b, "versions", "Sluice " + v.get("sluice") + ", Spark " + v.get("spark") + ", Java " + v.get("java"));
    }
    b.append("</table>");
    b.append("<h3>Settings that differ from the defaults</h3>");
    if (in.changedSettings().isEmpty()) {
      b.append("<p>None: every setting has its default.</p>");
    } else {
      b.append("<ul class=\"settings\">");
      for (String s : in.changedSettings()) {
        b.append("<li><code>").append(esc(s)).append("</code></li>");
      }
      b.append("</ul>");
    }
    b.append("</section>\n");
  }

  private static void columns(StringBuilder b, Inputs in) {
    List<ColumnProfile> numeric = in.profile().columns().stream().filter(ColumnProfile::measured).toList();
    b.append("<section id=\"columns\"><h2>Columns</h2>");
    b.append("<p>").append(numeric.size()).append(" numeric column(s). Each figure has its own scale. ")
        .append("<span class=\"key before\">before</span>: the usable values as read; ")
        .append("<span class=\"key after\">after</span>: after the validity and outlier steps, before ")
        .append("filling and scaling. Boxes span Q1 to Q3 with the median marked; whiskers reach the ")
        .append("inner fences or the extremes inside them; counts beyond the fences are written out. ")
        .append("Quartiles after the step are measured when filling or scaling needs them, and follow ")
        .append("exactly from the profile when the step keeps every value in order (capping, flagging); ")
        .append("otherwise the figure says they were not computed.</p>");
    boolean open = numeric.size() <= OPEN_BLOCKS;
    for (ColumnProfile c : numeric) {
      ColumnPlan cp = in.plan().column(c.name()).orElse(null);
      TreatedStats.ColumnStats after = in.stats() == null ? null : in.stats().columns().get(c.name());
      b.append("<details class=\"column\"").append(open ? " open" : "").append("><summary><span class=\"name\">")
          .append(esc(c.name())).append("</span> <span class=\"type\">").append(esc(c.type())).append("</span> ")
          .append(esc(headline(c, cp))).append("</summary>");
      b.append(columnFigure(c, cp, after, in));
      decisions(b, c, cp, after);
      b.append("</details>");
    }
    b.append("</section>\n");
  }

  private static String headline(ColumnProfile c, ColumnPlan cp) {
    if (cp == null || !cp.treated()) {
      return "(profiled, not treated)";
    }
    if (!cp.kept()) {
      return "(dropped: " + cp.dropReason() + ")";
    }
    return "";
  }

  /** The before and after box plots of a column on one scale. */
  static String columnFigure(ColumnProfile c, ColumnPlan cp, TreatedStats.ColumnStats after, Inputs in) {
    OutlierPlan o = cp == null ? null : cp.outliers();
    Double lo = o == null ? null : o.innerLower();
    Double hi = o == null ? null : o.innerUpper();
    long below = after == null ? 0 : after.belowInner();
    long above = after == null ? 0 : after.aboveInner();
    List<BoxPlot> plots = new ArrayList<>();
    plots.add(BoxPlot.of("before", c.min(), c.q1(), c.median(), c.q3(), c.max(), lo, hi, below, above));
    if (after != null && cp != null && cp.treated()) {
      double[] q = afterQuartiles(c, cp, after, in);
      plots.add(BoxPlot.of("after", after.min(), q[0], q[1], q[2], after.max(), lo, hi,
          beyondAfter(o.action(), lo, o.lower(), below, after.belowLimit(), true),
          beyondAfter(o.action(), hi, o.upper(), above, after.aboveLimit(), false)));
    }
    int height = 26 + 40 * plots.size() + 24;
    BoxPlot.Scale s = BoxPlot.Scale.covering(plots, LABEL, WIDTH - 20);
    StringBuilder b = new StringBuilder();
    svgOpen(b, "boxplot", WIDTH, height, "Box plots of " + c.name());
    double y = 34;
    for (BoxPlot p : plots) {
      b.append(p.svg(s, y, p.label()));
      y += 40;
    }
    axis(b, s, y - 8);
    b.append("</svg>");
    return b.toString();
  }

  /**
   * Values beyond an inner fence after the outlier step, from the counts before it: a limit at or
   * inside the fence leaves none beyond it (capped to the limit, or removed); a limit further out
   * (an outer fence) leaves those between the two, plus, when capping, the capped ones at the limit.
   */
  static long beyondAfter(String action, Double fence, Double limit, long beyondFence, long beyondLimit,
      boolean lowSide) {
    if (fence == null || limit == null || action.equals("flag") || action.equals("keep")) {
      return beyondFence;
    }
    boolean atOrInside = lowSide ? limit >= fence : limit <= fence;
    if (atOrInside) {
      return 0;
    }
    return action.equals("cap") ? beyondFence : Math.max(0, beyondFence - beyondLimit);
  }

  /**
   * Quartiles after the outlier step: measured in pass 2 where imputation or scaling needed them;
   * else, when the step keeps every value and its order (capping, flagging, keeping), the pass-1
   * order statistics with the step applied, which is exact; NaN otherwise.
   */
  static double[] afterQuartiles(ColumnProfile c, ColumnPlan cp, TreatedStats.ColumnStats after, Inputs in) {
    if (!Double.isNaN(after.q1())) {
      return new double[] {after.q1(), after.median(), after.q3()};
    }
    NumericSteps steps = cp.outliers().steps(cp.validMin(), cp.validMax());
    return in.profile().quartilesKeepingOrder(c.name(), steps)
        .orElse(new double[] {Double.NaN, Double.NaN, Double.NaN});
  }

  private static void axis(StringBuilder b, BoxPlot.Scale s, double y) {
    b.append("<line class=\"axis\" x1=\"").append(xy(s.x0())).append("\" y1=\"").append(xy(y))
        .append("\" x2=\"").append(xy(s.x1())).append("\" y2=\"").append(xy(y)).append("\"/>");
    for (int i = 0; i <= 4; i++) {
      double v = s.from() + i * (s.to() - s.from()) / 4;
      double x = s.x(v);
      b.append("<line class=\"axis\" x1=\"").append(xy(x)).append("\" y1=\"").append(xy(y))
          .append("\" x2=\"").append(xy(x)).append("\" y2=\"").append(xy(y + 4)).append("\"/>")
          .append("<text class=\"tick\" x=\"").append(xy(x)).append("\" y=\"").append(xy(y + 16))
          .append("\" text-anchor=\"middle\">").append(esc(num(v))).append("</text>");
    }
  }

  private static void decisions(StringBuilder b, ColumnProfile c, ColumnPlan cp, TreatedStats.ColumnStats after) {
    b.append("<table class=\"decisions\"><tr><th>read</th><td>").append(c.rows()).append(" rows: ")
        .append(c.usable()).append(" usable, ").append(c.nulls()).append(" null, ").append(c.nan()).append(" NaN, ")
        .append(c.infinite()).append(" infinite, ").append(c.invalid()).append(" outside the validity bounds")
        .append("</td></tr>");
    b.append("<tr><th>profile</th><td>min ").append(num(c.min())).append(", Q1 ").append(num(c.q1()))
        .append(", median ").append(num(c.median())).append(", Q3 ").append(num(c.q3())).append(", max ")
        .append(num(c.max())).append(", mean ").append(num(c.mean())).append(", standard deviation ")
        .append(num(c.stddev())).append("</td></tr>");
    if (cp == null || !cp.treated()) {
      b.append("</table>");
      return;
    }
    b.append("<tr><th>validity</th><td>").append(esc(PlanText.validity(cp, Html::num))).append("</td></tr>");
    OutlierPlan o = cp.outliers();
    b.append("<tr><th>outliers</th><td>").append(esc(o.method())).append(", ").append(esc(o.direction()))
        .append(", action ").append(esc(o.action()));
    if (o.innerLower() != null || o.innerUpper() != null) {
      b.append("; inner fences ").append(num(o.innerLower())).append(" and ").append(num(o.innerUpper()));
    }
    if (o.outerLower() != null || o.outerUpper() != null) {
      b.append("; outer fences ").append(num(o.outerLower())).append(" and ").append(num(o.outerUpper()));
    }
    if (o.active()) {
      b.append("; limits applied ").append(num(o.lower())).append(" and ").append(num(o.upper()));
      if (after != null) {
        b.append(": ").append(after.belowLimit()).append(" below, ").append(after.aboveLimit()).append(" above");
      }
    }
    b.append(". <span class=\"why\">").append(esc(o.reason())).append("</span></td></tr>");
    b.append("<tr><th>missing values</th><td>");
    if (cp.missing().dropColumn()) {
      b.append("column dropped");
    } else if (cp.missing().fillNumber() != null) {
      b.append(esc(cp.missing().strategy())).append(", filled with ").append(num(cp.missing().fillNumber()));
      if (after != null) {
        b.append(" in ").append(c.rows() - after.present()).append(" row(s)");
      }
    } else {
      b.append(esc(cp.missing().strategy()));
    }
    b.append(". <span class=\"why\">").append(esc(cp.missing().reason())).append("</span></td></tr>");
    if (cp.groups() != null) {
      b.append("<tr><th>groups</th><td>by ").append(esc(String.join(", ", cp.groups().by()))).append(": ")
          .append(cp.groups().own()).append(" of ").append(cp.groups().groups().size())
          .append(" groups have limits and fill values of their own (listed in plan.json and by explain); the ")
          .append("figures and counts above are for the table-wide limits and fill value, which the other groups ")
          .append("take.</td></tr>");
    }
    b.append("<tr><th>scaling</th><td>").append(esc(cp.scaling().method()));
    if (cp.scaling().active()) {
      b.append(": (x − ").append(num(cp.scaling().centre())).append(") / ").append(num(cp.scaling().scale()));
    }
    b.append(". <span class=\"why\">").append(esc(cp.scaling().reason())).append("</span></td></tr>");
    if (after != null) {
      b.append("<tr><th>after the outlier step</th><td>").append(after.present()).append(" values, min ")
          .append(num(after.min())).append(", max ").append(num(after.max())).append(", mean ")
          .append(num(after.mean())).append(", standard deviation ").append(num(after.stddev())).append("</td></tr>");
    }
    b.append("</table>");
  }

  private static void missing(StringBuilder b, Inputs in) {
    List<ColumnProfile> cols = in.profile().columns();
    b.append("<section id=\"missing\"><h2>Missing values</h2>");
    b.append("<p>Null rate of each column (nulls among the rows read). The mark on each bar is the ")
        .append("column's drop threshold (<code>missing.drop-null-rate</code>): a column above it is dropped.</p>");
    int height = 10 + BAR_ROW * cols.size() + 20;
    int x0 = BAR_X0;
    int x1 = WIDTH - 70;
    svgOpen(b, "bars", WIDTH, height, "Null rate per column");
    double y = 10;
    for (ColumnProfile c : cols) {
      double rate = c.nullRate();
      double threshold = in.settings().column(c.name()).missing().dropNullRate();
      boolean over = !Double.isNaN(rate) && rate > threshold;
      barRow(b, y, x0, Double.isNaN(rate) ? 0 : rate * (x1 - x0), c.name(), over, x1 + 6, pct(rate));
      double tx = x0 + Math.min(1.0, threshold) * (x1 - x0);
      b.append("<line class=\"limit\" x1=\"").append(xy(tx)).append("\" y1=\"").append(xy(y + 1)).append("\" x2=\"")
          .append(xy(tx)).append("\" y2=\"").append(xy(y + BAR_ROW - 1)).append("\"/>");
      y += BAR_ROW;
    }
    b.append("</svg>");
    together(b, in.profile());
    b.append("</section>\n");
  }

  /**
   * The most common sets of columns missing in the same row: counted over every row in pass 1;
   * estimated from the deterministic row sample only when those counts overflowed.
   */
  private static void together(StringBuilder b, TableProfile profile) {
    b.append("<h3>Missing together</h3>");
    if (profile.together() != null && !profile.together().overflowed()) {
      List<String> names = profile.togetherColumns();
      List<Map.Entry<Long, Long>> top = profile.together().mostCommon(10);
      b.append("<p>Counted over all ").append(profile.rows()).append(" rows, in ").append(names.size())
          .append(" numeric and categorical column(s)").append(names.size() == TableProfile.TOGETHER_COLUMNS
              ? " (the first " + TableProfile.TOGETHER_COLUMNS + " in table order)" : "").append(".</p>");
      if (top.isEmpty()) {
        b.append("<p>No row has a missing value in these columns.</p>");
        return;
      }
      b.append("<table class=\"list\"><tr><th>columns missing in the same row</th><th>rows</th><th>share</th></tr>");
      for (Map.Entry<Long, Long> e : top) {
        List<String> gone = new ArrayList<>();
        for (int s = 0; s < names.size(); s++) {
          if ((e.getKey() & (1L << s)) != 0) {
            gone.add(names.get(s));
          }
        }
        b.append("<tr><td>").append(esc(String.join(", ", gone))).append("</td><td>").append(e.getValue())
            .append("</td><td>").append(pct((double) e.getValue() / profile.rows())).append("</td></tr>");
      }
      b.append("</table>");
      return;
    }
    if (profile.sample() == null || profile.sampleColumns().isEmpty()) {
      b.append("<p>Not available: more than 10,000 different sets of columns are missing together, ")
          .append("and no row sample was kept to estimate the most common.</p>");
      return;
    }
    b.append("<p>More than 10,000 different sets of columns are missing together: the most common ")
        .append("are estimated from a sample.</p>");
    RowSample.Weighted kept = profile.sample().weighted();
    double[][] rows = kept.rows();
    long[] weights = kept.weights();
    List<String> names = profile.sampleColumns();
    Map<String, Long> patterns = new LinkedHashMap<>();
    long total = 0;
    for (int i = 0; i < rows.length; i++) {
      total += weights[i];
      List<String> gone = new ArrayList<>();
      for (int j = 0; j < names.size(); j++) {
        if (Double.isNaN(rows[i][j])) {
          gone.add(names.get(j));
        }
      }
      if (!gone.isEmpty()) {
        patterns.merge(String.join("\u0000", gone), weights[i], Long::sum);
      }
    }
    List<Map.Entry<String, Long>> top = patterns.entrySet().stream()
        .sorted(Map.Entry.<String, Long>comparingByValue().reversed().thenComparing(Map.Entry.comparingByKey()))
        .limit(10).toList();
    if (profile.sample().complete()) {
      b.append("<p>Among all ").append(total).append(" rows, in the ").append(names.size())
          .append(" treated numeric columns:</p>");
    } else {
      b.append("<p>Among a deterministic sample of ").append(total).append(" rows, in the ").append(names.size())
          .append(" treated numeric columns (the sample the rank correlations use; shares are estimates):</p>");
    }
    if (top.isEmpty()) {
      b.append("<p>No row of the sample has a missing value in these columns.</p>");
      return;
    }
    b.append("<table class=\"list\"><tr><th>columns missing in the same row</th><th>rows</th><th>share</th></tr>");
    for (Map.Entry<String, Long> e : top) {
      b.append("<tr><td>").append(esc(String.join(", ", e.getKey().split("\u0000")))).append("</td><td>")
          .append(e.getValue()).append("</td><td>").append(pct((double) e.getValue() / total)).append("</td></tr>");
    }
    b.append("</table>");
  }

  private static void collinearity(StringBuilder b, CollinearityFindings f) {
    b.append("<section id=\"collinearity\"><h2>Collinearity</h2>");
    if (f == null || f.columns().isEmpty()) {
      b.append("<p>Not computed: ").append(esc(f == null ? "no analysis" : f.status())).append(".</p></section>\n");
      return;
    }
    b.append("<p>Correlations of the treated numeric columns after filling. Pairs with |r| at or over ")
        .append(num(f.pairThreshold())).append(" are listed; the VIF limit is ").append(num(f.vifLimit()))
        .append(".</p>");
    List<Integer> shown = heatmapColumns(f);
    if (shown.size() < f.columns().size()) {
      b.append("<p>The heatmaps show the ").append(shown.size()).append(" columns most correlated with another ")
          .append("one, of ").append(f.columns().size()).append("; correlations.csv has every pair.</p>");
    }
    b.append("<h3>Pearson r</h3>").append(heatmap(f.columns(), f.pearson(), shown, "Pearson r"));
    if (!f.spearman().isEmpty()) {
      b.append("<details><summary>Spearman rank correlation</summary>")
          .append(heatmap(f.columns(), f.spearman(), shown, "Spearman rho")).append("</details>");
    }
    b.append("<h3>Variance inflation factors</h3>").append(vifBars(f));
    b.append("<h3>Pairs at or over the threshold</h3>");
    if (f.pairs().isEmpty()) {
      b.append("<p>None.</p>");
    } else {
      b.append("<table class=\"list\"><tr><th>column</th><th>column</th><th>Pearson r</th><th>Spearman rho</th></tr>");
      for (CollinearityFindings.PairFinding p : f.pairs()) {
        b.append("<tr><td>").append(esc(p.a())).append("</td><td>").append(esc(p.b())).append("</td><td>")
            .append(num(p.pearson())).append("</td><td>").append(num(p.spearman())).append("</td></tr>");
      }
      b.append("</table>");
    }
    b.append("<p><strong>Suggested to drop:</strong> ").append(f.suggestedDrops().isEmpty() ? "none"
        : esc(String.join(", ", f.suggestedDrops()))).append(f.dropped().isEmpty() ? " (not dropped)"
        : "; dropped from the output: " + esc(String.join(", ", f.dropped()))).append("</p>");
    for (String d : f.dependences()) {
      b.append("<p class=\"why\">").append(esc(d)).append("</p>");
    }
    b.append("</section>\n");
  }

  /** Indexes of the columns the heatmaps show: all, or those with the largest |r| to another. */
  static List<Integer> heatmapColumns(CollinearityFindings f) {
    int p = f.columns().size();
    List<Integer> all = new ArrayList<>();
    for (int i = 0; i < p; i++) {
      all.add(i);
    }
    if (p <= HEATMAP_COLUMNS) {
      return all;
    }
    double[] strongest = new double[p];
    for (int i = 0; i < p; i++) {
      for (int j = 0; j < p; j++) {
        Double r = f.pearson().get(i).get(j);
        if (i != j && r != null && !r.isNaN()) {
          strongest[i] = Math.max(strongest[i], Math.abs(r));
        }
      }
    }
    return all.stream().sorted(Comparator.comparingDouble((Integer i) -> -strongest[i]).thenComparing(i -> i))
        .limit(HEATMAP_COLUMNS).sorted().toList();
  }

  /** A correlation heatmap with a diverging palette (blue negative, orange positive), values as text. */
  static String heatmap(List<String> names, List<List<Double>> m, List<Integer> shown, String what) {
    int n = shown.size();
    int cell = n <= CELL_VALUES ? 34 : 14;
    int left = LABEL;
    int top = LABEL;
    int w = left + n * cell + 90;
    int h = top + n * cell + 40;
    StringBuilder b = new StringBuilder();
    svgOpen(b, "heatmap", w, h, what + " between the treated columns");
    for (int a = 0; a < n; a++) {
      String name = names.get(shown.get(a));
      b.append("<text class=\"rowlabel\" x=\"").append(left - 6).append("\" y=\"").append(xy(top + a * cell + cell / 2.0 + 4))
          .append("\" text-anchor=\"end\">").append(esc(clip(name))).append("</text>");
      double cx = left + a * cell + cell / 2.0 + 4;
      b.append("<text class=\"rowlabel\" transform=\"translate(").append(xy(cx)).append(' ').append(top - 6)
          .append(") rotate(-60)\">").append(esc(clip(name))).append("</text>");
    }
    for (int a = 0; a < n; a++) {
      for (int c = 0; c < n; c++) {
        Double r = m.get(shown.get(a)).get(shown.get(c));
        double v = r == null ? Double.NaN : r;
        b.append("<rect x=\"").append(left + c * cell).append("\" y=\"").append(top + a * cell).append("\" width=\"")
            .append(cell).append("\" height=\"").append(cell).append("\" fill=\"").append(colour(v))
            .append("\"><title>").append(esc(names.get(shown.get(a)))).append(" – ").append(esc(names.get(shown.get(c))))
            .append(": ").append(num(v)).append("</title></rect>");
        if (n <= CELL_VALUES) {
          b.append("<text class=\"cell\" x=\"").append(xy(left + c * cell + cell / 2.0)).append("\" y=\"")
              .append(xy(top + a * cell + cell / 2.0 + 4)).append("\" text-anchor=\"middle\">")
              .append(cellText(v)).append("</text>");
        }
      }
    }
    double ly = top + n * cell + 14;
    b.append("<text class=\"tick\" x=\"").append(left).append("\" y=\"").append(xy(ly + 10)).append("\">−1</text>");
    for (int i = 0; i <= 20; i++) {
      b.append("<rect x=\"").append(left + 20 + i * 8).append("\" y=\"").append(xy(ly)).append("\" width=\"8\" height=\"12\" fill=\"")
          .append(colour(-1 + i / 10.0)).append("\"/>");
    }
    b.append("<text class=\"tick\" x=\"").append(left + 20 + 21 * 8 + 4).append("\" y=\"").append(xy(ly + 10))
        .append("\">+1 (grey: no variance)</text></svg>");
    return b.toString();
  }

  /** A correlation in a cell: two decimals, and no "-0.00" for a tiny negative value. */
  static String cellText(double v) {
    if (Double.isNaN(v)) {
      return "–";
    }
    return String.format(java.util.Locale.ROOT, "%.2f", Math.abs(v) < 0.005 ? 0.0 : v);
  }

  /** Diverging colours, distinguishable with the common colour-vision deficiencies: blue to light grey to orange. */
  static String colour(double r) {
    if (Double.isNaN(r)) {
      return "#9a9a9a";
    }
    double t = Math.max(-1, Math.min(1, r));
    int[] mid = {0xf2, 0xf2, 0xf2};
    int[] end = t < 0 ? new int[] {0x1f, 0x5f, 0xa8} : new int[] {0xc2, 0x5a, 0x0b};
    double k = Math.abs(t);
    return String.format("#%02x%02x%02x", mix(mid[0], end[0], k), mix(mid[1], end[1], k), mix(mid[2], end[2], k));
  }

  private static int mix(int a, int b, double k) {
    return (int) Math.round(a + (b - a) * k);
  }

  private static String vifBars(CollinearityFindings f) {
    int p = f.columns().size();
    int x0 = BAR_X0;
    int x1 = WIDTH - 90;
    double cap = Math.max(2 * f.vifLimit(), 1);
    int height = 10 + BAR_ROW * p + 24;
    StringBuilder b = new StringBuilder();
    svgOpen(b, "bars", WIDTH, height, "VIF per column");
    double y = 10;
    for (int i = 0; i < p; i++) {
      Double vif = f.vif().isEmpty() ? null : f.vif().get(i);
      double v = vif == null ? Double.NaN : vif;
      boolean over = !Double.isNaN(v) && v > f.vifLimit();
      double len = Double.isNaN(v) ? 0 : Math.min(v, cap) / cap * (x1 - x0);
      barRow(b, y, x0, len, f.columns().get(i), over, x0 + len + 6, Double.isNaN(v) ? "undefined" : num(v));
      y += BAR_ROW;
    }
    double lx = x0 + f.vifLimit() / cap * (x1 - x0);
    b.append("<line class=\"limit\" x1=\"").append(xy(lx)).append("\" y1=\"6\" x2=\"").append(xy(lx)).append("\" y2=\"")
        .append(xy(y)).append("\"/><text class=\"tick\" x=\"").append(xy(lx)).append("\" y=\"").append(xy(y + 14))
        .append("\" text-anchor=\"middle\">limit ").append(num(f.vifLimit())).append("</text></svg>");
    return b.toString();
  }

  /** The opening tag of a figure, with its size and the title that screen readers announce. */
  private static void svgOpen(StringBuilder b, String css, int w, int h, String title) {
    b.append("<svg class=\"").append(css).append("\" role=\"img\" width=\"").append(w).append("\" height=\"")
        .append(h).append("\" viewBox=\"0 0 ").append(w).append(' ').append(h).append("\"><title>")
        .append(esc(title)).append("</title>");
  }

  /**
   * One row of a bar chart at {@code y}: the column's name, its bar from {@code x0} (orange when
   * over its limit) and the value as text at {@code valueX}, with "(over)" spelt out beside colour.
   */
  private static void barRow(StringBuilder b, double y, int x0, double length, String name, boolean over,
      double valueX, String value) {
    b.append("<text class=\"rowlabel\" x=\"").append(x0 - 8).append("\" y=\"").append(xy(y + 13))
        .append("\" text-anchor=\"end\">").append(esc(clip(name))).append("<title>").append(esc(name))
        .append("</title></text>");
    b.append("<rect class=\"").append(over ? "bar over" : "bar").append("\" x=\"").append(x0).append("\" y=\"")
        .append(xy(y + 3)).append("\" width=\"").append(xy(length)).append("\" height=\"").append(BAR_ROW - 6)
        .append("\"/>");
    b.append("<text class=\"value\" x=\"").append(xy(valueX)).append("\" y=\"").append(xy(y + 13)).append("\">")
        .append(esc(value)).append(over ? " (over)" : "").append("</text>");
  }

  private static void kv(StringBuilder b, String key, Object value) {
    b.append("<tr><th>").append(esc(key)).append("</th><td>").append(esc(value == null ? "–" : value)).append("</td></tr>");
  }

  private static String path(Map<String, Object> record, String outer, String inner) {
    return record.get(outer) instanceof Map<?, ?> m && m.get(inner) != null ? String.valueOf(m.get(inner)) : "";
  }

  /** A long name shortened for a label (the full name is in the figure's title and tables). */
  private static String clip(String name) {
    return name.length() <= 28 ? name : name.substring(0, 26) + "…";
  }

  private static final String CSS = String.join("",
      "body{font:14px/1.45 system-ui,-apple-system,'Segoe UI',sans-serif;color:#1d2125;margin:0 auto;",
      "max-width:980px;padding:0 20px 40px}",
      "header{border-bottom:3px solid #1f5fa8;margin-bottom:12px}h1{font-size:24px;margin:18px 0 2px}",
      ".sub{color:#555;margin:0 0 6px}nav{margin:6px 0 10px}nav a{color:#1f5fa8}",
      "h2{font-size:19px;border-bottom:1px solid #ccd;padding-bottom:3px;margin-top:28px}h3{font-size:15px}",
      "table{border-collapse:collapse;margin:6px 0 10px}th,td{text-align:left;vertical-align:top;",
      "padding:3px 10px 3px 0}table.kv th,table.decisions th{color:#444;font-weight:600;white-space:nowrap}",
      "table.list th{border-bottom:1px solid #999}table.list td{border-bottom:1px solid #e3e3e3}",
      "details.column{border:1px solid #d8dce0;border-radius:4px;margin:8px 0;padding:4px 10px}",
      "summary{cursor:pointer;padding:3px 0}.name{font-weight:600}.type{color:#666;font-size:12px}",
      ".why{color:#555}.ok{color:#1b6b3a;font-weight:600}.bad{color:#a4161a;font-weight:600}",
      ".key{display:inline-block;padding:0 6px;border-radius:3px;color:#fff}.key.before{background:#5d6a75}",
      ".key.after{background:#1f5fa8}",
      "svg text{font:11px system-ui,sans-serif;fill:#1d2125}svg .rowlabel{font-size:11px}",
      ".whisker,.median,.axis{stroke:#1d2125}.whisker{stroke-width:1.2}.median{stroke-width:2.6;stroke:#fff}",
      ".axis{stroke-width:1}.tick{fill:#444}.before .box{fill:#5d6a75}.after .box{fill:#1f5fa8}",
      ".beyond{fill:#c25a0b}.count{fill:#8a3f08}.bar{fill:#5d6a75}.bar.over{fill:#c25a0b}",
      ".limit{stroke:#1d2125;stroke-width:2;stroke-dasharray:3 2}.cell{font-size:10px}",
      "code{background:#f2f4f6;padding:0 3px}",
      "@media print{nav{display:none}details.column{break-inside:avoid}body{max-width:none}}");
}
