package dev.sluice.cli;

import static org.assertj.core.api.Assertions.assertThat;

import dev.sluice.testing.SharedSpark;
import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.ExtendWith;
import org.junit.jupiter.api.io.TempDir;

/** Exit codes and one-line messages of the command line. */
@ExtendWith(SharedSpark.class)
class CommandLineTest {
  @TempDir Path tmp;

  record Result(int code, String out, String err) {}

  static Result run(String... args) {
    ByteArrayOutputStream out = new ByteArrayOutputStream();
    ByteArrayOutputStream err = new ByteArrayOutputStream();
    int code = Main.run(args, new PrintStream(out, true, StandardCharsets.UTF_8),
        new PrintStream(err, true, StandardCharsets.UTF_8));
    return new Result(code, out.toString(StandardCharsets.UTF_8), err.toString(StandardCharsets.UTF_8));
  }

  private static String lastLine(String s) {
    String[] lines = s.strip().split("\\R");
    return lines[lines.length - 1];
  }

  @Test
  void helpPrintsUsageAndSucceeds() {
    Result r = run("--help");
    assertThat(r.code()).isZero();
    assertThat(r.out()).contains("sluice run").contains("sluice survey").contains("Exit codes");
  }

  @Test
  void noCommandIsAUsageError() {
    Result r = run();
    assertThat(r.code()).isEqualTo(2);
    assertThat(r.err().strip()).isEqualTo("sluice: No command given; expected run, survey, fit, treat or explain (see sluice --help)");
  }

  @Test
  void unknownCommandAndOptionAreUsageErrors() {
    assertThat(run("clean").code()).isEqualTo(2);
    Result r = run("run", "--input", "x", "--output", "y", "--colour", "red");
    assertThat(r.code()).isEqualTo(2);
    assertThat(r.err().strip()).isEqualTo("sluice: Unknown option --colour (see sluice --help)");
  }

  @Test
  void missingOutputIsAUsageError() {
    Result r = run("survey", "--input", "sample-parquet");
    assertThat(r.code()).isEqualTo(2);
    assertThat(r.err().strip()).isEqualTo("sluice: Missing --output DIR (see sluice --help)");
  }

  @Test
  void missingInputPathIsAnInputError(SparkSession spark) {
    String missing = tmp.resolve("no-such-table").toString();
    Result r = run("survey", "--input", missing, "--output", tmp.resolve("o").toString());
    assertThat(r.code()).isEqualTo(3);
    assertThat(lastLine(r.err())).isEqualTo("sluice: Input path " + missing + " does not exist");
  }

  @Test
  void unreadableTableIsAnInputError(SparkSession spark) throws Exception {
    Path bogus = tmp.resolve("bogus.parquet");
    Files.writeString(bogus, "not parquet at all");
    Result r = run("survey", "--input", bogus.toString(), "--output", tmp.resolve("o").toString());
    assertThat(r.code()).isEqualTo(3);
    assertThat(lastLine(r.err())).startsWith("sluice: Cannot read " + bogus + " as parquet: ");
  }

  @Test
  void unknownSettingIsAConfigError(SparkSession spark) {
    Result r = run("survey", "--input", "sample-parquet", "--output", tmp.resolve("o").toString(),
        "--set", "defaults.outliers.iqr-kk=2");
    assertThat(r.code()).isEqualTo(2);
    assertThat(lastLine(r.err())).startsWith("sluice: Unknown setting sluice.defaults.outliers.iqr-kk");
  }

  @Test
  void columnNamedInConfigButAbsentIsAConfigError(SparkSession spark) {
    Result r = run("survey", "--input", "sample-parquet", "--output", tmp.resolve("o").toString(),
        "--set", "columns.no_such_column.role=keep");
    assertThat(r.code()).isEqualTo(2);
    assertThat(lastLine(r.err())).contains("no_such_column").contains("not in the table");
  }

  @Test
  void outputInsideInputIsRefused(SparkSession spark) {
    Result r = run("survey", "--input", "sample-parquet", "--output", "sample-parquet/out");
    assertThat(r.code()).isEqualTo(2);
    assertThat(lastLine(r.err())).contains("overlaps input");
  }

  @Test
  void surveyWritesNoTreatedData(SparkSession spark) {
    Path o = tmp.resolve("survey");
    Result r = run("survey", "--input", "sample-parquet", "--output", o.toString());
    assertThat(r.code()).as(r.err()).isZero();
    assertThat(o.resolve("plan.json")).exists();
    assertThat(o.resolve("summary.csv")).exists();
    assertThat(o.resolve("treated")).doesNotExist();
  }
}
