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
    slots.forEach((name, at) -> stats.put(name, read(r, at, scales.get(name))));
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
    boolean needQuartiles = cs.missing().strategy() == ImputeStrategy.MEDIAN
        || cs.scaling() == ScalingMethod.ROBUST;
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

  private static Column beyondCount(Column v, Double limit, boolean below) {
    if (limit == null) {
      return lit(0L);
    }
    return count_if(below ? v.lt(lit(limit)) : v.gt(lit(limit)));
  }

  private static TreatedStats.ColumnStats read(Row r, int[] at, double scale) {
    double[] q = at[5] < 0 ? null : Aggregates.doublesAt(r, at[5]);
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
