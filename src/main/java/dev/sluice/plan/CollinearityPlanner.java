package dev.sluice.plan;

import dev.sluice.config.CollinearitySettings;
import dev.sluice.config.Settings;
import dev.sluice.profile.TableProfile;
import dev.sluice.stats.CoMoments;
import dev.sluice.stats.Collinearity;
import dev.sluice.stats.Published;
import dev.sluice.stats.NumericSteps;
import dev.sluice.stats.RankCorrelation;
import dev.sluice.stats.RowSample;
import java.util.ArrayList;
import java.util.List;

/**
 * Correlations, VIF and the suggested drop set on the treated numeric columns after imputation,
 * from the pass-2 co-moments (Pearson) and the pass-1 row sample (Spearman). Pearson r is unchanged by the affine scaling step, so it is taken
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
    double[][] pearson = rounded(stats.pearson().correlation(constants(plans, all)));
    double[][] spearman = rounded(spearman(profile, plans, all));
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

  /**
   * Per column, the value of each constant state of the co-moments: a missing entry becomes the
   * imputation value (NaN: not imputed), an entry capped below or above becomes the plan's limit.
   */
  private static double[][] constants(List<ColumnPlan> plans, List<String> all) {
    double[][] c = new double[all.size()][CoMoments.STATES];
    for (int i = 0; i < all.size(); i++) {
      ColumnPlan plan = find(plans, all.get(i));
      c[i][CoMoments.MISSING - 1] = orNaN(plan.missing().fillNumber());
      c[i][CoMoments.BELOW - 1] = orNaN(plan.outliers().lower());
      c[i][CoMoments.ABOVE - 1] = orNaN(plan.outliers().upper());
    }
    return c;
  }

  private static double orNaN(Double d) {
    return d == null ? Double.NaN : d;
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

  /**
   * Spearman's rho after imputation, on the canonical row sample of pass 1 (the whole table when
   * it has no more rows than the sample holds): each sampled value goes through the plan's
   * validity, outlier and fill steps, exactly as the writing pass would treat it.
   */
  static double[][] spearman(TableProfile profile, List<ColumnPlan> plans, List<String> columns) {
    int p = columns.size();
    RowSample sample = profile.sample();
    if (sample == null) {
      double[][] none = new double[p][p];
      for (double[] row : none) {
        java.util.Arrays.fill(row, Double.NaN);
      }
      return none;
    }
    RowSample.Weighted kept = sample.weighted();
    double[][] raw = kept.rows();
    int[] at = new int[p];
    NumericSteps[] steps = new NumericSteps[p];
    Double[] fill = new Double[p];
    for (int i = 0; i < p; i++) {
      ColumnPlan cp = find(plans, columns.get(i));
      at[i] = profile.sampleColumns().indexOf(cp.name());
      steps[i] = cp.outliers().steps(cp.validMin(), cp.validMax());
      fill[i] = cp.missing().fillNumber();
    }
    // Row by row: each sampled row is read once, not once per column.
    double[][] treated = new double[raw.length][p];
    for (int r = 0; r < raw.length; r++) {
      double[] in = raw[r];
      double[] out = treated[r];
      for (int i = 0; i < p; i++) {
        double t = steps[i].treated(in[at[i]]);
        out[i] = Double.isNaN(t) && fill[i] != null ? fill[i] : t;
      }
    }
    return RankCorrelation.spearman(treated, kept.weights());
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
