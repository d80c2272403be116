package dev.sluice.profile;

import org.apache.spark.sql.types.BooleanType;
import org.apache.spark.sql.types.DataType;
import org.apache.spark.sql.types.DateType;
import org.apache.spark.sql.types.NumericType;
import org.apache.spark.sql.types.StringType;
import org.apache.spark.sql.types.TimestampNTZType;
import org.apache.spark.sql.types.TimestampType;

/** How a column is profiled, from its Spark type. */
public enum ColumnKind {
  /** Integer, floating-point and decimal columns: moments, quantiles, fences, treatment. */
  NUMERIC,
  /** Strings and booleans: distinct count and most frequent value; mode imputation. */
  CATEGORICAL,
  /** Dates and timestamps: range only, never treated. */
  TEMPORAL,
  /** Structs, arrays, maps, binary: counted and passed through untouched. */
  OTHER;

  public static ColumnKind of(DataType type) {
    if (type instanceof NumericType) {
      return NUMERIC;
    }
    if (type instanceof StringType || type instanceof BooleanType) {
      return CATEGORICAL;
    }
    if (type instanceof DateType || type instanceof TimestampType || type instanceof TimestampNTZType) {
      return TEMPORAL;
    }
    return OTHER;
  }
}
