package dev.sluice.report;

import static org.assertj.core.api.Assertions.assertThat;

import dev.sluice.testing.SharedSpark;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.ExtendWith;
import org.junit.jupiter.api.io.TempDir;

/**
 * The small Parquet tables the driver writes itself. Reference: Spark's own reader and writer; the
 * table read back must equal the same rows as a Spark DataFrame, in schema and in content.
 */
@ExtendWith(SharedSpark.class)
class OutputsTest {
  @TempDir Path tmp;

  private static Map<String, Class<?>> columns() {
    Map<String, Class<?>> c = new LinkedHashMap<>();
    c.put("column", String.class);
    c.put("rows", Long.class);
    c.put("share", Double.class);
    c.put("kept", Boolean.class);
    c.put("with space.and dot", String.class);
    return c;
  }

  private static Map<String, Object> row(Object... values) {
    Map<String, Object> r = new HashMap<>();
    int i = 0;
    for (String name : columns().keySet()) {
      r.put(name, values[i++]);
    }
    return r;
  }

  @Test
  void aTableWrittenOnTheDriverReadsBackAsSparkWouldHaveWrittenIt(SparkSession spark) throws Exception {
    List<Map<String, Object>> rows = new ArrayList<>();
    rows.add(row("fridge temp °C", 10_000_000L, 0.25, true, "a"));
    rows.add(row("door.openings", -3L, Double.NaN, false, null));
    rows.add(row(null, null, Double.NEGATIVE_INFINITY, null, ""));
    rows.add(row("`quoted`", Long.MAX_VALUE, -0.0, true, "ü"));
    Path dir = tmp.resolve("summary");
    // A table already there is replaced, not added to.
    Outputs.parquet(spark, dir.toString(), columns(), List.of(row("old", 1L, 1.0, true, "x")));
    Outputs.parquet(spark, dir.toString(), columns(), rows);

    Dataset<Row> read = spark.read().parquet(dir.toString());
    Dataset<Row> expected = Outputs.dataset(spark, columns(), rows);
    assertThat(read.schema()).isEqualTo(expected.schema());
    assertThat(read.collectAsList()).containsExactlyElementsOf(expected.collectAsList());
    assertThat(Files.exists(dir.resolve("_SUCCESS"))).isTrue();
    try (var files = Files.list(dir)) {
      assertThat(files.map(p -> p.getFileName().toString()).filter(n -> n.endsWith(".parquet")))
          .containsExactly("part-00000.snappy.parquet");
    }

    Path empty = tmp.resolve("correlations");
    Outputs.parquet(spark, empty.toString(), columns(), List.of());
    Dataset<Row> none = spark.read().parquet(empty.toString());
    assertThat(none.schema()).isEqualTo(expected.schema());
    assertThat(none.count()).isZero();
  }
}
