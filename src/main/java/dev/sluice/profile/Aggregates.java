package dev.sluice.profile;

import java.util.ArrayList;
import java.util.List;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;

/**
 * Collects aggregate expressions for many columns into one {@code agg}, so that a whole table's
 * statistics come from a single Spark job, and reads the one result row back by position.
 */
public final class Aggregates {
  private final List<Column> columns = new ArrayList<>();

  /** Adds an aggregate and returns its position in the result row. */
  public int add(Column aggregate) {
    columns.add(aggregate.alias("a" + columns.size()));
    return columns.size() - 1;
  }

  public boolean isEmpty() {
    return columns.isEmpty();
  }

  /** Runs every aggregate in one job over {@code data}; the result is one row of statistics. */
  public Row run(Dataset<Row> data) {
    if (columns.isEmpty()) {
      throw new IllegalStateException("no aggregates to run");
    }
    Column first = columns.get(0);
    Column[] rest = columns.subList(1, columns.size()).toArray(new Column[0]);
    return data.agg(first, rest).first();
  }

  public static long longAt(Row row, int pos) {
    return row.isNullAt(pos) ? 0L : ((Number) row.get(pos)).longValue();
  }

  public static double doubleAt(Row row, int pos) {
    return row.isNullAt(pos) ? Double.NaN : ((Number) row.get(pos)).doubleValue();
  }

  /** An array<double> result (percentiles); null when the column had no values. */
  public static double[] doublesAt(Row row, int pos) {
    if (row.isNullAt(pos)) {
      return null;
    }
    List<Object> list = row.getList(pos);
    double[] out = new double[list.size()];
    for (int i = 0; i < out.length; i++) {
      out[i] = ((Number) list.get(i)).doubleValue();
    }
    return out;
  }
}
