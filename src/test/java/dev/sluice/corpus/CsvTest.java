package dev.sluice.corpus;

import static dev.sluice.corpus.Corpus.assertReconciled;
import static dev.sluice.corpus.Corpus.assertRefused;
import static dev.sluice.corpus.Corpus.assertRefusedWith;
import static dev.sluice.corpus.Corpus.quarantine;
import static dev.sluice.corpus.Corpus.run;
import static dev.sluice.corpus.Corpus.summaryRow;
import static dev.sluice.corpus.Corpus.text;
import static dev.sluice.corpus.Corpus.treated;
import static org.assertj.core.api.Assertions.assertThat;

import com.fasterxml.jackson.databind.JsonNode;
import dev.sluice.testing.SharedSpark;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.types.DataTypes;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.ExtendWith;
import org.junit.jupiter.api.io.TempDir;

/**
 * CSV files as they arrive from depots: short and long lines, text in numeric columns, a
 * byte-order mark, other delimiters, Windows line ends, line breaks inside quotes, no header,
 * nothing at all. A line that cannot be parsed goes to quarantine with its raw text; a file that
 * cannot be read as a table is refused with exit 3 and its path; no line is lost in silence.
 */
@ExtendWith(SharedSpark.class)
class CsvTest {
  @TempDir Path tmp;

  private static final String SCHEMA = "input.csv.schema=\"pallet_id STRING, air_temp_c DOUBLE,"
      + " door_openings INT\"";

  private Path out() {
    return tmp.resolve("out");
  }

  @Test
  void linesWithTooFewOrTooManyFieldsAreQuarantinedWithTheirRawText(SparkSession spark) {
    Path csv = text(tmp.resolve("depot-3.csv"), "pallet_id,air_temp_c,door_openings\n"
        + "PL-1,3.5,4\nPL-2,4.0\nPL-3,2.5,3,9\nPL-4,3.0,2\nPL-5,3.2,1\n");
    Corpus.Result r = run("run", csv, out());
    assertReconciled(spark, r, out(), 5);
    List<Row> held = quarantine(spark, out()).orderBy("pallet_id").collectAsList();
    assertThat(held).extracting(x -> x.<String>getAs("pallet_id")).containsExactly("PL-2", "PL-3");
    assertThat(held).extracting(x -> x.<String>getAs("quarantine_rule")).containsOnly("malformed-row");
    assertThat(held).extracting(x -> x.<String>getAs("quarantine_value"))
        .containsExactly("PL-2,4.0", "PL-3,2.5,3,9");
    assertThat(treated(spark, out()).orderBy("pallet_id").collectAsList())
        .extracting(x -> x.<String>getAs("pallet_id")).containsExactly("PL-1", "PL-4", "PL-5");
  }

  @Test
  void treatOnCsvCountsMalformedLinesInAndMeasuresDriftOnTheOthers(SparkSession spark) {
    Path fitCsv = text(tmp.resolve("depot-5-fit.csv"), "pallet_id,air_temp_c,door_openings\n"
        + "PL-1,3.5,4\nPL-2,4.0,2\nPL-3,2.5,3\nPL-4,3.0,2\nPL-5,3.2,1\n");
    Path fitted = tmp.resolve("fitted");
    Corpus.Result f = run("fit", fitCsv, fitted, "--set", SCHEMA);
    assertThat(f.code()).as(f.shown()).isZero();
    Path dayCsv = text(tmp.resolve("depot-5-day.csv"), "pallet_id,air_temp_c,door_openings\n"
        + "PL-6,3.5,4\nPL-7,4.0\nPL-8,2.5,3\nPL-9,,2\n");
    Corpus.Result r = run("treat", dayCsv, out(), "--plan", fitted.resolve("plan.json").toString(), "--set", SCHEMA);
    assertReconciled(spark, r, out(), 4);
    assertThat(quarantine(spark, out()).count()).isEqualTo(1);
    // Drift over the three well-formed lines: one of them lacks air_temp_c.
    JsonNode air = null;
    for (JsonNode d : Corpus.json(out().resolve("run.json")).get("drift")) {
      if (d.get("column").asText().equals("air_temp_c")) {
        air = d;
      }
    }
    assertThat(air.get("null_rate_now").asDouble()).isCloseTo(1.0 / 3, org.assertj.core.api.Assertions.within(1e-12));
    assertThat(air.get("null_rate_fit").asDouble()).isZero();
  }

  @Test
  void textInANumericColumnWithoutASchemaMakesTheColumnText(SparkSession spark) {
    // README: without input.csv.schema types are inferred, and one text value makes text.
    Path csv = text(tmp.resolve("depot-4.csv"), "pallet_id,air_temp_c\nPL-1,3.5\nPL-2,n/a\nPL-3,2.5\n");
    Corpus.Result r = run("run", csv, out());
    assertReconciled(spark, r, out(), 3);
    assertThat(Corpus.count(spark, out().resolve("quarantine"))).as("nothing held back").isZero();
    assertThat(summaryRow(spark, out(), "air_temp_c").<String>getAs("type")).isEqualTo("string");
    assertThat(treated(spark, out()).orderBy("pallet_id").collectAsList())
        .extracting(x -> x.<String>getAs("air_temp_c")).containsExactly("3.5", "n/a", "2.5");
  }

  @Test
  void semicolonDelimiterWithADecimalCommaUnderASchemaQuarantinesThatLine(SparkSession spark) {
    Path csv = text(tmp.resolve("depot-5.csv"), "pallet_id;air_temp_c;door_openings\n"
        + "PL-1;3.5;4\nPL-2;3,5;2\nPL-3;2.5;1\nPL-4;4.0;0\n");
    Corpus.Result r = run("run", csv, out(), "--set", "input.csv.delimiter=\";\"", "--set", SCHEMA);
    assertReconciled(spark, r, out(), 4);
    Row held = quarantine(spark, out()).first();
    assertThat(held.<String>getAs("pallet_id")).isEqualTo("PL-2");
    assertThat(held.<String>getAs("quarantine_value")).isEqualTo("PL-2;3,5;2");
    assertThat(treated(spark, out()).orderBy("pallet_id").collectAsList())
        .extracting(x -> x.<Double>getAs("air_temp_c")).containsExactly(3.5, 2.5, 4.0);
  }

  @Test
  void tabDelimiterGivenAsAHoconEscape(SparkSession spark) {
    Path csv = text(tmp.resolve("depot-6.tsv.csv"), "pallet_id\tair_temp_c\tdoor_openings\n"
        + "PL-1\t3.5\t4\nPL-2\t2.5\t1\nPL-3\t4.5\t0\n");
    Corpus.Result r = run("run", csv, out(), "--set", "input.csv.delimiter=\"\\t\"");
    assertReconciled(spark, r, out(), 3);
    assertThat(treated(spark, out()).columns()).containsExactly("pallet_id", "air_temp_c", "door_openings");
    assertThat(treated(spark, out()).orderBy("pallet_id").collectAsList())
        .extracting(x -> x.<Double>getAs("door_openings")).containsExactly(4.0, 1.0, 0.0);
  }

  @Test
  void byteOrderMarkIsNotPartOfTheFirstColumnName(SparkSession spark) {
    Path csv = text(tmp.resolve("depot-7.csv"), "\uFEFFpallet_id,air_temp_c\nPL-1,3.5\nPL-2,4.0\nPL-3,2.5\n");
    Corpus.Result r = run("run", csv, out(), "--set", "columns.pallet_id.role=identifier");
    assertReconciled(spark, r, out(), 3);
    assertThat(treated(spark, out()).columns()).containsExactly("pallet_id", "air_temp_c");
    assertThat(summaryRow(spark, out(), "pallet_id").<String>getAs("role")).isEqualTo("identifier");
    assertThat(treated(spark, out()).orderBy("pallet_id").first().<String>getAs("pallet_id")).isEqualTo("PL-1");
  }

  @Test
  void windowsLineEndsLeaveNoCarriageReturnInTheLastColumn(SparkSession spark) {
    Path csv = text(tmp.resolve("depot-8.csv"), "pallet_id,air_temp_c\r\nPL-1,3.5\r\nPL-2,4.0\r\nPL-3,2.5\r\n");
    Corpus.Result r = run("run", csv, out());
    assertReconciled(spark, r, out(), 3);
    assertThat(treated(spark, out()).columns()).containsExactly("pallet_id", "air_temp_c");
    assertThat(treated(spark, out()).schema().apply("air_temp_c").dataType()).isEqualTo(DataTypes.DoubleType);
    assertThat(treated(spark, out()).orderBy("pallet_id").collectAsList())
        .extracting(x -> x.<Double>getAs("air_temp_c")).containsExactly(3.5, 4.0, 2.5);
  }

  @Test
  void quotedLineBreaksAndCommasStayInsideTheirField(SparkSession spark) {
    Path csv = text(tmp.resolve("depot-9.csv"), "pallet_id,note,air_temp_c\n"
        + "PL-1,\"door left\nopen overnight\",3.5\nPL-2,ok,4.0\nPL-3,\"lid, cracked\",2.5\n");
    Corpus.Result r = run("run", csv, out());
    assertReconciled(spark, r, out(), 3);
    List<Row> rows = treated(spark, out()).orderBy("pallet_id").collectAsList();
    assertThat(rows).extracting(x -> x.<String>getAs("note"))
        .containsExactly("door left\nopen overnight", "ok", "lid, cracked");
    assertThat(rows).extracting(x -> x.<Double>getAs("air_temp_c")).containsExactly(3.5, 4.0, 2.5);
  }

  @Test
  void quoteNeverClosedDoesNotSwallowTheLinesAfterIt(SparkSession spark) {
    // Four records; the second opens a quote it never closes. Either the file is refused,
    // naming it, or every later pallet is still accounted for as a row of its own.
    Path csv = text(tmp.resolve("depot-10.csv"), "pallet_id,note,air_temp_c\n"
        + "PL-1,ok,3.5\nPL-2,\"lid cracked,4.0\nPL-3,ok,2.5\nPL-4,ok,3.0\n");
    Corpus.Result r = run("run", csv, out());
    if (r.code() == 3) {
      assertRefusedWith(r, 3, "", out());
      assertThat(r.lastErrLine()).contains(csv.toString());
      return;
    }
    assertThat(r.code()).as(r.shown()).isZero();
    assertThat(Corpus.json(out().resolve("run.json")).at("/rows/read").asLong())
        .as("PL-3 and PL-4 are rows, not text inside PL-2's note").isEqualTo(4);
    assertReconciled(spark, r, out(), 4);
  }

  @Test
  void firstLineOfNegativeAndExponentNumbersMeansNoHeader() {
    Path csv = text(tmp.resolve("depot-11.csv"), "-1.5,2e3,0\n1.5,3e3,2\n");
    Corpus.Result r = run("run", csv, out());
    assertRefused(r, 3, "CSV file " + csv + " seems to have no header row (its first line is all"
        + " numbers); set input.csv.header = false to read it without one", out());
  }

  @Test
  void headerOffReadsTheFirstLineAsData(SparkSession spark) {
    Path csv = text(tmp.resolve("depot-12.csv"), "PL-1,3.5\nPL-2,4.5\nPL-3,2.5\n");
    Corpus.Result r = run("run", csv, out(), "--set", "input.csv.header=false");
    assertReconciled(spark, r, out(), 3);
    assertThat(treated(spark, out()).columns()).containsExactly("_c0", "_c1");
    assertThat(treated(spark, out()).orderBy("_c0").collectAsList())
        .extracting(x -> x.<String>getAs("_c0")).containsExactly("PL-1", "PL-2", "PL-3");
  }

  @Test
  void headerOnlyGivesNoRowsAndTheHeaderColumns(SparkSession spark) {
    Path csv = text(tmp.resolve("depot-13.csv"), "pallet_id,air_temp_c\n");
    Corpus.Result r = run("run", csv, out());
    assertReconciled(spark, r, out(), 0);
    assertThat(treated(spark, out()).columns()).containsExactly("pallet_id", "air_temp_c");
  }

  @Test
  void emptyFileIsBadInputNamingIt() throws Exception {
    Path csv = Files.write(tmp.resolve("depot-14.csv"), new byte[0]);
    Corpus.Result r = run("run", csv, out());
    assertRefusedWith(r, 3, "", out());
    assertThat(r.lastErrLine()).contains(csv.toString()).doesNotContain("unexpected failure");
  }

  @Test
  void fileOfBlankLinesIsBadInputNamingIt() {
    Path csv = text(tmp.resolve("depot-15.csv"), "\n\n\n");
    Corpus.Result r = run("run", csv, out());
    assertRefusedWith(r, 3, "", out());
    assertThat(r.lastErrLine()).contains(csv.toString()).doesNotContain("unexpected failure");
  }

  @Test
  void headerThatDisagreesWithTheConfiguredSchemaIsBadInputNamingTheFile() {
    Path csv = text(tmp.resolve("depot-16.csv"), "pallet,temp,doors\nPL-1,3.5,4\nPL-2,4.0,1\n");
    Corpus.Result r = run("run", csv, out(), "--set", SCHEMA);
    assertRefusedWith(r, 3, "", out());
    assertThat(r.lastErrLine()).contains(csv.toString()).doesNotContain("unexpected failure");
  }

  @Test
  void repeatedHeaderNameIsBadInputNamingFileAndColumn() {
    Path csv = text(tmp.resolve("depot-17.csv"), "reading,reading,depot\n1.5,2.5,D1\n2.5,3.5,D2\n");
    Corpus.Result r = run("run", csv, out());
    assertRefusedWith(r, 3, "", out());
    assertThat(r.lastErrLine()).contains(csv.toString()).contains("reading")
        .doesNotContain("unexpected failure");
  }

  @Test
  void schemaThatIsNotSparkDdlIsAConfigError() {
    Path csv = text(tmp.resolve("depot-18.csv"), "pallet_id,air_temp_c\nPL-1,3.5\n");
    Corpus.Result r = run("run", csv, out(), "--set", "input.csv.schema=\"pallet_id STRANG\"");
    String message = assertRefusedWith(r, 2,
        "Cannot set sluice.input.csv.schema to \"pallet_id STRANG\": ", out());
    assertThat(message).contains("STRANG");
  }
}
