package dev.sluice.profile;

import static dev.sluice.profile.ValueExprs.asDouble;
import static org.apache.spark.sql.functions.abs;
import static org.apache.spark.sql.functions.approx_count_distinct;
import static org.apache.spark.sql.functions.avg;
import static org.apache.spark.sql.functions.call_function;
import static org.apache.spark.sql.functions.count;
import static org.apache.spark.sql.functions.count_if;
import static org.apache.spark.sql.functions.lit;
import static org.apache.spark.sql.functions.stddev_samp;

import dev.sluice.config.ColumnSettings;
import dev.sluice.config.OutlierMethod;
import dev.sluice.config.Role;
import dev.sluice.config.Settings;
import dev.sluice.io.Names;
import dev.sluice.stats.PowerScale;
import dev.sluice.stats.QuantileGrid;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Map;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.functions;
import org.apache.spark.sql.types.StructField;

/**
 * Pass 1: one aggregate over the table computes every column's counts, moments and quantiles.
 *
 * <p>A row count runs first (served from file footers for Parquet and ORC) to choose between
 * exact and approximate quantiles. Two kinds of column need a figure from that aggregate before
 * they can be finished, and cost one more aggregate, shared by all of them: columns using the MAD
 * method (the MAD needs the median), and columns of very large magnitude, whose mean and standard
 * deviation are taken again on values scaled by a power of two (see {@link PowerScale}) because
 * their sums of squares overflow.
 */
public final class Profiler {
  private Profiler() {}

  /** Profiles {@code data}; {@code roles} gives each column's effective role. */
  public static TableProfile profile(Dataset<Row> data, Settings settings, Map<String, Role> roles) {
    long rows = data.count();
    QuantileSpec spec = specFor(rows, settings);
    Aggregates aggs = new Aggregates();
    int rowsAt = aggs.add(count(lit(1)));
    List<Slots> slots = new ArrayList<>();
    for (StructField f : data.schema().fields()) {
      Role role = roles.getOrDefault(f.name(), Role.KEEP);
      slots.add(Slots.plan(aggs, f, role, settings.column(f.name()), spec));
    }
    Row result = aggs.run(data);
    long counted = Aggregates.longAt(result, rowsAt);
    List<ColumnProfile> columns = new ArrayList<>();
    for (Slots s : slots) {
      columns.add(s.read(result, counted, spec));
    }
    columns = finish(data, columns, settings, spec);
    return new TableProfile(counted, List.copyOf(columns), spec.exact());
  }

  static QuantileSpec specFor(long rows, Settings settings) {
    var q = settings.quantiles();
    return new QuantileSpec(rows <= q.exactMaxCount(), q.relativeError(), q.rankGridSize(), q.sketch());
  }

  /**
   * One extra aggregate, only when some column needs it: the MAD of every column whose outlier
   * method is mad, and the rescaled mean and standard deviation of every column of very large
   * magnitude.
   */
  private static List<ColumnProfile> finish(
      Dataset<Row> data, List<ColumnProfile> columns, Settings settings, QuantileSpec spec) {
    Aggregates aggs = new Aggregates();
    int[] madAt = new int[columns.size()];
    int[] meanAt = new int[columns.size()];
    Arrays.fill(madAt, -1);
    Arrays.fill(meanAt, -1);
    for (int i = 0; i < columns.size(); i++) {
      ColumnProfile c = columns.get(i);
      if (!c.measured() || c.usable() == 0) {
        continue;
      }
      ColumnSettings cs = settings.column(c.name());
      Column v = ValueExprs.usable(asDouble(c.name()), cs.validMin(), cs.validMax());
      if (c.treated() && cs.outliers().method() == OutlierMethod.MAD) {
        Column deviation = aggs.input(abs(v.minus(lit(c.median()))));
        madAt[i] = aggs.add(spec.of(deviation, new double[] {0.5}));
      }
      double f = c.momentScale();
      if (f != 1.0) {
        Column scaled = aggs.input(v.multiply(lit(f)));
        meanAt[i] = aggs.add(avg(scaled));
        aggs.add(stddev_samp(scaled));
      }
    }
    if (aggs.isEmpty()) {
      return columns;
    }
    Row r = aggs.run(data);
    List<ColumnProfile> out = new ArrayList<>(columns);
    for (int i = 0; i < columns.size(); i++) {
      ColumnProfile c = out.get(i);
      if (madAt[i] >= 0) {
        double[] mad = Aggregates.doublesAt(r, madAt[i]);
        c = c.withMad(mad == null ? Double.NaN : mad[0]);
      }
      if (meanAt[i] >= 0) {
        double f = c.momentScale();
        c = c.withMoments(
            PowerScale.unscale(Aggregates.doubleAt(r, meanAt[i]), f),
            PowerScale.unscale(Aggregates.doubleAt(r, meanAt[i] + 1), f));
      }
      out.set(i, c);
    }
    return out;
  }

  /** The positions of one column's aggregates in the result row (-1: not computed). */
  private record Slots(
      StructField field, ColumnKind kind, Role role,
      int nonNull, int nan, int inf, int invalid, int usable,
      int min, int max, int mean, int sd, int quantiles,
      int distinct, int top, int minT, int maxT) {

    static Slots plan(Aggregates a, StructField f, Role role, ColumnSettings cs, QuantileSpec spec) {
      ColumnKind kind = ColumnKind.of(f.dataType());
      Column c = a.input(Names.col(f.name()));
      int nonNull = a.add(count(c));
      if (role == Role.IDENTIFIER) {
        return new Slots(f, kind, role, nonNull, -1, -1, -1, -1, -1, -1, -1, -1, -1,
            a.add(approx_count_distinct(c)), -1, -1, -1);
      }
      switch (kind) {
        case NUMERIC:
          return numeric(a, f, role, cs, spec, nonNull);
        case CATEGORICAL:
          return new Slots(f, kind, role, nonNull, -1, -1, -1, -1, -1, -1, -1, -1, -1,
              a.add(approx_count_distinct(c)), a.add(call_function("approx_top_k", c, lit(1))),
              -1, -1);
        case TEMPORAL:
          return new Slots(f, kind, role, nonNull, -1, -1, -1, -1, -1, -1, -1, -1, -1, -1, -1,
              a.add(functions.min(c).cast("string")), a.add(functions.max(c).cast("string")));
        default:
          return new Slots(f, kind, role, nonNull, -1, -1, -1, -1, -1, -1, -1, -1, -1, -1, -1,
              -1, -1);
      }
    }

    private static Slots numeric(
        Aggregates a, StructField f, Role role, ColumnSettings cs, QuantileSpec spec, int nonNull) {
      Column x = a.input(asDouble(f.name()));
      Column v = a.input(ValueExprs.usable(asDouble(f.name()), cs.validMin(), cs.validMax()));
      Column finite = ValueExprs.isFinite(x);
      return new Slots(f, ColumnKind.NUMERIC, role, nonNull,
          a.add(count_if(ValueExprs.isNan(x))),
          a.add(count_if(ValueExprs.isInfinite(x))),
          a.add(count_if(finite.and(ValueExprs.outsideBounds(x, cs.validMin(), cs.validMax())))),
          a.add(count(v)), a.add(functions.min(v)), a.add(functions.max(v)), a.add(avg(v)), a.add(stddev_samp(v)),
          a.add(spec.all(v)), -1, -1, -1, -1);
    }

    ColumnProfile read(Row r, long rows, QuantileSpec spec) {
      long present = Aggregates.longAt(r, nonNull);
      long nanCount = nan < 0 ? 0 : Aggregates.longAt(r, nan);
      double[] q = quantiles < 0 ? null : Aggregates.doublesAt(r, quantiles);
      QuantileGrid grid = q == null ? null : gridOf(q, spec);
      String topValue = null;
      long topCount = 0;
      if (top >= 0 && !r.isNullAt(top) && !r.getList(top).isEmpty()) {
        Row item = (Row) r.getList(top).get(0);
        topValue = item.isNullAt(0) ? null : String.valueOf(item.get(0));
        topCount = item.getLong(1);
      }
      return new ColumnProfile(
          field.name(), field.dataType().simpleString(), kind, role, rows,
          // count() counts NaN as present: nulls here are true nulls, NaN is counted apart.
          rows - present, nanCount, at(r, inf), at(r, invalid), at(r, usable),
          dbl(r, min), dbl(r, max), dbl(r, mean), dbl(r, sd),
          q == null ? Double.NaN : q[0], q == null ? Double.NaN : q[1],
          q == null ? Double.NaN : q[2], grid,
          quantiles < 0 ? null : spec.method(), quantiles < 0 ? Double.NaN : spec.rankError(),
          Double.NaN, distinct < 0 ? -1 : Aggregates.longAt(r, distinct), topValue, topCount,
          str(r, minT), str(r, maxT));
    }

    private static QuantileGrid gridOf(double[] q, QuantileSpec spec) {
      double[] values = new double[q.length - 3];
      System.arraycopy(q, 3, values, 0, values.length);
      // Approximate sketches may return a grid that is not monotone by a hair; it is not, by
      // construction, for exact type 7, and monotone order is what ranks need.
      for (int i = 1; i < values.length; i++) {
        values[i] = Math.max(values[i], values[i - 1]);
      }
      return new QuantileGrid(QuantileGrid.evenProbabilities(spec.gridSize()), values);
    }

    private static long at(Row r, int pos) {
      return pos < 0 ? 0 : Aggregates.longAt(r, pos);
    }

    private static double dbl(Row r, int pos) {
      return pos < 0 ? Double.NaN : Aggregates.doubleAt(r, pos);
    }

    private static String str(Row r, int pos) {
      return pos < 0 || r.isNullAt(pos) ? null : r.getString(pos);
    }
  }
}
