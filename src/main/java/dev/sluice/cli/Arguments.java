package dev.sluice.cli;

import dev.sluice.SluiceException;
import java.util.ArrayList;
import java.util.List;
import java.util.Optional;

/**
 * The parsed command line.
 *
 * @param command run, survey, fit, treat or help
 * @param sets the {@code --set KEY=VALUE} overrides, in order (a later one wins)
 * @param plan the saved plan that {@code treat} applies and {@code explain} shows
 * @param sql explain as one SQL SELECT rather than as text
 * @param table the table that SELECT reads
 * @param skipMissing treat: leave out the plan's columns that the table lacks instead of failing
 */
public record Arguments(
    String command,
    String input,
    Optional<String> format,
    String output,
    Optional<String> config,
    List<String> sets,
    Optional<String> where,
    boolean replace,
    Optional<String> plan,
    boolean sql,
    String table,
    boolean skipMissing) {

  public static final String USAGE = String.join("\n",
      "Usage:",
      "  sluice run    --input PATH [--format parquet|csv|orc|json] --output DIR [--config FILE] [--set KEY=VALUE]...",
      "                [--where PREDICATE] [--replace]",
      "  sluice survey --input PATH [--format parquet|csv|orc|json] --output DIR [--config FILE] [--set KEY=VALUE]...",
      "                [--where PREDICATE] [--replace]",
      "  sluice fit    (the same options as survey)",
      "  sluice treat  --plan FILE --input PATH [--format ...] --output DIR [--where PREDICATE] [--replace]",
      "                [--skip-missing-columns] [--config FILE] [--set KEY=VALUE]... (gates, limits, input, spark)",
      "  sluice explain --plan FILE [--sql [--table NAME]]",
      "  sluice --help",
      "",
      "  run     profile the table, decide the treatment plan, treat it and write treated/,",
      "          the quality summary, correlations, plan.json, run.json and report.html under DIR",
      "  survey  the same without treated data",
      "  fit     the same as survey: fits the plan.json that treat applies later",
      "  treat   apply a saved plan.json to a table without refitting: treated/, quarantine/,",
      "          the plan used, a summary of drift against the fit and run.json under DIR (the",
      "          treatment comes from the plan; --config and --set may only change the gates and",
      "          how the input and Spark are set up)",
      "  explain print a saved plan as text, or with --sql as one Spark SQL SELECT that applies it",
      "          to the table NAME (default source_table)",
      "",
      "  --input PATH     a file or a directory of partitions (local path or Hadoop filesystem URI)",
      "  --format F       input format; default from the file extension, else parquet",
      "  --output DIR     where the outputs go; the input is never modified",
      "  --config FILE    a HOCON file of settings (see conf/sample.conf and reference.conf)",
      "  --set KEY=VALUE  override one setting, e.g. --set defaults.outliers.iqr-k=3",
      "  --where PRED     treat only the rows matching a Spark SQL predicate, e.g. \"check_date = '2026-10-05'\";",
      "                   with partitioned output only the partitions written are replaced",
      "  --replace        allow an output directory that holds files not written by Sluice",
      "  --plan FILE      the plan.json of an earlier run, survey or fit (treat and explain)",
      "  --skip-missing-columns  treat: leave out the plan's columns the table lacks (default: exit 3)",
      "",
      "Exit codes: 0 success, 1 unexpected failure, 2 bad usage or config, 3 bad input,",
      "            4 a gate limit was passed (outputs published, treated rows held back under DIR/held by default).");

  private static final String COMMANDS = "run, survey, fit, treat or explain";

  /** The table name explain --sql selects from when --table is not given. */
  public static final String DEFAULT_TABLE = "source_table";

  public static Arguments parse(String[] args) {
    if (args.length == 0) {
      throw SluiceException.usage("No command given; expected " + COMMANDS + " (see sluice --help)");
    }
    String command = args[0];
    if (command.equals("--help") || command.equals("-h") || command.equals("help")) {
      return help();
    }
    if (command.equals("explain")) {
      return explain(args);
    }
    if (!List.of("run", "survey", "fit", "treat").contains(command)) {
      throw SluiceException.usage("Unknown command " + command + "; expected " + COMMANDS + " (see sluice --help)");
    }
    return options(command, args);
  }

  private static Arguments options(String command, String[] args) {
    String input = null;
    String output = null;
    Optional<String> format = Optional.empty();
    Optional<String> config = Optional.empty();
    List<String> sets = new ArrayList<>();
    Optional<String> where = Optional.empty();
    Optional<String> plan = Optional.empty();
    boolean replace = false;
    boolean skipMissing = false;
    for (int i = 1; i < args.length; i++) {
      String a = args[i];
      if (a.equals("--help") || a.equals("-h")) {
        return help();
      }
      if (a.equals("--replace")) {
        replace = true;
        continue;
      }
      if (a.equals("--skip-missing-columns")) {
        skipMissing = true;
        continue;
      }
      String value = valueOf(args, i);
      i++;
      switch (a) {
        case "--input" -> input = value;
        case "--output" -> output = value;
        case "--format" -> format = Optional.of(value);
        case "--config" -> config = Optional.of(value);
        case "--set" -> sets.add(value);
        case "--where" -> where = Optional.of(value);
        case "--plan" -> plan = Optional.of(value);
        default -> throw SluiceException.usage("Unknown option " + a + " (see sluice --help)");
      }
    }
    if (input == null) {
      throw SluiceException.usage("Missing --input PATH (see sluice --help)");
    }
    if (output == null) {
      throw SluiceException.usage("Missing --output DIR (see sluice --help)");
    }
    if (command.equals("treat") && plan.isEmpty()) {
      throw SluiceException.usage("treat needs --plan FILE: the plan.json of an earlier run, survey or fit");
    }
    if (!command.equals("treat") && plan.isPresent()) {
      throw SluiceException.usage("--plan is for treat only; " + command + " fits its own plan");
    }
    if (skipMissing && !command.equals("treat")) {
      throw SluiceException.usage("--skip-missing-columns is for treat only");
    }
    return new Arguments(command, input, format, output, config, List.copyOf(sets), where, replace, plan,
        false, null, skipMissing);
  }

  /** explain --plan FILE [--sql] [--table NAME]. */
  private static Arguments explain(String[] args) {
    Optional<String> plan = Optional.empty();
    boolean sql = false;
    String table = null;
    for (int i = 1; i < args.length; i++) {
      String a = args[i];
      if (a.equals("--sql")) {
        sql = true;
        continue;
      }
      if (a.equals("--help") || a.equals("-h")) {
        return help();
      }
      String value = valueOf(args, i);
      i++;
      switch (a) {
        case "--plan" -> plan = Optional.of(value);
        case "--table" -> table = value;
        default -> throw SluiceException.usage("Unknown option " + a + " for explain (see sluice --help)");
      }
    }
    if (plan.isEmpty()) {
      throw SluiceException.usage("explain needs --plan FILE: the plan.json of an earlier run, survey or fit");
    }
    if (table != null && !sql) {
      throw SluiceException.usage("--table names the table of the SQL; it goes with --sql");
    }
    return new Arguments("explain", null, Optional.empty(), null, Optional.empty(), List.of(),
        Optional.empty(), false, plan, sql, table == null ? DEFAULT_TABLE : table, false);
  }

  private static Arguments help() {
    return new Arguments("help", null, Optional.empty(), null, Optional.empty(), List.of(),
        Optional.empty(), false, Optional.empty(), false, null, false);
  }

  private static String valueOf(String[] args, int i) {
    String a = args[i];
    if (!a.startsWith("--")) {
      throw SluiceException.usage("Unexpected argument " + a + " (see sluice --help)");
    }
    if (i + 1 >= args.length || args[i + 1].startsWith("--")) {
      throw SluiceException.usage("Option " + a + " needs a value (see sluice --help)");
    }
    return args[i + 1];
  }
}
