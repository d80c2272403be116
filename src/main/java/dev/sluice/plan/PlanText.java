package dev.sluice.plan;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

/** A plan as text for people (explain): each column's steps in the order of treatment, then collinearity. */
public final class PlanText {
  private PlanText() {}

  public static String of(Plan plan) {
    StringBuilder b = new StringBuilder();
    b.append("Plan format ").append(plan.formatVersion()).append(", fitted on ").append(plan.rowsFitted())
        .append(" rows; quartiles ").append(plan.quantileMethod()).append(".\n")
        .append("Each treated column goes through: validity bounds, outliers, missing values, scaling.\n");
    for (ColumnPlan cp : plan.columns()) {
      b.append('\n').append(cp.name()).append(" (").append(cp.type()).append(", ").append(cp.role()).append(")\n");
      if (!cp.treated()) {
        b.append("  written unchanged\n");
        continue;
      }
      if (!cp.kept()) {
        b.append("  dropped: ").append(cp.dropReason()).append('\n');
        continue;
      }
      if (cp.kind().equals("numeric")) {
        b.append("  validity: ").append(validity(cp, PlanText::num)).append('\n');
        b.append("  outliers: ").append(outliers(cp.outliers())).append('\n');
      }
      b.append("  missing: ").append(missing(cp.missing())).append('\n');
      if (cp.kind().equals("numeric")) {
        b.append("  scaling: ").append(cp.scaling().active()
            ? cp.scaling().method() + ", (x - " + num(cp.scaling().centre()) + ") / " + num(cp.scaling().scale())
            : "none").append('\n');
      }
      if (cp.groups() != null) {
        b.append("  groups by ").append(String.join(", ", cp.groups().by())).append(": ").append(groups(cp)).append('\n');
      }
      Gates.Limits l = plan.gates().columns().get(cp.name());
      if (l != null) {
        b.append("  limits: ").append(limits(l)).append('\n');
      }
    }
    CollinearityFindings f = plan.collinearity();
    b.append("\ncollinearity: ").append(f.status());
    if (!f.pairs().isEmpty()) {
      List<String> pairs = new ArrayList<>();
      for (CollinearityFindings.PairFinding p : f.pairs()) {
        pairs.add(p.a() + " ~ " + p.b() + " (r " + num(p.pearson()) + ")");
      }
      b.append("; pairs with |r| >= ").append(num(f.pairThreshold())).append(": ").append(String.join(", ", pairs));
    }
    if (!f.suggestedDrops().isEmpty()) {
      b.append("; suggested to drop: ").append(String.join(", ", f.suggestedDrops()))
          .append(f.dropped().isEmpty() ? " (kept)" : " (dropped)");
    }
    b.append('\n');
    Gates g = plan.gates();
    b.append("\ngates: ").append(g.columns().isEmpty() && g.quarantinedShare() == null ? "no limits"
        : (g.quarantinedShare() == null ? "" : "quarantined-share at most " + num(g.quarantinedShare()) + "; ")
            + "a run that passes a limit exits with code 4"
            + (g.holds() ? " and holds its treated output back under held/" : " and still publishes its treated output"));
    return b.append('\n').toString();
  }

  /** Each group's limits and fill, or why it takes the table-wide ones. */
  private static String groups(ColumnPlan cp) {
    GroupFigures f = cp.groups();
    StringBuilder b = new StringBuilder();
    b.append(f.own()).append(" of ").append(f.groups().size()).append(" groups with figures of their own");
    if (cp.kind().equals("numeric")) {
      b.append(" (quartiles ").append(f.quantileMethod())
          .append(f.rankError() > 0 ? ", rank error at most " + num(f.rankError()) : "").append(")");
    }
    b.append("; groups not listed take the table-wide figures");
    for (GroupFigures.Group g : f.groups()) {
      b.append("\n    ").append(g.key().stream().map(k -> k == null ? "null" : k).collect(java.util.stream.Collectors.joining(", ")))
          .append(": ");
      if (g.fallback() != null) {
        b.append(g.fallback());
        continue;
      }
      List<String> parts = new ArrayList<>();
      if (g.lower() != null || g.upper() != null) {
        parts.add("limits " + num(g.lower()) + " / " + num(g.upper()));
      }
      if (g.fill() != null) {
        parts.add("fill " + num(g.fill()));
      }
      if (g.fillText() != null) {
        parts.add("fill \"" + g.fillText() + "\"");
      }
      b.append(parts.isEmpty() ? "table-wide figures" : String.join(", ", parts)).append(" (").append(g.usable())
          .append(" usable values)");
    }
    return b.toString();
  }

  private static String limits(Gates.Limits l) {
    List<String> parts = new ArrayList<>();
    if (l.nullRate() != null) {
      parts.add("null-rate at most " + num(l.nullRate()));
    }
    if (l.beyondShare() != null) {
      parts.add("beyond-share at most " + num(l.beyondShare()));
    }
    if (l.psi() != null) {
      parts.add("psi at most " + num(l.psi()));
    }
    return String.join(", ", parts);
  }

  /** The validity bounds of a column in words, its numbers written by {@code num}. */
  public static String validity(ColumnPlan cp, java.util.function.Function<Double, String> num) {
    if (cp.validMin() == null && cp.validMax() == null) {
      return "no bounds";
    }
    String range = cp.validMax() == null ? "at least " + num.apply(cp.validMin())
        : cp.validMin() == null ? "at most " + num.apply(cp.validMax())
        : "from " + num.apply(cp.validMin()) + " to " + num.apply(cp.validMax());
    return range + "; values outside: " + cp.invalidAction();
  }

  private static String outliers(OutlierPlan o) {
    if (!o.active()) {
      return o.method() + ", no limits applied (" + o.reason() + ")";
    }
    return o.method() + ", " + o.direction() + ": " + o.action() + " below " + num(o.lower()) + " / above "
        + num(o.upper()) + " (" + o.reason() + ")";
  }

  private static String missing(MissingPlan m) {
    if (m.dropColumn()) {
      return "column dropped (" + m.reason() + ")";
    }
    if (m.fillNumber() != null) {
      return m.strategy() + ", fill " + num(m.fillNumber());
    }
    if (m.fillText() != null) {
      return m.strategy() + ", fill \"" + m.fillText() + "\"";
    }
    return m.strategy() + (m.quarantine() ? " (a missing value sends the row to quarantine)" : "");
  }

  private static String num(Double v) {
    if (v == null) {
      return "none";
    }
    return Double.isNaN(v) ? "NaN" : String.format(Locale.ROOT, "%s", v);
  }
}
