package dev.sluice.treat;

import dev.sluice.config.ColumnSettings;
import dev.sluice.config.ImputeStrategy;
import dev.sluice.config.Settings;
import dev.sluice.plan.OutlierPlan;
import dev.sluice.plan.TreatedStats;
import dev.sluice.io.Names;
import dev.sluice.profile.Batches;
import dev.sluice.profile.ColumnProfile;
import dev.sluice.profile.ValueExprs;
import dev.sluice.profile.RowScan;
import dev.sluice.profile.SearchPass;
import dev.sluice.profile.TableProfile;
import dev.sluice.stats.CoMoments;
import dev.sluice.stats.NumericSteps;
import dev.sluice.stats.OrderWindows;
import dev.sluice.stats.RankSearch;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.catalyst.InternalRow;
import org.apache.spark.sql.types.DataType;
import org.apache.spark.sql.vectorized.ColumnarBatch;

/**
 * Pass 2: one loop over the treated numeric columns, after the validity and outlier steps, gives
 * the statistics imputation and scaling are fitted on (moments, exact quartiles, mode), the counts
 * beyond each fence, and the co-moments for the Pearson correlation after imputation.
 */
public final class TreatedStatsPass {
  static final double[] QUARTILES = {0.25, 0.5, 0.75};

  private TreatedStatsPass() {}

  /**
   * The statistics of the treated values from pass 1 alone, when it could gather them exactly
   * (see {@link PassOneFinish}); empty when pass 2 must run.
   */
  public static Optional<TreatedStats> fromPassOne(
      TableProfile profile, Map<String, OutlierPlan> outliers, Settings settings) {
    return PassOneFinish.of(profile, outliers, settings);
  }

  public static TreatedStats run(
      Dataset<Row> data, TableProfile profile, Map<String, OutlierPlan> outliers, Settings settings) {
    List<ColumnProfile> cols = new ArrayList<>();
    for (ColumnProfile c : profile.columns()) {
      if (c.treated()) {
        cols.add(c);
      }
    }
    if (cols.isEmpty()) {
      return new TreatedStats(Map.of(), List.of(), null);
    }
    int p = cols.size();
    int searched = 0;
    for (ColumnProfile c : cols) {
      OutlierPlan o = outliers.get(c.name());
      searched += settings.column(c.name()).usesTreatedQuartiles() && o.steps(null, null).removes() ? 1 : 0;
    }
    int maxHeld = settings.quantiles().heldPerWindow(QUARTILES.length * searched);
    List<Column> projection = new ArrayList<>();
    NumericSteps[] steps = new NumericSteps[p];
    double[][] limits = new double[p][];
    boolean[] mode = new boolean[p];
    OrderWindows[] first = new OrderWindows[p];
    List<RankSearch> searches = new ArrayList<>();
    List<SearchPass.Target> targets = new ArrayList<>();
    List<String> corrNames = new ArrayList<>();
    List<Integer> corrAt = new ArrayList<>();
    for (int k = 0; k < p; k++) {
      ColumnProfile c = cols.get(k);
      ColumnSettings cs = settings.column(c.name());
      OutlierPlan o = outliers.get(c.name());
      projection.add(ValueExprs.asDouble(c.name()));
      steps[k] = o.steps(cs);
      limits[k] = new double[] {
        low(o.innerLower()), high(o.innerUpper()), low(o.outerLower()), high(o.outerUpper()),
        low(o.lower()), high(o.upper())};
      mode[k] = cs.missing().strategy() == ImputeStrategy.MODE;
      RankSearch search = new RankSearch(QUARTILES, maxHeld);
      searches.add(search);
      targets.add(new SearchPass.Target(k, steps[k], true, Double.NaN));
      if (cs.usesTreatedQuartiles() && steps[k].removes()) {
        double[] pilot = treatedPilot(profile.pilotOf(c.name()), steps[k]);
        long expected = profile.pilotOf(c.name()).length == 0 ? profile.rows()
            : (long) Math.ceil((double) profile.rows() * pilot.length / profile.pilotOf(c.name()).length);
        first[k] = search.firstPlan(pilot, expected);
      }
      if (c.usable() > 0) {
        corrNames.add(c.name());
        corrAt.add(k);
      }
    }
    boolean correlate = settings.collinearity().enabled()
        && corrNames.size() >= 2 && corrNames.size() <= settings.collinearity().maxColumns();
    CoMoments comoments = correlate ? comoments(profile, corrNames) : null;
    int[] corrIndex = new int[p];
    Arrays.fill(corrIndex, -1);
    if (correlate) {
      for (int i = 0; i < corrAt.size(); i++) {
        corrIndex[corrAt.get(i)] = i;
      }
    }
    JavaRDD<InternalRow> rows = RowScan.rows(data, projection);
    TreatedAccumulator proto = new TreatedAccumulator(steps, limits, first, mode, corrIndex, comoments);
    TreatedAccumulator acc = fold(data, cols, rows, proto);
    for (int k = 0; k < p; k++) {
      if (first[k] != null) {
        searches.get(k).absorb(acc.windows[k]);
      }
    }
    List<SearchPass.Target> open = new ArrayList<>();
    List<RankSearch> openSearches = new ArrayList<>();
    for (int k = 0; k < p; k++) {
      if (first[k] != null) {
        open.add(targets.get(k));
        openSearches.add(searches.get(k));
      }
    }
    SearchPass.complete(rows, open, openSearches, List.of());
    Map<String, TreatedStats.ColumnStats> stats = new LinkedHashMap<>();
    for (int k = 0; k < p; k++) {
      double[] q = quartiles(cols.get(k), settings, profile, steps[k], first[k] == null ? null : searches.get(k),
          acc.moments[k].count());
      stats.put(cols.get(k).name(), acc.stats(k, q));
    }
    return new TreatedStats(stats, correlate ? List.copyOf(corrNames) : List.of(),
        correlate ? acc.comoments : null);
  }

  /**
   * Quartiles of the values after the outlier step, where imputation or scaling needs them. Capping
   * and leaving values keep their order and their number, so the quartiles follow exactly from
   * the pass-1 order statistics, capped; only removal needed a search of its own in this pass.
   */
  private static double[] quartiles(ColumnProfile c, Settings settings, TableProfile profile,
      NumericSteps steps, RankSearch own, long present) {
    if (!settings.column(c.name()).usesTreatedQuartiles() || present == 0) {
      return new double[] {Double.NaN, Double.NaN, Double.NaN};
    }
    return own != null ? own.quantiles() : profile.quartilesKeepingOrder(c.name(), steps).orElseThrow();
  }

  /**
   * Pass 2 over columnar batches of the treated columns as stored, when the scan offers them and
   * Spark can cast every one of them to DOUBLE there; over rows of the projection otherwise.
   */
  private static TreatedAccumulator fold(Dataset<Row> data, List<ColumnProfile> cols,
      JavaRDD<InternalRow> rows, TreatedAccumulator proto) {
    DataType[] types = new DataType[cols.size()];
    Column[] raw = new Column[cols.size()];
    for (int k = 0; k < types.length; k++) {
      types[k] = data.schema().apply(cols.get(k).name()).dataType();
      raw[k] = Names.col(cols.get(k).name());
    }
    boolean numeric = java.util.Arrays.stream(types).allMatch(Batches::numeric);
    Optional<JavaRDD<ColumnarBatch>> batches = numeric ? Batches.of(data.select(raw)) : Optional.empty();
    if (batches.isEmpty()) {
      return RowScan.fold(rows, proto::emptyCopy);
    }
    return RowScan.foldBatches(batches.get(), proto::emptyCopy, (acc, b) -> acc.addBatch(b, types));
  }

  private static double low(Double limit) {
    return limit == null ? Double.NEGATIVE_INFINITY : limit;
  }

  private static double high(Double limit) {
    return limit == null ? Double.POSITIVE_INFINITY : limit;
  }

  /** The pilot's values after steps 2 and 3: where the quartile windows of this pass go. */
  private static double[] treatedPilot(double[] raw, NumericSteps steps) {
    double[] out = new double[raw.length];
    int n = 0;
    for (double x : raw) {
      double t = steps.treated(x);
      if (!Double.isNaN(t)) {
        out[n++] = t;
      }
    }
    return Arrays.copyOf(out, n);
  }

  /**
   * Co-moments centred on each column's exact pass-1 median: a centre no outlier can drag, so the
   * sums of products stay small (see {@link CoMoments}).
   */
  private static CoMoments comoments(TableProfile profile, List<String> names) {
    double[] centres = new double[names.size()];
    double[] scales = new double[names.size()];
    for (int i = 0; i < names.size(); i++) {
      ColumnProfile c = profile.column(names.get(i)).orElseThrow();
      centres[i] = c.median();
      scales[i] = c.momentScale();
    }
    return new CoMoments(centres, scales);
  }
}
