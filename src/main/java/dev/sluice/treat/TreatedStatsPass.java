package dev.sluice.treat;

import static org.apache.spark.sql.functions.avg;
import static org.apache.spark.sql.functions.call_function;
import static org.apache.spark.sql.functions.count;
import static org.apache.spark.sql.functions.count_if;
import static org.apache.spark.sql.functions.lit;
import static org.apache.spark.sql.functions.max;
import static org.apache.spark.sql.functions.min;
import static org.apache.spark.sql.functions.stddev_samp;

import dev.sluice.config.ColumnSettings;
import dev.sluice.config.ImputeStrategy;
import dev.sluice.config.ScalingMethod;
import dev.sluice.config.Settings;
import dev.sluice.plan.OutlierPlan;
import dev.sluice.plan.TreatedStats;
import dev.sluice.profile.Aggregates;
import dev.sluice.profile.ColumnProfile;
import dev.sluice.profile.QuantileSpec;
import dev.sluice.profile.TableProfile;
import dev.sluice.stats.CoMoments;
import dev.sluice.stats.PowerScale;
import dev.sluice.stats.Published;
import dev.sluice.stats.QuantileGrid;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Encoders;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.functions;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.StructField;
import org.apache.spark.sql.types.StructType;

/**
 * Pass 2: one aggregate over the values after the validity and outlier steps gives, for every
 * treated column, the statistics imputation and scaling are fitted on, the counts beyond each
 * fence, and the co-moments for correlation after imputation.
 */
public final class TreatedStatsPass {
  private TreatedStatsPass() {}

  public static TreatedStats run(
      Dataset<Row> data, TableProfile profile, Map<String, OutlierPlan> outliers, Settings settings) {
    QuantileSpec spec = new QuantileSpec(
        profile.exactQuantiles(), settings.quantiles().relativeError(),
        settings.quantiles().rankGridSize(), settings.quantiles().sketch());
    Aggregates aggs = new Aggregates();
    Map<String, int[]> slots = new LinkedHashMap<>();
    Map<String, Double> scales = new LinkedHashMap<>();
    List<ColumnProfile> corr = new ArrayList<>();
    List<Column> corrValues = new ArrayList<>();
    for (ColumnProfile c : profile.columns()) {
      if (!c.treated()) {
        continue;
      }
      ColumnSettings cs = settings.column(c.name());
      OutlierPlan o = outliers.get(c.name());
      Double lo = cs.validMin().isPresent() ? cs.validMin().getAsDouble() : null;
      Double hi = cs.validMax().isPresent() ? cs.validMax().getAsDouble() : null;
      Column t = aggs.input(Treatments.afterOutliers(c.name(), lo, hi, o));
      Column v = aggs.input(Treatments.valid(c.name(), lo, hi));
      slots.put(c.name(), columnAggregates(aggs, v, t, o, cs, spec, c.momentScale()));
      scales.put(c.name(), c.momentScale());
      if (c.usable() > 0 && c.grid() != null) {
        corr.add(c);
        corrValues.add(t);
      }
    }
    int comomentsAt = -1;
    boolean correlate = settings.collinearity().enabled()
        && corr.size() >= 2 && corr.size() <= settings.collinearity().maxColumns();
    if (correlate) {
      comomentsAt = aggs.add(comoments(corr, outliers, corrValues));
    }
    if (aggs.isEmpty()) {
      return new TreatedStats(Map.of(), List.of(), null, null);
    }
    Row r = aggs.run(data);
    Map<String, TreatedStats.ColumnStats> stats = new LinkedHashMap<>();
    for (ColumnProfile c : profile.columns()) {
      int[] at = slots.get(c.name());
      if (at == null) {
        continue;
      }
      double[] derived = !spec.exact() && needsQuartiles(settings.column(c.name()))
          ? derivedQuartiles(c, outliers.get(c.name())) : null;
      stats.put(c.name(), read(r, at, scales.get(c.name()), derived));
    }
    List<String> names = new ArrayList<>();
    corr.forEach(c -> names.add(c.name()));
    if (comomentsAt < 0) {
      return new TreatedStats(stats, List.of(), null, null);
    }
    CoMoments[] acc = CoMomentAggregator.decode((byte[]) r.get(comomentsAt));
    return new TreatedStats(stats, names, acc[0], acc[1]);
  }

  /** {@code scale}: the column's power-of-two factor for its mean and standard deviation. */
  private static int[] columnAggregates(
      Aggregates a, Column v, Column t, OutlierPlan o, ColumnSettings cs, QuantileSpec spec,
      double scale) {
    // On large tables the quartiles after the outlier step follow from the pass-1 grid (see
    // derivedQuartiles): a second quantile sketch here would cost as much as pass 1's.
    boolean needQuartiles = spec.exact() && needsQuartiles(cs);
    boolean needMode = cs.missing().strategy() == ImputeStrategy.MODE;
    Column scaled = scale == 1.0 ? t : a.input(t.multiply(lit(scale)));
    return new int[] {
      a.add(count(t)), a.add(avg(scaled)), a.add(stddev_samp(scaled)), a.add(min(t)), a.add(max(t)),
      needQuartiles ? a.add(spec.quartiles(t)) : -1,
      needMode ? a.add(call_function("approx_top_k", t, lit(1))) : -1,
      a.add(beyondCount(v, o.innerLower(), true)), a.add(beyondCount(v, o.innerUpper(), false)),
      a.add(beyondCount(v, o.outerLower(), true)), a.add(beyondCount(v, o.outerUpper(), false)),
      a.add(beyondCount(v, o.lower(), true)), a.add(beyondCount(v, o.upper(), false)),
    };
  }

  private static boolean needsQuartiles(ColumnSettings cs) {
    return cs.missing().strategy() == ImputeStrategy.MEDIAN || cs.scaling() == ScalingMethod.ROBUST;
  }

  /**
   * Quartiles of the values after the outlier step, from the column's pass-1 quantile grid:
   * capping clamps them, removal takes them within the remaining stretch of ranks (see {@link
   * QuantileGrid#quantileWithin}). Null when the column has no grid.
   */
  static double[] derivedQuartiles(ColumnProfile c, OutlierPlan o) {
    if (c.grid() == null) {
      return null;
    }
    boolean cap = o.action().equals("cap");
    boolean removes = o.action().equals("set-missing") || o.action().equals("quarantine");
    double lo = (cap || removes) && o.lower() != null ? o.lower() : Double.NEGATIVE_INFINITY;
    double hi = (cap || removes) && o.upper() != null ? o.upper() : Double.POSITIVE_INFINITY;
    double[] out = new double[3];
    double[] ps = {0.25, 0.5, 0.75};
    for (int i = 0; i < 3; i++) {
      out[i] = Published.round(c.grid().quantileWithin(ps[i], lo, hi, cap));
    }
    return out;
  }

  private static Column beyondCount(Column v, Double limit, boolean below) {
    if (limit == null) {
      return lit(0L);
    }
    return count_if(below ? v.lt(lit(limit)) : v.gt(lit(limit)));
  }

  private static TreatedStats.ColumnStats read(Row r, int[] at, double scale, double[] derived) {
    // Derived quartiles only where values are left: the grid knows nothing of an empty remainder.
    double[] q = at[5] >= 0 ? Aggregates.doublesAt(r, at[5])
        : Aggregates.longAt(r, at[0]) > 0 ? derived : null;
    double mode = Double.NaN;
    if (at[6] >= 0 && !r.isNullAt(at[6]) && !r.getList(at[6]).isEmpty()) {
      Row item = (Row) r.getList(at[6]).get(0);
      mode = item.isNullAt(0) ? Double.NaN : item.getDouble(0);
    }
    return new TreatedStats.ColumnStats(
        Aggregates.longAt(r, at[0]),
        PowerScale.unscale(Aggregates.doubleAt(r, at[1]), scale),
        PowerScale.unscale(Aggregates.doubleAt(r, at[2]), scale),
        Aggregates.doubleAt(r, at[3]), Aggregates.doubleAt(r, at[4]),
        q == null ? Double.NaN : q[0], q == null ? Double.NaN : q[1], q == null ? Double.NaN : q[2],
        mode, Aggregates.longAt(r, at[7]), Aggregates.longAt(r, at[8]), Aggregates.longAt(r, at[9]),
        Aggregates.longAt(r, at[10]), Aggregates.longAt(r, at[11]), Aggregates.longAt(r, at[12]));
  }

  private static Column comoments(
      List<ColumnProfile> cols, Map<String, OutlierPlan> outliers, List<Column> values) {
    int p = cols.size();
    double[] centres = new double[p];
    double[] scales = new double[p];
    QuantileGrid[] grids = new QuantileGrid[p];
    double[] capLo = new double[p];
    double[] capHi = new double[p];
    List<StructField> fields = new ArrayList<>();
    for (int i = 0; i < p; i++) {
      ColumnProfile c = cols.get(i);
      OutlierPlan o = outliers.get(c.name());
      // The median is a first-pass centre that no outlier can drag: sums of products stay small.
      centres[i] = c.median();
      scales[i] = c.momentScale();
      grids[i] = c.grid();
      boolean cap = o.action().equals("cap");
      capLo[i] = cap && o.lower() != null ? o.lower() : Double.NEGATIVE_INFINITY;
      capHi[i] = cap && o.upper() != null ? o.upper() : Double.POSITIVE_INFINITY;
      fields.add(DataTypes.createStructField("v" + i, DataTypes.DoubleType, true));
    }
    StructType schema = DataTypes.createStructType(fields);
    var udaf = functions.udaf(
        new CoMomentAggregator(centres, scales, grids, capLo, capHi), Encoders.row(schema));
    return udaf.apply(values.toArray(new Column[0]));
  }
}
