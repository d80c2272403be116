package dev.sluice.cli;

import dev.sluice.SluiceException;
import dev.sluice.config.Settings;
import dev.sluice.config.SettingsLoader;
import dev.sluice.io.PlanFile;
import dev.sluice.plan.Plan;
import dev.sluice.plan.PlanText;
import dev.sluice.treat.PlanSql;
import java.io.PrintStream;
import java.nio.file.Path;
import java.util.Map;
import org.apache.spark.SparkConf;
import org.apache.spark.sql.SparkSession;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * The command line. Every failure ends in one line on standard error and an exit code: 0 success,
 * 1 unexpected failure, 2 bad usage or configuration, 3 bad input, 4 a gate limit passed. Stack
 * traces go to the log.
 */
public final class Main {
  private static final Logger LOG = LoggerFactory.getLogger(Main.class);

  private Main() {}

  public static void main(String[] argv) {
    int code = run(argv, System.out, System.err);
    System.exit(code);
  }

  /** Runs a command and returns its exit code; never throws. */
  public static int run(String[] argv, PrintStream out, PrintStream err) {
    SparkSession spark = null;
    try {
      Arguments args = Arguments.parse(argv);
      if (args.command().equals("help")) {
        out.println(Arguments.USAGE);
        return 0;
      }
      if (args.command().equals("explain")) {
        Plan plan = PlanFile.read(new org.apache.hadoop.conf.Configuration(), args.plan().orElseThrow());
        if (!args.sql()) {
          out.print(PlanText.of(plan));
          return 0;
        }
        spark = session(SettingsLoader.load(java.util.Optional.empty(), java.util.List.of()));
        out.print(PlanSql.select(spark, plan, args.table()));
        return 0;
      }
      java.util.Set<String> given = args.command().equals("treat")
          ? SettingsLoader.requireOnlyGates(args.config().map(Path::of), args.sets()) : java.util.Set.of();
      Settings settings = SettingsLoader.load(args.config().map(Path::of), args.sets());
      spark = session(settings);
      Map<String, Object> record = new Job(spark, args, settings, given, err).execute();
      out.println("sluice: " + args.command() + " finished; outputs under " + args.output());
      out.println("sluice: rows " + record.get("rows"));
      return 0;
    } catch (SluiceException e) {
      LOG.debug("sluice failed", e);
      err.println("sluice: " + oneLine(e.getMessage()));
      return e.kind().exitCode;
    } catch (Exception | Error e) {
      // Spark throws checked exceptions (SparkException) without declaring them.
      LOG.error("sluice failed unexpectedly", e);
      err.println("sluice: unexpected failure: " + e.getClass().getSimpleName() + ": "
          + oneLine(e.getMessage()) + " (details in the log)");
      return 1;
    }
  }

  /**
   * The session: the one spark-submit configured, or a local one. A master given by spark-submit
   * (or -Dspark.master) wins over sluice.spark.master.
   */
  static SparkSession session(Settings settings) {
    SparkConf conf = new SparkConf();
    if (!conf.contains("spark.master")) {
      conf.setMaster(settings.sparkMaster());
    }
    conf.setIfMissing("spark.app.name", "sluice");
    conf.setIfMissing("spark.ui.showConsoleProgress", "false");
    settings.sparkConf().forEach(conf::set);
    localDefaults(conf);
    return SparkSession.builder().config(conf).getOrCreate();
  }

  /** Spark's setting for the size of a task result sent directly, not through the block manager. */
  public static final String DIRECT_RESULT_SIZE = "spark.task.maxDirectResultSize";

  /**
   * What a local session sets for itself unless given: pass 1's task results are several MB each
   * (each partition's held values and sampled rows), and Spark sends a result over 1 MB through
   * its block manager, a store and a fetch that in a local session loop back into the same JVM. A
   * local session sends them directly (Spark still caps a direct result at
   * spark.rpc.message.maxSize, 128 MB by default). On a cluster Spark's default stays: there the
   * driver fetches large results at its own pace instead of receiving them all at once.
   */
  public static void localDefaults(SparkConf conf) {
    if (conf.get("spark.master", "").startsWith("local")) {
      conf.setIfMissing(DIRECT_RESULT_SIZE, "128m");
    }
  }

  static String oneLine(String message) {
    if (message == null) {
      return "(no message)";
    }
    return message.replaceAll("\\s*\\R\\s*", " ").trim();
  }
}
