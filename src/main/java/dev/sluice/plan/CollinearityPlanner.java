package dev.sluice.plan;

import dev.sluice.config.CollinearitySettings;
import dev.sluice.config.Settings;
import dev.sluice.profile.ColumnProfile;
import dev.sluice.profile.TableProfile;
import dev.sluice.stats.Collinearity;
import dev.sluice.stats.Published;
import dev.sluice.stats.QuantileGrid;
import java.util.ArrayList;
import java.util.List;

/**
 * Correlations, VIF and the suggested drop set on the treated numeric columns after imputation,
 * from the pass-2 co-moments. Pearson r is unchanged by the affine scaling step, so it is taken
 * before scaling. Columns with zero variance, or dropped for missing values, are left out.
 */
final class CollinearityPlanner {
  private CollinearityPlanner() {}

  static CollinearityFindings analyse(
      List<ColumnPlan> plans, TableProfile profile, TreatedStats stats, Settings settings) {
    CollinearitySettings cs = settings.collinearity();
    if (!cs.enabled()) {
      return CollinearityFindings.skipped("disabled", cs.pairThreshold(), cs.vifLimit());
    }
    if (stats.pearson() == null) {
      return CollinearityFindings.skipped(
          "skipped: fewer than 2 or more than " + cs.maxColumns() + " numeric columns",
          cs.pairThreshold(), cs.vifLimit());
    }
    List<String> all = stats.comomentColumns();
    double[] fills = new double[all.size()];
    double[] rankFills = new double[all.size()];
    for (int i = 0; i < all.size(); i++) {
      ColumnPlan cp = find(plans, all.get(i));
      Double fill = cp.missing().fillNumber();
      fills[i] = fill == null ? Double.NaN : fill;
      rankFills[i] = fill == null ? Double.NaN : rankOf(profile, cp, fill);
    }
    double[][] pearson = rounded(stats.pearson().correlation(fills));
    double[][] spearman = rounded(stats.spearman().correlation(rankFills));
    List<Integer> keep = new ArrayList<>();
    for (int i = 0; i < all.size(); i++) {
      if (find(plans, all.get(i)).kept() && !Double.isNaN(pearson[i][i])) {
        keep.add(i);
      }
    }
    if (keep.size() < 2) {
      return CollinearityFindings.skipped(
          "skipped: fewer than 2 columns with variance", cs.pairThreshold(), cs.vifLimit());
    }
    return findings(names(all, keep), sub(pearson, keep), sub(spearman, keep), cs);
  }

  private static CollinearityFindings findings(
      List<String> names, double[][] r, double[][] rho, CollinearitySettings cs) {
    Collinearity.VifResult vif = Collinearity.vif(names, r);
    List<String> deps = new ArrayList<>();
    for (Collinearity.Dependence d : vif.dependences()) {
      deps.add(d.column() + " is a linear combination of " + String.join(", ", d.on()));
    }
    List<CollinearityFindings.PairFinding> pairs = new ArrayList<>();
    for (Collinearity.Pair p : Collinearity.strongPairs(names, r, cs.pairThreshold())) {
      int a = names.indexOf(p.a());
      int b = names.indexOf(p.b());
      pairs.add(new CollinearityFindings.PairFinding(p.a(), p.b(), p.r(), rho[a][b]));
    }
    List<String> drops = Collinearity.suggestDrops(names, r, cs.vifLimit());
    List<Double> vifs = new ArrayList<>();
    for (double v : vif.vif()) {
      vifs.add(Published.round(v));
    }
    return new CollinearityFindings(
        vif.singular() ? "computed: correlation matrix is singular" : "computed",
        List.copyOf(names), matrix(r), matrix(rho), vifs, deps, pairs, drops,
        cs.drop() ? drops : List.of(), cs.pairThreshold(), cs.vifLimit());
  }

  /** The mid-rank a filled value takes among the treated values, for Spearman. */
  static double rankOf(TableProfile profile, ColumnPlan cp, double fill) {
    ColumnProfile c = profile.column(cp.name()).orElseThrow();
    QuantileGrid g = c.grid();
    if (g == null) {
      return Double.NaN;
    }
    return g.midRankAfterCap(fill, capLower(cp.outliers()), capUpper(cp.outliers()));
  }

  static double capLower(OutlierPlan o) {
    return o.action().equals("cap") && o.lower() != null ? o.lower() : Double.NEGATIVE_INFINITY;
  }

  static double capUpper(OutlierPlan o) {
    return o.action().equals("cap") && o.upper() != null ? o.upper() : Double.POSITIVE_INFINITY;
  }

  /** Correlations at published precision: the same whatever order Spark merged the sums in. */
  private static double[][] rounded(double[][] m) {
    double[][] out = new double[m.length][];
    for (int i = 0; i < m.length; i++) {
      out[i] = new double[m[i].length];
      for (int j = 0; j < m[i].length; j++) {
        out[i][j] = Published.round(m[i][j]);
      }
    }
    return out;
  }

  private static ColumnPlan find(List<ColumnPlan> plans, String name) {
    return plans.stream().filter(p -> p.name().equals(name)).findFirst().orElseThrow();
  }

  private static List<String> names(List<String> all, List<Integer> keep) {
    List<String> out = new ArrayList<>();
    keep.forEach(i -> out.add(all.get(i)));
    return out;
  }

  private static double[][] sub(double[][] m, List<Integer> keep) {
    double[][] out = new double[keep.size()][keep.size()];
    for (int i = 0; i < keep.size(); i++) {
      for (int j = 0; j < keep.size(); j++) {
        out[i][j] = m[keep.get(i)][keep.get(j)];
      }
    }
    return out;
  }

  private static List<List<Double>> matrix(double[][] m) {
    List<List<Double>> out = new ArrayList<>();
    for (double[] row : m) {
      List<Double> r = new ArrayList<>();
      for (double v : row) {
        r.add(Double.isNaN(v) ? null : v);
      }
      out.add(r);
    }
    return out;
  }

}
