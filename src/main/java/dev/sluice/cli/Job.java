package dev.sluice.cli;

import static org.apache.spark.sql.functions.count;
import static org.apache.spark.sql.functions.lit;

import dev.sluice.SluiceException;
import dev.sluice.Sluice;
import dev.sluice.config.InputSettings;
import dev.sluice.config.Settings;
import dev.sluice.io.InputTable;
import dev.sluice.io.TableReader;
import dev.sluice.report.CorrelationTable;
import dev.sluice.report.Outputs;
import dev.sluice.report.SummaryTable;
import dev.sluice.treat.TreatedTable;
import java.io.PrintStream;
import java.time.Instant;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.UUID;
import java.util.concurrent.TimeUnit;
import org.apache.hadoop.fs.Path;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Observation;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SaveMode;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.storage.StorageLevel;
import scala.concurrent.Await;
import scala.concurrent.duration.Duration;

/**
 * One run of {@code survey} or {@code run}: read, fit, (treat and write), then the summary,
 * correlations, plan and run record. Reads like an outline; each step lives in its package.
 */
public final class Job {
  private final SparkSession spark;
  private final Arguments args;
  private final Settings settings;
  private final PrintStream progress;

  public Job(SparkSession spark, Arguments args, Settings settings, PrintStream progress) {
    this.spark = spark;
    this.args = args;
    this.settings = settings;
    this.progress = progress;
  }

  /** Runs the job and returns the run record that was written as run.json. */
  public Map<String, Object> execute() {
    String runId = UUID.randomUUID().toString();
    Instant started = Instant.now();
    InputTable table = TableReader.read(spark, args.input(), inputSettings());
    String out = args.output().replaceAll("/+$", "");
    checkOutput(table.path(), out);
    Sluice.Fit fit = Sluice.fit(table.data(), settings, table.partitionColumns(), this::say);
    Map<String, Double> seconds = new LinkedHashMap<>(fit.seconds());
    Map<String, Long> rows = new LinkedHashMap<>();
    rows.put("read", fit.profile().rows());
    if (args.command().equals("run")) {
      say("pass 3 of 3: treating and writing " + out + "/treated");
      long t = System.nanoTime();
      rows.putAll(writeTreated(table, fit, out));
      seconds.put("treat-and-write", (System.nanoTime() - t) / 1e9);
    }
    long t = System.nanoTime();
    writeTables(fit, out);
    seconds.put("summary", (System.nanoTime() - t) / 1e9);
    Map<String, Object> record = RunRecord.of(runId, args, table, rows, seconds, started, spark);
    Outputs.json(spark, out + "/run.json", record);
    return record;
  }

  private InputSettings inputSettings() {
    InputSettings s = settings.input();
    return args.format().isPresent() ? new InputSettings(args.format(), s.csvDelimiter(), s.csvSchema()) : s;
  }

  /** Treated and quarantined rows from one read of the input; counts observed while writing. */
  private Map<String, Long> writeTreated(InputTable table, Sluice.Fit fit, String out) {
    Dataset<Row> data = table.data();
    boolean split = TreatedTable.quarantines(fit.plan());
    if (split) {
      data = data.persist(StorageLevel.MEMORY_AND_DISK());
    }
    Observation treatedCount = new Observation("sluice-treated");
    Dataset<Row> treated = Sluice.treat(data, fit.plan()).observe(treatedCount, count(lit(1)).as("rows"));
    var writer = treated.write().mode(SaveMode.Overwrite);
    if (!table.partitionColumns().isEmpty()) {
      writer = writer.partitionBy(table.partitionColumns().toArray(new String[0]));
    }
    writer.parquet(out + "/treated");
    Map<String, Long> rows = new LinkedHashMap<>();
    rows.put("treated", observed(treatedCount));
    rows.put("quarantined", 0L);
    if (split) {
      Observation q = new Observation("sluice-quarantined");
      Sluice.quarantine(data, fit.plan()).observe(q, count(lit(1)).as("rows"))
          .write().mode(SaveMode.Overwrite).parquet(out + "/quarantine");
      rows.put("quarantined", observed(q));
      data.unpersist();
    }
    return rows;
  }

  private static long observed(Observation o) {
    try {
      Row r = Await.result(o.future(), Duration.create(10, TimeUnit.MINUTES));
      return r.getLong(0);
    } catch (Exception e) {
      throw new SluiceException(SluiceException.Kind.INTERNAL,
          "Row count of " + o.name() + " was not reported: " + e.getMessage(), e);
    }
  }

  private void writeTables(Sluice.Fit fit, String out) {
    List<Map<String, Object>> summary = SummaryTable.rows(fit.profile(), fit.plan(), fit.stats());
    Outputs.parquet(spark, out + "/summary", SummaryTable.COLUMNS, summary);
    Outputs.csv(spark, out + "/summary.csv", SummaryTable.COLUMNS, summary);
    List<Map<String, Object>> pairs = CorrelationTable.rows(fit.plan().collinearity());
    Outputs.parquet(spark, out + "/correlations", CorrelationTable.COLUMNS, pairs);
    Outputs.csv(spark, out + "/correlations.csv", CorrelationTable.COLUMNS, pairs);
    Outputs.json(spark, out + "/plan.json", fit.plan());
  }

  /** The output must not be, contain or lie inside the input: the input is never written to. */
  static void checkOutput(String input, String output) {
    String in = normalise(input);
    String o = normalise(output);
    if (o.equals(in) || o.startsWith(in + "/") || in.startsWith(o + "/")) {
      throw SluiceException.usage("Output " + output + " overlaps input " + input
          + "; choose an output directory outside the input");
    }
  }

  private static String normalise(String p) {
    Path path = new Path(p);
    if (path.toUri().getScheme() == null) {
      return new Path(java.nio.file.Path.of(p).toAbsolutePath().normalize().toUri()).toString()
          .replaceAll("/+$", "");
    }
    return path.toString().replaceAll("/+$", "");
  }

  private void say(String line) {
    progress.println("sluice: " + line);
  }

}
