package dev.sluice.io;

import org.apache.spark.sql.Column;
import org.apache.spark.sql.functions;

/** Safe references to columns whose names may hold dots, spaces, backticks or any character. */
public final class Names {
  private Names() {}

  /** The name quoted for Spark's parser: wrapped in backticks, inner backticks doubled. */
  public static String quote(String name) {
    return "`" + name.replace("`", "``") + "`";
  }

  /** A column reference that never reads a dot as a struct field. */
  public static Column col(String name) {
    return functions.col(quote(name));
  }
}
