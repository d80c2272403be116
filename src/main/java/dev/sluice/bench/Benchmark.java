package dev.sluice.bench;

import static org.apache.spark.sql.functions.count;
import static org.apache.spark.sql.functions.count_if;
import static org.apache.spark.sql.functions.lit;
import static org.apache.spark.sql.functions.sum;

import dev.sluice.cli.Main;
import dev.sluice.demo.ColdStorageTable;
import dev.sluice.io.Names;
import dev.sluice.report.Outputs;
import java.io.IOException;
import java.io.PrintStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.apache.spark.SparkConf;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SaveMode;
import org.apache.spark.sql.SparkSession;

/**
 * Side-by-side timings in one Spark session, interleaved over repetitions: a plain scan aggregate
 * of every column (and, for comparison with earlier results, of the numeric columns alone), a
 * plain Parquet copy, the hand-written MLlib pipeline, {@code survey} and {@code run}. Prints the
 * median of each and the ratios, plus the largest rank error of the fence
 * quartiles against the data's exact ranks (Sluice's quartiles are exact: at most 1 / n), and
 * writes them as JSON. The first W repetitions (--warmup, default 1; 0 with --quick) warm the
 * JVM: they run every case as the others do, are printed and written, but are left out of the
 * medians.
 *
 * <pre>
 * Benchmark [--rows N] [--columns P] [--reps R] [--warmup W] [--data DIR] [--out FILE]
 *           [--skip-peer] [--quick | --growth [--wide-columns W]]
 * </pre>
 */
public final class Benchmark {
  private Benchmark() {}

  record Options(long rows, int columns, int reps, int warmup, Path data, Path out, boolean quick,
      boolean growth, boolean skipPeer, int wideColumns) {
    static Options parse(String[] args) {
      Map<String, String> m = new LinkedHashMap<>();
      boolean quick = false;
      boolean growth = false;
      boolean skipPeer = false;
      for (int i = 0; i < args.length; i++) {
        if (args[i].equals("--quick")) {
          quick = true;
        } else if (args[i].equals("--growth")) {
          growth = true;
        } else if (args[i].equals("--skip-peer")) {
          skipPeer = true;
        } else if (i + 1 < args.length) {
          m.put(args[i], args[++i]);
        } else {
          throw new IllegalArgumentException("Option " + args[i] + " needs a value");
        }
      }
      String defaultRows = quick ? "20000" : growth ? "1000000" : "10000000";
      long rows = Long.parseLong(m.getOrDefault("--rows", defaultRows));
      int cols = Integer.parseInt(m.getOrDefault("--columns", "10"));
      int reps = Integer.parseInt(m.getOrDefault("--reps", quick ? "1" : "3"));
      int warmup = Integer.parseInt(m.getOrDefault("--warmup", quick ? "0" : "1"));
      if (reps < 1 || warmup < 0) {
        throw new IllegalArgumentException("--reps must be at least 1 and --warmup at least 0");
      }
      Path data = Path.of(m.getOrDefault("--data", "target/bench-data"));
      Path out = Path.of(m.getOrDefault("--out", "target/bench/results.json"));
      int wide = Integer.parseInt(m.getOrDefault("--wide-columns", "200"));
      return new Options(rows, cols, reps, warmup, data, out, quick, growth, skipPeer, wide);
    }
  }

  public static void main(String[] args) throws IOException {
    Options o = Options.parse(args);
    SparkConf conf = new SparkConf().setMaster(System.getProperty("spark.master", "local[*]"));
    // What a local run of the job sets for its session (cli.Main.localDefaults).
    Main.localDefaults(conf);
    SparkSession spark = SparkSession.builder().config(conf)
        .appName("sluice-bench").config("spark.ui.enabled", "false")
        .config("spark.ui.showConsoleProgress", "false")
        // What `run` and `survey` set for themselves (see cli.Job); set for the whole session so
        // that every case, the hand-written pipeline included, runs under the same settings.
        .config("spark.sql.codegen.hugeMethodLimit", "8000").getOrCreate();
    if (o.growth()) {
      growth(spark, o);
      spark.stop();
      return;
    }
    Path table = ensureTable(spark, o.rows(), o.columns(), o);
    Path work = o.out().getParent().resolve("work");
    Map<String, List<Double>> times = new LinkedHashMap<>();
    for (String name : List.of("scan", "scan_numeric", "copy", "peer", "survey", "run")) {
      if (!(o.skipPeer() && name.equals("peer"))) {
        times.put(name, new ArrayList<>());
      }
    }
    Dataset<Row> input = spark.read().parquet(table.toString());
    List<String> numeric = numericColumns(input);
    for (int rep = 0; rep < o.warmup() + o.reps(); rep++) {
      times.get("scan").add(time(table, null, () -> scan(input, List.of(input.columns()))));
      times.get("scan_numeric").add(time(table, null, () -> scan(input, numeric)));
      times.get("copy").add(time(table, work.resolve("copy"),
          () -> input.write().mode(SaveMode.Overwrite).parquet(work.resolve("copy").toString())));
      if (!o.skipPeer()) {
        times.get("peer").add(time(table, work.resolve("peer"), () -> PeerPipeline.run(
            spark.read().parquet(table.toString()), numeric, work.resolve("peer").toString())));
      }
      times.get("survey").add(
          time(table, work.resolve("survey"),
              () -> sluice("survey", table, work.resolve("survey"))));
      times.get("run").add(
          time(table, work.resolve("run"), () -> sluice("run", table, work.resolve("run"))));
      System.out.println("bench: " + label(o, rep) + ": " + last(times));
    }
    Map<String, Object> result = summarise(o, times, rankError(spark, input, work.resolve("run")));
    Files.createDirectories(o.out().getParent());
    Outputs.JSON.writeValue(o.out().toFile(), result);
    System.out.println(Outputs.JSON.writeValueAsString(result));
    spark.stop();
  }

  private static Path ensureTable(SparkSession spark, long rows, int columns, Options o) {
    Path dir = o.data().resolve("rows" + rows + "-cols" + columns);
    if (!Files.exists(dir.resolve("_SUCCESS"))) {
      System.out.println("bench: generating " + dir + " (once; later runs reuse it)");
      ColdStorageTable.generateWide(spark, rows, columns, 20261201L)
          .write().mode(SaveMode.Overwrite).parquet(dir.toString());
    }
    return dir;
  }

  /**
   * How {@code run} grows: N rows x P columns against 4 N x P (goal: at most 4.4 x the time) and
   * N x W (W = 200 by default, goal: at most 25 x; 0 leaves it out), interleaved over the
   * repetitions.
   */
  private static void growth(SparkSession spark, Options o) throws IOException {
    Map<String, Path> tables = new LinkedHashMap<>();
    tables.put("base", ensureTable(spark, o.rows(), o.columns(), o));
    tables.put("rows_x4", ensureTable(spark, 4 * o.rows(), o.columns(), o));
    String wide = "cols_" + o.wideColumns();
    if (o.wideColumns() > 0) {
      tables.put(wide, ensureTable(spark, o.rows(), o.wideColumns(), o));
    }
    Path work = o.out().getParent().resolve("work");
    Map<String, List<Double>> times = new LinkedHashMap<>();
    tables.keySet().forEach(k -> times.put(k, new ArrayList<>()));
    for (int rep = 0; rep < o.warmup() + o.reps(); rep++) {
      tables.forEach((k, t) -> times.get(k).add(
          time(t, work.resolve("growth-" + k),
              () -> sluice("run", t, work.resolve("growth-" + k)))));
      System.out.println("bench: " + label(o, rep) + ": " + last(times));
    }
    Map<String, Double> medians = medians(measured(times, o.warmup()));
    Map<String, Object> r = header(o, medians);
    Map<String, Double> ratios = new LinkedHashMap<>();
    ratios.put("rows_x4_over_base", medians.get("rows_x4") / medians.get("base"));
    if (o.wideColumns() > 0) {
      ratios.put(wide + "_over_base", medians.get(wide) / medians.get("base"));
    }
    r.put("ratios", ratios);
    r.put("seconds", times);
    Files.createDirectories(o.out().getParent());
    Outputs.JSON.writeValue(o.out().toFile(), r);
    System.out.println(Outputs.JSON.writeValueAsString(r));
  }

  private static List<String> numericColumns(Dataset<Row> input) {
    return Arrays.stream(input.schema().fields())
        .filter(f -> f.dataType() instanceof org.apache.spark.sql.types.NumericType)
        .map(f -> f.name()).toList();
  }

  /**
   * A plain aggregate over {@code columns}: the sum of each numeric one and the count of each
   * other one, so that Spark reads and decodes every column given (as survey and run read every
   * column of the table).
   */
  private static void scan(Dataset<Row> input, List<String> columns) {
    List<String> numeric = numericColumns(input);
    List<Column> aggs = new ArrayList<>();
    columns.forEach(c -> aggs.add(numeric.contains(c) ? sum(Names.col(c)) : count(Names.col(c))));
    input.agg(aggs.get(0), aggs.subList(1, aggs.size()).toArray(new Column[0])).first();
  }

  private static void sluice(String command, Path table, Path out) {
    List<String> args = new ArrayList<>(List.of(command, "--input", table.toString(), "--output",
        out.toString(), "--replace"));
    int code = Main.run(args.toArray(new String[0]), new PrintStream(PrintStream.nullOutputStream()),
        new PrintStream(PrintStream.nullOutputStream()));
    if (code != 0) {
      throw new IllegalStateException("sluice " + command + " failed with exit code " + code);
    }
  }

  /**
   * The largest distance, over the numeric columns, between the probability asked for (0.25,
   * 0.75) and the exact normalized rank range of the value returned, counted in the data.
   */
  static double rankError(SparkSession spark, Dataset<Row> input, Path runOut) {
    Dataset<Row> summary = spark.read().parquet(runOut.resolve("summary").toString());
    List<Column> aggs = new ArrayList<>();
    List<double[]> asked = new ArrayList<>();
    for (Row r : summary.filter("q1 IS NOT NULL").select("column", "q1", "q3", "usable").collectAsList()) {
      String c = r.getString(0);
      for (int k = 0; k < 2; k++) {
        double q = r.getDouble(1 + k);
        aggs.add(count_if(Names.col(c).lt(lit(q))));
        aggs.add(count_if(Names.col(c).leq(lit(q))));
        asked.add(new double[] {k == 0 ? 0.25 : 0.75, r.getLong(3)});
      }
    }
    if (aggs.isEmpty()) {
      return Double.NaN;
    }
    Row counts = input.agg(aggs.get(0), aggs.subList(1, aggs.size()).toArray(new Column[0])).first();
    double worst = 0;
    for (int i = 0; i < asked.size(); i++) {
      double n = asked.get(i)[1];
      double below = counts.getLong(2 * i) / n;
      double atOrBelow = counts.getLong(2 * i + 1) / n;
      double p = asked.get(i)[0];
      double err = p < below ? below - p : p > atOrBelow ? p - atOrBelow : 0.0;
      worst = Math.max(worst, err);
    }
    return worst;
  }

  private static Map<String, Object> summarise(
      Options o, Map<String, List<Double>> times, double rankError) {
    Map<String, Double> medians = medians(measured(times, o.warmup()));
    Map<String, Object> r = header(o, medians);
    Map<String, Double> ratios = new LinkedHashMap<>();
    ratios.put("run_over_copy", medians.get("run") / medians.get("copy"));
    ratios.put("survey_over_scan", medians.get("survey") / medians.get("scan"));
    // Against the scan of the numeric columns alone, as the benchmark measured before 2026-12-04.
    ratios.put("survey_over_numeric_scan", medians.get("survey") / medians.get("scan_numeric"));
    if (medians.containsKey("peer")) {
      ratios.put("peer_over_run", medians.get("peer") / medians.get("run"));
    }
    r.put("ratios", ratios);
    r.put("largest_fence_quartile_rank_error", rankError);
    r.put("seconds", times);
    return r;
  }

  /** The run's size and machine, and the median seconds of each case. */
  private static Map<String, Object> header(Options o, Map<String, Double> medians) {
    Map<String, Object> r = new LinkedHashMap<>();
    r.put("rows", o.rows());
    r.put("numeric_columns", o.columns());
    r.put("repetitions", o.reps());
    // The first this many of each case's "seconds" warmed the JVM and are not in the medians.
    r.put("warmup_repetitions", o.warmup());
    r.put("cores", Runtime.getRuntime().availableProcessors());
    r.put("max_heap_mb", Runtime.getRuntime().maxMemory() / (1024 * 1024));
    r.put("median_seconds", medians);
    return r;
  }

  /** "warm-up 1 of 1" or "repetition 2 of 3" for the repetition at index {@code rep}. */
  private static String label(Options o, int rep) {
    return rep < o.warmup() ? "warm-up " + (rep + 1) + " of " + o.warmup()
        : "repetition " + (rep - o.warmup() + 1) + " of " + o.reps();
  }

  /** Each case's times after the first {@code warmup}. */
  private static Map<String, List<Double>> measured(Map<String, List<Double>> times, int warmup) {
    Map<String, List<Double>> out = new LinkedHashMap<>();
    times.forEach((k, v) -> out.put(k, v.subList(warmup, v.size())));
    return out;
  }

  private static Map<String, Double> medians(Map<String, List<Double>> times) {
    Map<String, Double> medians = new LinkedHashMap<>();
    times.forEach((k, v) -> medians.put(k, median(v)));
    return medians;
  }

  private static double median(List<Double> v) {
    double[] s = v.stream().mapToDouble(Double::doubleValue).sorted().toArray();
    return s.length % 2 == 1 ? s[s.length / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
  }

  private static Map<String, Double> last(Map<String, List<Double>> times) {
    Map<String, Double> out = new LinkedHashMap<>();
    times.forEach((k, v) -> out.put(k, Math.round(v.get(v.size() - 1) * 100) / 100.0));
    return out;
  }

  /**
   * Times one case. First, outside the timing: the removal of {@code output} (the case's
   * output of the repetition before; null: none), a plain scan of {@code input} ({@link
   * #settle}), a full collection, a flush of the operating system's dirty pages ({@link
   * #flushWrites}) and a read of every file of {@code input} ({@link #warm}), so that no case
   * pays for what the one before it left: its garbage (the hand-written pipeline caches the
   * whole table, and the case after it otherwise spends its first seconds collecting that),
   * the write-back of its output, the memory it handed back to the host, or an input the
   * kernel dropped from its page cache while the case before read only its own cache. Every
   * writing case so writes to a new directory, as a scheduled job writes a new partition: a
   * copy with overwrite would otherwise delete its old files first and reuse their memory,
   * while {@code run} keeps its old output until the new one is published, and only then
   * deletes it.
   */
  private static double time(Path input, Path output, Runnable r) {
    if (output != null) {
      removeTree(output);
    }
    settle(input);
    System.gc();
    flushWrites();
    warm(input);
    long t = System.nanoTime();
    r.run();
    return (System.nanoTime() - t) / 1e9;
  }

  /**
   * An untimed plain scan of every column of {@code table}: the first Spark job after the
   * hand-written pipeline ran up to 2 s slower than the same job right after it (a scan 2.16 s
   * against 1.22 s, survey's first pass 3.3-3.7 s against 1.6-1.8 s, measured on 2026-12-04), as
   * its tasks fault in memory the pipeline's freed cache handed back to the machine's host. This
   * job pays that instead of whichever case comes next, and every case starts after the same one.
   */
  private static void settle(Path table) {
    Dataset<Row> input = SparkSession.active().read().parquet(table.toString());
    scan(input, List.of(input.columns()));
  }

  /**
   * Reads every file under {@code table} once and drops the bytes: every case then starts with
   * its input in the page cache, as the scan at the start of a repetition finds it, even after
   * the hand-written pipeline has spent about 100 s on its own cached copy (a kernel that
   * reclaims cold pages may have dropped the table's by then).
   */
  private static void warm(Path table) {
    java.nio.ByteBuffer buffer = java.nio.ByteBuffer.allocateDirect(1 << 20);
    try (var files = Files.walk(table)) {
      for (Path f : files.filter(Files::isRegularFile).toList()) {
        try (var channel = java.nio.channels.FileChannel.open(f)) {
          while (channel.read(buffer.clear()) > 0) {
            // Only the reading matters.
          }
        }
      }
    } catch (IOException e) {
      throw new java.io.UncheckedIOException("Cannot read the input " + table, e);
    }
  }

  private static void removeTree(Path dir) {
    if (!Files.exists(dir)) {
      return;
    }
    try (var paths = Files.walk(dir)) {
      for (Path p : paths.sorted(java.util.Comparator.reverseOrder()).toList()) {
        Files.delete(p);
      }
    } catch (IOException e) {
      throw new java.io.UncheckedIOException("Cannot remove the old output " + dir, e);
    }
  }

  /**
   * Runs {@code sync}, where there is one. Linux writes dirty pages back about 30 s after they
   * were written: without this, the write-back of one case's output (up to a gigabyte for the
   * copy, the pipeline and {@code run}) fell into the timing of a later case, and took the CPU
   * time of the kernel from it.
   */
  private static void flushWrites() {
    try {
      Process sync = new ProcessBuilder("sync").redirectErrorStream(true).start();
      sync.getInputStream().transferTo(java.io.OutputStream.nullOutputStream());
      sync.waitFor(5, java.util.concurrent.TimeUnit.MINUTES);
    } catch (java.io.IOException e) {
      // No sync command (not a Unix system): the cases run without the flush.
    } catch (InterruptedException e) {
      Thread.currentThread().interrupt();
    }
  }

}
