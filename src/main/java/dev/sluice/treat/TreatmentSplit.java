package dev.sluice.treat;

import static org.apache.spark.sql.functions.col;
import static org.apache.spark.sql.functions.size;

import dev.sluice.plan.Plan;
import java.util.Optional;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.types.StructType;

/**
 * The plan applied to a table: the treated rows and, when the plan or the input can reject rows,
 * the quarantined ones. Both come from the same input rows, split by their quarantine reasons;
 * the caller persists {@link #base} when it writes both, so the input is read once.
 *
 * @param base the input with the working column of reasons (the input itself when nothing can be
 *     quarantined)
 */
public record TreatmentSplit(Dataset<Row> base, Dataset<Row> treated, Optional<Dataset<Row>> quarantined) {
  /** Working column: the reasons of each row. */
  public static final String WORK = TreatedTable.WORK;

  /**
   * @param data every input row (for CSV, with the malformed-line column)
   * @param schema the table's own columns, without the malformed-line column
   */
  public static TreatmentSplit of(
      Dataset<Row> data, StructType schema, Optional<String> malformedColumn, Plan plan) {
    Column[] projection = TreatedTable.projection(schema, plan).toArray(new Column[0]);
    Dataset<Row> indexed = Treatments.withGroupIndex(data, plan);
    if (!TreatedTable.quarantines(plan, malformedColumn)) {
      return new TreatmentSplit(indexed, indexed.select(projection), Optional.empty());
    }
    Dataset<Row> base = indexed.withColumn(WORK, TreatedTable.reasons(plan, malformedColumn));
    Dataset<Row> treated = base.filter(size(col(WORK)).equalTo(0)).select(projection);
    Dataset<Row> held = base.filter(size(col(WORK)).gt(0))
        .select(TreatedTable.quarantineProjection(schema).toArray(new Column[0]));
    return new TreatmentSplit(base, treated, Optional.of(held));
  }
}
