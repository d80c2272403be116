package dev.sluice.cli;

import dev.sluice.SluiceException;
import dev.sluice.Sluice;
import dev.sluice.config.Settings;
import dev.sluice.config.SettingsLoader;
import dev.sluice.io.InputTable;
import dev.sluice.io.OutputLayout;
import dev.sluice.io.ParquetEncoding;
import dev.sluice.io.ParquetFooters;
import dev.sluice.io.PlanFile;
import dev.sluice.io.TableReader;
import dev.sluice.plan.GateCheck;
import dev.sluice.plan.Gates;
import dev.sluice.plan.Plan;
import dev.sluice.stats.Published;
import dev.sluice.report.CorrelationTable;
import dev.sluice.report.HtmlReport;
import dev.sluice.report.Outputs;
import dev.sluice.report.SummaryTable;
import dev.sluice.treat.DriftPass;
import dev.sluice.treat.TreatedTable;
import dev.sluice.treat.TreatmentSplit;
import java.io.PrintStream;
import java.time.Instant;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.OptionalDouble;
import java.util.Set;
import java.util.UUID;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.CompletionException;
import java.util.concurrent.Executor;
import org.apache.hadoop.fs.Path;
import org.apache.spark.sql.DataFrameWriter;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SaveMode;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.functions;
import org.apache.spark.storage.StorageLevel;

/**
 * One run of {@code survey}, {@code fit} or {@code run}: read, fit, (treat and write), then the
 * summary, correlations, plan, run record and report, all staged, reconciled, and published with
 * the completion marker last; or of {@code treat}: read, apply a saved plan, write. Reads like an
 * outline; each step lives in its package.
 */
public final class Job {
  static final String HUGE_METHOD_LIMIT = "spark.sql.codegen.hugeMethodLimit";
  private final SparkSession spark;
  private final Arguments args;
  private final Settings settings;
  private final Set<String> givenGates;
  private final PrintStream progress;

  /**
   * @param givenGates treat: the gate settings given on its command line (HOCON paths), which
   *     replace the plan's
   */
  public Job(SparkSession spark, Arguments args, Settings settings, Set<String> givenGates, PrintStream progress) {
    this.spark = spark;
    this.args = args;
    this.settings = settings;
    this.givenGates = givenGates;
    this.progress = progress;
  }

  /** Runs the job and returns the run record that was published as run.json. */
  public Map<String, Object> execute() {
    String runId = UUID.randomUUID().toString();
    Instant started = Instant.now();
    // Column names are taken exactly as written: "Depot" and "depot" are two columns.
    spark.conf().set("spark.sql.caseSensitive", "true");
    // Spark's generated code for a projection or aggregate over many columns easily passes 8000
    // bytes of bytecode in one method, which HotSpot never compiles: it then runs interpreted,
    // five times slower in the benchmark's write (docs/benchmarks.md). At 8000, HotSpot's own
    // limit, Spark falls back to code in smaller methods instead. A value the user set is kept.
    if (!spark.conf().contains(HUGE_METHOD_LIMIT)) {
      spark.conf().set(HUGE_METHOD_LIMIT, "8000");
    }
    InputTable table = TableReader.read(spark, args.input(), settings.input().withFormat(
        args.format().isPresent() ? args.format() : settings.input().format()));
    checkOutput(table.path(), args.output());
    OutputLayout out = OutputLayout.prepare(
        spark.sparkContext().hadoopConfiguration(), args.output(), runId, args.replace());
    InputTable selected = where(table);
    if (args.command().equals("treat")) {
      return treatWithSavedPlan(runId, started, table, selected, out);
    }
    Sluice.Fit fit = Sluice.fit(selected.wellFormed(), settings, table.partitionColumns(), this::say);
    Map<String, Double> seconds = new LinkedHashMap<>(fit.seconds());
    Map<String, Object> rows = new LinkedHashMap<>();
    // Malformed CSV lines are read but not profiled: count them in, from the read's own count.
    long read = selected.malformedColumn().isEmpty() ? fit.profile().rows()
        : selected.rowsRead().isPresent() ? selected.rowsRead().getAsLong() : selected.data().count();
    rows.put("read", read);
    boolean treats = args.command().equals("run");
    if (treats) {
      say("pass 3 of 3: treating and writing " + args.output() + "/treated");
      long t = System.nanoTime();
      // The summary tables need only the fit: their small jobs run beside the writing pass.
      CompletableFuture<Double> tables = CompletableFuture.supplyAsync(() -> timed(() -> writeTables(fit, out)),
          BESIDE);
      try {
        Map<String, Long> written = writeTreated(selected, fit.plan(), out, fit.profile().pilotDistinct(),
            fit.profile().pilot());
        reconcile(read, written);
        rows.putAll(written);
      } catch (RuntimeException e) {
        awaitQuietly(tables, e);
        throw e;
      }
      seconds.put("treat-and-write", (System.nanoTime() - t) / 1e9);
      seconds.put("summary", await(tables));
    } else {
      seconds.put("summary", timed(() -> writeTables(fit, out)));
    }
    List<GateCheck.Breach> breaches = GateCheck.check(fit.plan().gates(), GateCheck.atFit(fit.plan()),
        treats ? quarantinedShare(rows) : OptionalDouble.empty());
    Map<String, Object> record = RunRecord.of(runId, args, table, rows, seconds, started, spark);
    gates(record, fit.plan().gates(), breaches, treats);
    Outputs.json(spark, out.staged("run.json"), record);
    Outputs.text(spark, out.staged("report.html"), HtmlReport.render(new HtmlReport.Inputs(record,
        fit.profile(), fit.plan(), fit.stats(), settings,
        SettingsLoader.differencesFromDefaults(args.config().map(java.nio.file.Path::of), args.sets()))));
    publish(table, out, record, fit.plan().gates(), breaches);
    return record;
  }

  /**
   * Publishes the staged outputs; when a gate limit was passed, the treated and quarantined rows
   * go under held/ (unless the gates say publish), and the run then fails with exit code 4.
   */
  private void publish(InputTable table, OutputLayout out, Map<String, Object> record, Gates gates,
      List<GateCheck.Breach> breaches) {
    boolean partial = args.where().isPresent() && !table.partitionColumns().isEmpty();
    boolean hold = !breaches.isEmpty() && gates.holds();
    out.publish(partial ? Set.of("treated", "quarantine") : Set.of(),
        hold ? Set.of("treated", "quarantine") : Set.of(), RunRecord.marker(record));
    if (!breaches.isEmpty()) {
      boolean treated = record.get("rows") instanceof Map<?, ?> r && r.containsKey("treated");
      throw new SluiceException(SluiceException.Kind.GATES, breaches.size() + " gate limit(s) passed: "
          + String.join("; ", breaches.stream().map(GateCheck.Breach::describe).toList())
          + (!treated ? "; the outputs are published"
              : hold ? "; the treated output is held back under " + args.output() + "/" + OutputLayout.HELD
                  + " (gates.on-breach = publish would publish it)"
              : "; the treated output is published (gates.on-breach = publish)"));
    }
  }

  /** The share of the rows read that went to quarantine (0 of none read). */
  private static OptionalDouble quarantinedShare(Map<String, Object> rows) {
    long read = (Long) rows.get("read");
    return OptionalDouble.of(read == 0 ? 0 : (double) (Long) rows.get("quarantined") / read);
  }

  /** The gates' outcome in the run record: the limits that were checked and those passed. */
  private static void gates(Map<String, Object> record, Gates gates, List<GateCheck.Breach> breaches,
      boolean treats) {
    Map<String, Object> g = new LinkedHashMap<>();
    g.put("on_breach", gates.onBreach());
    g.put("quarantined_share_limit", gates.quarantinedShare());
    g.put("column_limits", gates.columns());
    List<Map<String, Object>> passed = new ArrayList<>();
    for (GateCheck.Breach b : breaches) {
      Map<String, Object> m = new LinkedHashMap<>();
      m.put("column", b.column());
      m.put("limit", b.limit());
      m.put("max", b.max());
      m.put("measured", Published.round(b.measured()));
      m.put("message", b.describe());
      passed.add(m);
    }
    g.put("passed", passed);
    g.put("outcome", breaches.isEmpty() ? "kept" : !treats ? "passed"
        : gates.holds() ? "passed; treated output held back" : "passed; treated output published");
    record.put("gates", g);
    if (!breaches.isEmpty()) {
      record.put("status", "gate limits passed");
    }
  }

  /**
   * {@code treat}: a saved plan applied as it is, without refitting (one aggregate pass measures
   * drift, and counts the rows, before the write); the plan used is published beside the treated
   * rows, so the output says what was done to it.
   */
  private Map<String, Object> treatWithSavedPlan(String runId, Instant started, InputTable table,
      InputTable selected, OutputLayout out) {
    String file = args.plan().orElseThrow();
    PlanFile.Fitting fitting = PlanFile.check(PlanFile.read(spark.sparkContext().hadoopConfiguration(), file),
        selected.wellFormed().schema(), file, args.skipMissing());
    // A gate setting given to treat replaces the plan's same setting.
    Plan plan = fitting.plan().withGates(
        fitting.plan().gates().overriddenBy(settings, givenGates, fitting.plan().columns()));
    TreatedTable.checkNoCollisions(selected.wellFormed().schema(), plan);
    if (!fitting.notInPlan().isEmpty()) {
      say("columns the plan does not know pass through untouched: " + String.join(", ", fitting.notInPlan()));
    }
    if (!fitting.skipped().isEmpty()) {
      say("columns of the plan the table lacks, left out: " + String.join(", ", fitting.skipped()));
    }
    Map<String, Double> seconds = new LinkedHashMap<>();
    Map<String, Object> rows = new LinkedHashMap<>();
    // Drift in an aggregate pass of its own: observed in the writing pass instead (Dataset.observe),
    // it lengthened the write by more than this pass takes (docs/benchmarks.md).
    say("measuring drift from the plan's fit-time figures (one pass)");
    long d = System.nanoTime();
    DriftPass.Measured measured = DriftPass.measure(selected.wellFormed(), plan);
    seconds.put("drift", (System.nanoTime() - d) / 1e9);
    say("treating and writing " + args.output() + "/treated with the saved plan (no refitting)");
    long t = System.nanoTime();
    // The drift pass counted the rows; malformed CSV lines are outside it, so they need the read's count.
    long read = selected.rowsRead().isPresent() ? selected.rowsRead().getAsLong()
        : measured.rows().isPresent() && selected.malformedColumn().isEmpty() ? measured.rows().getAsLong()
        : selected.data().count();
    Map<String, Long> written = writeTreated(selected, plan, out, Map.of(), Map.of());
    reconcile(read, written);
    rows.put("read", read);
    rows.putAll(written);
    seconds.put("treat-and-write", (System.nanoTime() - t) / 1e9);
    measured.newGroups().filter(g -> g.rows() > 0).ifPresent(g -> say(g.rows() + " row(s) in about " + g.groups()
        + " group(s) of " + String.join(", ", g.by()) + " that the plan has no figures of their own for:"
        + " the table-wide limits and fill values apply to them"));
    List<GateCheck.Breach> breaches = GateCheck.check(plan.gates(), DriftPass.readings(measured.columns()),
        quarantinedShare(rows));
    List<Map<String, Object>> drift = DriftPass.rows(measured.columns(), breaches);
    Outputs.json(spark, out.staged("plan.json"), plan);
    Outputs.parquet(spark, out.staged("summary"), DriftPass.COLUMNS, drift);
    Outputs.csv(spark, out.staged("summary.csv"), DriftPass.COLUMNS, drift);
    Map<String, Object> record = RunRecord.of(runId, args, table, rows, seconds, started, spark);
    record.put("plan_file", file);
    record.put("columns_not_in_plan", fitting.notInPlan());
    record.put("plan_columns_skipped", fitting.skipped());
    record.put("drift", drift);
    measured.newGroups().ifPresent(g -> record.put("rows_in_groups_without_figures", g.rows()));
    gates(record, plan.gates(), breaches, true);
    Outputs.json(spark, out.staged("run.json"), record);
    publish(table, out, record, plan.gates(), breaches);
    return record;
  }

  /** One daemon thread for each piece of work that runs beside a Spark job of the main thread. */
  private static final Executor BESIDE = r -> {
    Thread th = new Thread(r, "sluice-summary-tables");
    th.setDaemon(true);
    th.start();
  };

  private static double timed(Runnable step) {
    long t = System.nanoTime();
    step.run();
    return (System.nanoTime() - t) / 1e9;
  }

  /** The result of work run beside the writing pass; its failure is thrown as it was raised. */
  private static <T> T await(CompletableFuture<T> f) {
    try {
      return f.join();
    } catch (CompletionException e) {
      if (e.getCause() instanceof RuntimeException r) {
        throw r;
      }
      throw e;
    }
  }

  /** Waits for work beside a pass that failed, so nothing writes on; its own failure is kept. */
  private static void awaitQuietly(CompletableFuture<?> f, RuntimeException failure) {
    try {
      f.join();
    } catch (RuntimeException e) {
      failure.addSuppressed(e.getCause() != null ? e.getCause() : e);
    }
  }

  private InputTable where(InputTable table) {
    if (args.where().isEmpty()) {
      return table;
    }
    String predicate = args.where().get();
    try {
      Dataset<Row> filtered = table.data().filter(functions.expr(predicate));
      filtered.schema();
      return new InputTable(filtered, table.path(), table.format(), table.partitionColumns(),
          table.malformedColumn(), java.util.OptionalLong.empty());
    } catch (Exception e) {
      throw SluiceException.usage("Cannot use --where " + predicate + ": "
          + TableReader.firstLineOf(e.getMessage()));
    }
  }

  /**
   * Treated and quarantined rows from one read of the input, counted; the caller reconciles them.
   * {@code pilotDistinct} and {@code pilot} (empty: none) set the treated table's Parquet
   * encoding ({@link ParquetEncoding}).
   */
  private Map<String, Long> writeTreated(InputTable table, Plan plan, OutputLayout out,
      Map<String, Long> pilotDistinct, Map<String, double[]> pilot) {
    TreatmentSplit split = TreatmentSplit.of(
        table.data(), table.wellFormed().schema(), table.malformedColumn(), plan);
    if (split.quarantined().isPresent() && table.malformedColumn().isEmpty()) {
      split.base().persist(StorageLevel.MEMORY_AND_DISK());
    }
    List<String> parts = table.partitionColumns();
    org.apache.hadoop.conf.Configuration hadoop = spark.sessionState().newHadoopConf();
    long dictionaryPage = hadoop.getLong(ParquetEncoding.DICTIONARY_PAGE, ParquetEncoding.DEFAULT_DICTIONARY_PAGE);
    Map<String, String> encoding = ParquetEncoding.options(pilotDistinct, pilot, split.treated().schema(),
        dictionaryPage);
    long treated = write(split.treated(), out.staged("treated"), parts, encoding, hadoop);
    long held = 0;
    if (split.quarantined().isPresent()) {
      held = write(split.quarantined().get(), out.staged("quarantine"), parts, Map.of(), hadoop);
      split.base().unpersist();
    }
    Map<String, Long> rows = new LinkedHashMap<>();
    rows.put("treated", treated);
    rows.put("quarantined", held);
    return rows;
  }

  /** Every row read is treated or quarantined, or nothing is published. */
  private static void reconcile(long read, Map<String, Long> written) {
    long treated = written.get("treated");
    long held = written.get("quarantined");
    if (read != treated + held) {
      throw new SluiceException(SluiceException.Kind.INTERNAL, "Rows do not reconcile: read " + read
          + ", treated " + treated + ", quarantined " + held + "; nothing was published");
    }
  }

  /**
   * Writes {@code data} with the writer {@code options} and returns its row count, read from the
   * written files' footers (through {@code hadoop}): the committed output, in which a retried or
   * speculative task's rows are never counted twice. (Counting rows as they pass to the writer,
   * with Dataset.observe, lengthened the write by about 0.2 s on the benchmark table and checked
   * nothing the reconciliation with the rows read does not.)
   */
  private long write(Dataset<Row> data, String dir, List<String> parts, Map<String, String> options,
      org.apache.hadoop.conf.Configuration hadoop) {
    DataFrameWriter<Row> w = data.write().mode(SaveMode.Overwrite).options(options);
    if (!parts.isEmpty()) {
      w = w.partitionBy(parts.toArray(new String[0]));
    }
    w.parquet(dir);
    return ParquetFooters.rows(hadoop, dir);
  }

  /**
   * The summary and correlation tables and plan.json, written by the driver (see {@link
   * Outputs#parquet}), side by side: each file costs mostly the file system's latency (creating
   * it, its checksum file, closing), not processing.
   */
  private void writeTables(Sluice.Fit fit, OutputLayout out) {
    List<Map<String, Object>> pairs = CorrelationTable.rows(fit.plan().collinearity());
    List<Map<String, Object>> summary = SummaryTable.rows(fit.profile(), fit.plan(), fit.stats());
    List<Runnable> writes = List.of(
        () -> Outputs.parquet(spark, out.staged("summary"), SummaryTable.COLUMNS, summary),
        () -> Outputs.parquet(spark, out.staged("correlations"), CorrelationTable.COLUMNS, pairs),
        () -> Outputs.csv(spark, out.staged("summary.csv"), SummaryTable.COLUMNS, summary),
        () -> Outputs.csv(spark, out.staged("correlations.csv"), CorrelationTable.COLUMNS, pairs),
        () -> Outputs.json(spark, out.staged("plan.json"), fit.plan()));
    List<CompletableFuture<Void>> beside = writes.subList(1, writes.size()).stream()
        .map(w -> CompletableFuture.runAsync(w, BESIDE)).toList();
    RuntimeException failure = null;
    try {
      writes.get(0).run();
    } catch (RuntimeException e) {
      failure = e;
    }
    // Every write is waited for, so nothing writes on after this returns; the first failure is
    // thrown with the others attached.
    for (CompletableFuture<Void> f : beside) {
      try {
        await(f);
      } catch (RuntimeException e) {
        if (failure == null) {
          failure = e;
        } else {
          failure.addSuppressed(e);
        }
      }
    }
    if (failure != null) {
      throw failure;
    }
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
