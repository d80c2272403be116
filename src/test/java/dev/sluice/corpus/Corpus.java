package dev.sluice.corpus;

import static org.assertj.core.api.Assertions.assertThat;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import dev.sluice.cli.Main;
import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.PrintStream;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.types.StructType;

/**
 * Shared steps of the bad-input corpus: run the command line in-process, check a refusal (exit
 * code and its one line on standard error, nothing published), or check a success (exit 0, the
 * completion marker, and every row read found again in treated/ or quarantine/).
 */
public final class Corpus {
  private Corpus() {}

  /** What one run of the command line returned and printed. */
  public record Result(int code, String out, String err) {
    /** The non-blank lines of standard error. */
    public List<String> errLines() {
      return Arrays.stream(err.split("\\R")).filter(l -> !l.isBlank()).toList();
    }

    /** The last line of standard error: where the one-line error message goes. */
    public String lastErrLine() {
      List<String> lines = errLines();
      return lines.isEmpty() ? "" : lines.get(lines.size() - 1);
    }

    /** Everything printed, for assertion descriptions. */
    public String shown() {
      return "exit " + code + "\n--- out ---\n" + out + "--- err ---\n" + err;
    }
  }

  public static Result run(String... args) {
    ByteArrayOutputStream out = new ByteArrayOutputStream();
    ByteArrayOutputStream err = new ByteArrayOutputStream();
    int code =
        Main.run(
            args,
            new PrintStream(out, true, StandardCharsets.UTF_8),
            new PrintStream(err, true, StandardCharsets.UTF_8));
    return new Result(
        code, out.toString(StandardCharsets.UTF_8), err.toString(StandardCharsets.UTF_8));
  }

  /** {@code command --input in --output out} followed by {@code more}. */
  public static Result run(String command, Path in, Path out, String... more) {
    List<String> args = new ArrayList<>(List.of(command, "--input", in.toString(), "--output", out.toString()));
    args.addAll(List.of(more));
    return run(args.toArray(new String[0]));
  }

  /**
   * A refusal: the exit code, the exact one-line message (after the {@code sluice: } prefix) as
   * the last line of standard error, and no completion marker under {@code out} (may be null).
   */
  public static void assertRefused(Result r, int code, String message, Path out) {
    assertThat(r.code()).as(r.shown()).isEqualTo(code);
    assertThat(r.lastErrLine()).as(r.shown()).isEqualTo("sluice: " + message);
    assertThat(r.out()).as("nothing reported as finished").doesNotContain("finished");
    if (out != null) {
      assertThat(out.resolve("_COMMITTED")).as("nothing published").doesNotExist();
    }
  }

  /**
   * As {@link #assertRefused}, for a message whose tail comes from Spark or Hadoop and may change
   * with their versions: only {@code prefix} is pinned. Returns the message for further checks.
   */
  public static String assertRefusedWith(Result r, int code, String prefix, Path out) {
    assertThat(r.code()).as(r.shown()).isEqualTo(code);
    assertThat(r.lastErrLine()).as(r.shown()).startsWith("sluice: " + prefix);
    assertThat(r.lastErrLine().length()).as("a reason follows " + prefix).isGreaterThan(("sluice: " + prefix).length());
    assertThat(r.out()).as("nothing reported as finished").doesNotContain("finished");
    if (out != null) {
      assertThat(out.resolve("_COMMITTED")).as("nothing published").doesNotExist();
    }
    return r.lastErrLine();
  }

  /** As {@link #assertRefused}, for a refusal that happens before any work: one line in all. */
  public static void assertRefusedAtOnce(Result r, int code, String message, Path out) {
    assertRefused(r, code, message, out);
    assertThat(r.errLines()).as(r.shown()).hasSize(1);
  }

  /**
   * A successful run of {@code run}: exit 0, the marker written, run.json reads {@code rows}
   * rows, and they are all in treated/ plus quarantine/, which run.json says reconciles.
   */
  public static void assertReconciled(SparkSession spark, Result r, Path out, long rows) {
    assertThat(r.code()).as(r.shown()).isZero();
    assertThat(out.resolve("_COMMITTED")).as("completion marker; %s", r.shown()).exists();
    JsonNode record = json(out.resolve("run.json"));
    long treated = count(spark, out.resolve("treated"));
    long held = count(spark, out.resolve("quarantine"));
    assertThat(record.at("/rows/read").asLong()).as("rows read").isEqualTo(rows);
    assertThat(treated + held).as("rows read = treated + quarantined").isEqualTo(rows);
    assertThat(record.at("/rows/treated").asLong()).as("run.json treated").isEqualTo(treated);
    assertThat(record.at("/rows/quarantined").asLong()).as("run.json quarantined").isEqualTo(held);
    assertThat(record.at("/rows/reconciled").isBoolean()).as("reconciled is recorded").isTrue();
    assertThat(record.at("/rows/reconciled").asBoolean()).as("reconciled").isTrue();
  }

  /**
   * A successful run's outputs read back once, for a run that several cases check: the counts,
   * treated/ in check order, the schema of treated/, and the summary rows. Empty when the run did
   * not finish; {@link #assertReconciled} then fails with what the run printed.
   */
  public record Finished(
      Result result, Path out, JsonNode record, long treatedCount, long heldCount,
      StructType treatedSchema, List<Row> treatedRows, List<Row> summaryRows) {

    /** As {@link Corpus#assertReconciled}, from the counts read once. */
    public void assertReconciled(long rows) {
      assertThat(result.code()).as(result.shown()).isZero();
      assertThat(out.resolve("_COMMITTED")).as("completion marker; %s", result.shown()).exists();
      assertThat(record.at("/rows/read").asLong()).as("rows read").isEqualTo(rows);
      assertThat(treatedCount + heldCount).as("rows read = treated + quarantined").isEqualTo(rows);
      assertThat(record.at("/rows/treated").asLong()).as("run.json treated").isEqualTo(treatedCount);
      assertThat(record.at("/rows/quarantined").asLong()).as("run.json quarantined").isEqualTo(heldCount);
      assertThat(record.at("/rows/reconciled").isBoolean()).as("reconciled is recorded").isTrue();
      assertThat(record.at("/rows/reconciled").asBoolean()).as("reconciled").isTrue();
    }

    /** The summary row of {@code column}. */
    public Row summaryRow(String column) {
      List<Row> rows = summaryRows.stream().filter(r -> column.equals(r.getAs("column"))).toList();
      assertThat(rows).as("summary rows of " + column).hasSize(1);
      return rows.get(0);
    }
  }

  /** Reads a run's outputs once; {@code order} sorts treated/ (a column every row has). */
  public static Finished finish(SparkSession spark, Result r, Path out, String order) {
    if (r.code() != 0 || !Files.exists(out.resolve("_COMMITTED"))) {
      return new Finished(r, out, new ObjectMapper().createObjectNode(), -1, -1, new StructType(),
          List.of(), List.of());
    }
    Dataset<Row> t = treated(spark, out);
    return new Finished(r, out, json(out.resolve("run.json")), t.count(),
        count(spark, out.resolve("quarantine")), t.schema(), t.orderBy(order).collectAsList(),
        spark.read().parquet(out.resolve("summary").toString()).collectAsList());
  }

  /** Rows of the Parquet table at {@code dir}; 0 when it was not written. */
  public static long count(SparkSession spark, Path dir) {
    return Files.exists(dir) ? spark.read().parquet(dir.toString()).count() : 0;
  }

  public static Dataset<Row> treated(SparkSession spark, Path out) {
    return spark.read().parquet(out.resolve("treated").toString());
  }

  public static Dataset<Row> quarantine(SparkSession spark, Path out) {
    return spark.read().parquet(out.resolve("quarantine").toString());
  }

  /** The summary row of {@code column}, read from the summary/ Parquet table. */
  public static Row summaryRow(SparkSession spark, Path out, String column) {
    List<Row> rows =
        spark.read().parquet(out.resolve("summary").toString()).collectAsList().stream()
            .filter(r -> column.equals(r.getAs("column")))
            .toList();
    assertThat(rows).as("summary rows of " + column).hasSize(1);
    return rows.get(0);
  }

  /** The column plan of {@code column} in plan.json. */
  public static JsonNode planOf(Path out, String column) {
    for (JsonNode c : json(out.resolve("plan.json")).get("columns")) {
      if (column.equals(c.get("name").asText())) {
        return c;
      }
    }
    throw new AssertionError("plan.json has no column " + column);
  }

  public static JsonNode json(Path file) {
    try {
      return new ObjectMapper().readTree(file.toFile());
    } catch (IOException e) {
      throw new UncheckedIOException(e);
    }
  }

  /** Writes {@code data} as one Parquet file under {@code dir} and returns {@code dir}. */
  public static Path parquet(Dataset<Row> data, Path dir) {
    data.coalesce(1).write().parquet(dir.toString());
    return dir;
  }

  /**
   * A small table of the demo kind, {@code rows} pallet checks: pallet_id (text), depot (text),
   * air_temp_c (2.0 to 5.8, one value per tenth), door_openings (0 to 6). No outliers, no gaps.
   */
  public static Path palletChecks(SparkSession spark, Path dir, int rows) {
    return parquet(
        spark.sql(
            "SELECT CONCAT('PL-', LPAD(CAST(id AS STRING), 4, '0')) AS pallet_id,"
                + " CONCAT('D', CAST(id % 3 AS STRING)) AS depot,"
                + " 2.0D + CAST(id % 39 AS DOUBLE) / 10 AS air_temp_c,"
                + " CAST(id % 7 AS INT) AS door_openings FROM range("
                + rows
                + ")"),
        dir);
  }

  public static Path text(Path file, String content) {
    try {
      Files.writeString(file, content, StandardCharsets.UTF_8);
      return file;
    } catch (IOException e) {
      throw new UncheckedIOException(e);
    }
  }
}
