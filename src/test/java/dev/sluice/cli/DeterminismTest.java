package dev.sluice.cli;

import static dev.sluice.cli.Runs.json;
import static dev.sluice.cli.Runs.run;
import static org.assertj.core.api.Assertions.assertThat;

import dev.sluice.testing.Fixtures;
import dev.sluice.testing.SharedSpark;
import java.nio.file.Files;
import java.nio.file.Path;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;
import org.junit.jupiter.api.extension.ExtendWith;
import org.junit.jupiter.api.io.TempDir;

/**
 * The same input and settings give the same plan, summary and treated rows, whatever the input's
 * partitioning: with whole columns held in memory, and on the large-table path, where a pilot
 * from the first rows of a few partitions (different rows for each partitioning) aims the exact
 * quantile search and Spearman's rho comes from a row sample smaller than the table.
 */
@ExtendWith(SharedSpark.class)
class DeterminismTest {
  @TempDir Path tmp;

  @ParameterizedTest
  @ValueSource(booleans = {false, true})
  void planSummaryAndTreatedRowsDoNotDependOnPartitioning(boolean largeTablePath, SparkSession spark)
      throws Exception {
    Dataset<Row> sample = spark.read().parquet("sample-parquet");
    Path one = tmp.resolve("one");
    Path seven = tmp.resolve("seven");
    sample.coalesce(1).write().partitionBy("depot").parquet(one.toString());
    sample.repartition(7).write().partitionBy("depot").parquet(seven.toString());
    Path outOne = tmp.resolve("out-one");
    Path outSeven = tmp.resolve("out-seven");
    String[] conf = largeTablePath
        ? new String[] {"--config", "conf/sample.conf", "--set", "quantiles.max-held-values=1000",
            "--set", "quantiles.pilot-rows=1000", "--set", "collinearity.spearman-rows=1000"}
        : new String[] {"--config", "conf/sample.conf"};
    assertThat(run(concat(new String[] {"run", "--input", one.toString(), "--output", outOne.toString()}, conf)).code()).isZero();
    assertThat(run(concat(new String[] {"run", "--input", seven.toString(), "--output", outSeven.toString()}, conf)).code()).isZero();
    assertThat(json(outSeven.resolve("plan.json"))).isEqualTo(json(outOne.resolve("plan.json")));
    assertThat(Files.readString(outSeven.resolve("summary.csv"))).isEqualTo(Files.readString(outOne.resolve("summary.csv")));
    assertThat(Files.readString(outSeven.resolve("correlations.csv")))
        .isEqualTo(Files.readString(outOne.resolve("correlations.csv")));
    Dataset<Row> a = spark.read().parquet(outOne.resolve("treated").toString());
    Dataset<Row> b = spark.read().parquet(outSeven.resolve("treated").toString());
    Fixtures.assertSameRows(a, b);
  }

  private static String[] concat(String[] a, String[] b) {
    String[] out = new String[a.length + b.length];
    System.arraycopy(a, 0, out, 0, a.length);
    System.arraycopy(b, 0, out, a.length, b.length);
    return out;
  }
}
