package dev.sluice.profile;

import java.util.ArrayList;
import java.util.List;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.functions;

/**
 * Collects aggregate expressions for many columns into one {@code agg}, so that a whole table's
 * statistics come from a single Spark job, and reads the one result row back by position.
 *
 * <p>Inputs of the aggregates are registered with {@link #input} and computed once per row in a
 * projection below the aggregate. The aggregate functions then read plain columns: with hundreds
 * of columns this keeps the generated code, and Spark's planning of it, small.
 */
public final class Aggregates {
  private final List<Column> columns = new ArrayList<>();
  private final List<Column> inputs = new ArrayList<>();

  /** Registers an expression over the table's rows and returns a reference to its value. */
  public Column input(Column expression) {
    String name = "_in" + inputs.size();
    inputs.add(expression.alias(name));
    return functions.col(name);
  }

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
    Dataset<Row> projected = inputs.isEmpty()
        ? data.select(functions.lit(1))
        : data.select(inputs.toArray(new Column[0]));
    return projected.agg(first, rest).first();
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
