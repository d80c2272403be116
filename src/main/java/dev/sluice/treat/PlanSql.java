package dev.sluice.treat;

import static org.apache.spark.sql.functions.size;

import dev.sluice.SluiceException;
import dev.sluice.plan.ColumnPlan;
import dev.sluice.plan.Plan;
import java.util.ArrayList;
import java.util.List;
import java.util.Optional;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.catalyst.expressions.Expression;
import org.apache.spark.sql.catalyst.expressions.NamedExpression;
import org.apache.spark.sql.catalyst.plans.logical.LogicalPlan;
import org.apache.spark.sql.catalyst.plans.logical.Project;
import org.apache.spark.sql.types.DataType;
import org.apache.spark.sql.types.StructField;
import org.apache.spark.sql.types.StructType;
import scala.jdk.javaapi.CollectionConverters;

/**
 * A plan as one Spark SQL SELECT: the same Catalyst expressions that {@code treat} applies
 * (validity bounds, outlier limits, filling, scaling, flags), printed by Spark itself, with a
 * WHERE clause that leaves out the rows treat would quarantine. Columns the plan does not know are
 * not in it; a table with more columns needs them added to the list.
 */
public final class PlanSql {
  private PlanSql() {}

  public static String select(SparkSession spark, Plan plan, String table) {
    StructType schema = schemaOf(plan);
    Dataset<Row> empty = Treatments.withGroupIndex(spark.createDataFrame(List.of(), schema), plan);
    List<Column> projection = TreatedTable.projection(schema, plan);
    List<String> items = new ArrayList<>();
    for (NamedExpression e : projectList(empty.select(projection.toArray(new Column[0])))) {
      items.add(((Expression) e).sql());
    }
    StringBuilder sql = new StringBuilder("SELECT\n  ").append(String.join(",\n  ", items)).append("\nFROM ");
    java.util.Optional<dev.sluice.plan.GroupFigures> groups = Treatments.groups(plan);
    if (groups.isPresent()) {
      // Each row's group index, computed once, for the group-wise limits and fill values.
      String index = ((Expression) projectList(empty.select(Treatments.groupIndex(groups.get())
          .alias(Treatments.GROUP_INDEX))).get(0)).sql();
      sql.append("(SELECT *, ").append(index).append(" FROM ").append(quoteTable(table)).append(") AS grouped_rows");
    } else {
      sql.append(quoteTable(table));
    }
    if (TreatedTable.quarantines(plan, Optional.empty())) {
      Column keep = size(TreatedTable.reasons(plan, Optional.empty())).equalTo(0).alias("keep");
      String condition = ((Expression) projectList(empty.select(keep)).get(0)).sql();
      sql.append("\nWHERE ").append(condition.substring(0, condition.lastIndexOf(" AS ")));
    }
    return sql.append('\n').toString();
  }

  /** The table of a plan: its columns with the types they had when it was fitted, in order. */
  static StructType schemaOf(Plan plan) {
    List<StructField> fields = new ArrayList<>();
    for (ColumnPlan cp : plan.columns()) {
      DataType t;
      try {
        t = DataType.fromDDL(cp.type());
      } catch (RuntimeException e) {
        throw SluiceException.usage("The plan gives column " + cp.name() + " the type " + cp.type()
            + ", which Spark does not know");
      }
      fields.add(new StructField(cp.name(), t, true, org.apache.spark.sql.types.Metadata.empty()));
    }
    return new StructType(fields.toArray(new StructField[0]));
  }

  private static List<NamedExpression> projectList(Dataset<Row> selected) {
    LogicalPlan analyzed = selected.queryExecution().analyzed();
    return CollectionConverters.asJava(((Project) analyzed).projectList());
  }

  /** A table name as SQL: each dotted part in backticks (a backtick inside doubled). */
  static String quoteTable(String table) {
    List<String> parts = new ArrayList<>();
    for (String part : table.split("\\.", -1)) {
      parts.add("`" + part.replace("`", "``") + "`");
    }
    return String.join(".", parts);
  }
}
