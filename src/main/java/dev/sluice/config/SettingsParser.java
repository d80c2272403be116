package dev.sluice.config;

import com.typesafe.config.Config;
import com.typesafe.config.ConfigObject;
import com.typesafe.config.ConfigUtil;
import com.typesafe.config.ConfigValue;
import dev.sluice.SluiceException;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Optional;
import java.util.OptionalDouble;
import java.util.Set;
import java.util.TreeMap;
import java.util.TreeSet;

/**
 * Reads a resolved, key-checked {@code sluice} tree into {@link Settings}, checking each value's
 * type and range on the way.
 */
final class SettingsParser {
  /** The name carried by {@link Settings#defaults()}, which belongs to no column. */
  static final String DEFAULTS_NAME = "";

  private static final Set<String> FORMATS = Set.of("", "parquet", "csv", "orc", "json");
  private static final List<String> TREATMENT_BLOCKS = List.of("outliers", "missing", "scaling", "limits");

  private SettingsParser() {}

  /**
   * @param sluice the tree under {@code sluice}, reference.conf already merged in
   */
  static Settings parse(Config sluice) {
    ValueReader root = new ValueReader(sluice, sluice, "sluice");
    Config defaultsConfig = sluice.getConfig("defaults");
    ColumnSettings defaults =
        column(DEFAULTS_NAME, new ValueReader(defaultsConfig, defaultsConfig, "sluice.defaults"));
    return new Settings(
        master(root),
        sparkConf(sluice.getObject("spark.conf")),
        input(root),
        quantiles(root),
        collinearity(root),
        gates(root),
        groups(root),
        defaults,
        columns(sluice.getObject("columns"), defaultsConfig));
  }

  /** An empty master would only fail later, inside Spark, with a less direct message. */
  private static String master(ValueReader r) {
    String master = r.text("spark.master").strip();
    if (master.isEmpty()) {
      throw r.invalid("spark.master", "expected a Spark master such as local[*]");
    }
    return master;
  }

  /** Spark keys may be written nested or quoted; both give the dotted key Spark expects. */
  private static Map<String, String> sparkConf(ConfigObject conf) {
    Map<String, ConfigValue> leaves =
        ConfigTree.leaves(conf, List.of(), parts -> String.join(".", parts));
    Map<String, String> out = new TreeMap<>();
    for (Map.Entry<String, ConfigValue> entry : leaves.entrySet()) {
      if (!ConfigTree.isScalar(entry.getValue())) {
        throw SluiceException.usage(
            "Cannot set "
                + ConfigUtil.joinPath("sluice", "spark", "conf", entry.getKey())
                + " to "
                + ConfigTree.render(entry.getValue())
                + ": expected a string, a number or a boolean");
      }
      out.put(entry.getKey(), ConfigTree.plain(entry.getValue()));
    }
    return Collections.unmodifiableMap(out);
  }

  private static InputSettings input(ValueReader r) {
    String format = r.text("input.format");
    if (!FORMATS.contains(format)) {
      throw r.invalid("input.format", "expected one of parquet, csv, orc, json or \"\"");
    }
    String delimiter = r.text("input.csv.delimiter");
    if (delimiter.isEmpty()) {
      throw r.invalid("input.csv.delimiter", "expected at least one character");
    }
    String schema = r.text("input.csv.schema").strip();
    boolean header = r.flag("input.csv.header");
    return new InputSettings(nonEmpty(format), delimiter, nonEmpty(schema), header);
  }

  private static Optional<String> nonEmpty(String text) {
    return text.isEmpty() ? Optional.empty() : Optional.of(text);
  }

  private static QuantileSettings quantiles(ValueReader r) {
    int pilotRows = (int) r.whole("quantiles.pilot-rows", 1_000, 100_000_000,
        "expected a whole number from 1000 to 100000000");
    int maxHeld = (int) r.whole("quantiles.max-held-values", 1_000, 100_000_000,
        "expected a whole number from 1000 to 100000000");
    return new QuantileSettings(pilotRows, maxHeld);
  }

  private static CollinearitySettings collinearity(ValueReader r) {
    boolean enabled = r.flag("collinearity.enabled");
    double pairThreshold =
        r.number(
            "collinearity.pair-threshold",
            x -> x > 0 && x <= 1,
            "expected a number above 0 and at most 1");
    double vifLimit =
        r.number("collinearity.vif-limit", x -> x >= 1, "expected a number of at least 1");
    boolean drop = r.flag("collinearity.drop");
    int maxColumns =
        (int)
            r.whole(
                "collinearity.max-columns",
                2,
                Integer.MAX_VALUE,
                "expected a whole number of at least 2");
    int spearmanRows = (int) r.whole("collinearity.spearman-rows", 1_000, 10_000_000,
        "expected a whole number from 1000 to 10000000");
    if (drop && !enabled) {
      // Nothing is suggested with the analysis off: the drop would be silently ignored.
      throw r.invalid("collinearity.drop",
          "expected false while sluice.collinearity.enabled = false (there is no suggested drop set)");
    }
    return new CollinearitySettings(enabled, pairThreshold, vifLimit, drop, maxColumns, spearmanRows);
  }

  private static GateSettings gates(ValueReader r) {
    GateSettings.OnBreach onBreach = r.choice("gates.on-breach", GateSettings.OnBreach.class);
    return new GateSettings(onBreach, share(r, "gates.quarantined-share"));
  }

  private static GroupSettings groups(ValueReader r) {
    List<String> by = r.textList("groups.by");
    if (new java.util.HashSet<>(by).size() != by.size()) {
      throw r.invalid("groups.by", "expected each column once");
    }
    if (by.stream().anyMatch(String::isEmpty)) {
      throw r.invalid("groups.by", "expected column names, not \"\"");
    }
    int minValues = (int) r.whole("groups.min-values", 4, 1_000_000_000, "expected a whole number of at least 4");
    int maxGroups = (int) r.whole("groups.max-groups", 1, 100_000, "expected a whole number from 1 to 100000");
    return new GroupSettings(by, minValues, maxGroups);
  }

  /** A share from 0 to 1, or empty for null (no limit). */
  private static OptionalDouble share(ValueReader r, String key) {
    OptionalDouble x = r.optionalNumber(key);
    if (x.isPresent() && !(x.getAsDouble() >= 0 && x.getAsDouble() <= 1)) {
      throw r.invalid(key, "expected a number from 0 to 1, or null for no limit");
    }
    return x;
  }

  private static ColumnLimits limits(ValueReader r) {
    OptionalDouble psi = r.optionalNumber("limits.psi");
    if (psi.isPresent() && !(psi.getAsDouble() >= 0)) {
      throw r.invalid("limits.psi", "expected a number of at least 0, or null for no limit");
    }
    return new ColumnLimits(share(r, "limits.null-rate"), share(r, "limits.beyond-share"), psi);
  }

  /** Each named column: its own block over the defaults, merged key by key at every depth. */
  private static Map<String, ColumnSettings> columns(ConfigObject columns, Config defaults) {
    Map<String, ColumnSettings> out = new TreeMap<>();
    for (String name : new TreeSet<>(columns.keySet())) {
      Config own = ((ConfigObject) columns.get(name)).toConfig();
      String prefix = ConfigUtil.joinPath("sluice", "columns", name);
      ColumnSettings column =
          column(name, new ValueReader(own.withFallback(defaults), own, prefix));
      requireTreatable(column, own);
      out.put(name, column);
    }
    return Collections.unmodifiableMap(out);
  }

  /** A column the job never treats must not carry treatment settings that would be ignored. */
  private static void requireTreatable(ColumnSettings column, Config own) {
    if (column.role() != Role.IDENTIFIER && column.role() != Role.KEEP) {
      return;
    }
    List<String> set = new ArrayList<>();
    for (String block : TREATMENT_BLOCKS) {
      if (own.hasPathOrNull(block)) {
        set.add(block);
      }
    }
    if (!set.isEmpty()) {
      throw SluiceException.usage(
          "Column "
              + ConfigTree.shownColumn(column.name())
              + " has role "
              + SettingsLoader.configName(column.role())
              + ", which is never treated; remove its "
              + inWords(set)
              + " settings");
    }
  }

  /** "a", "a and b", "a, b and c". */
  private static String inWords(List<String> items) {
    if (items.size() == 1) {
      return items.get(0);
    }
    String head = String.join(", ", items.subList(0, items.size() - 1));
    return head + " and " + items.get(items.size() - 1);
  }

  /** The settings of one block shaped like {@code defaults}. */
  private static ColumnSettings column(String name, ValueReader r) {
    Role role = r.choice("role", Role.class);
    OptionalDouble validMin = r.optionalNumber("valid-min");
    OptionalDouble validMax = r.optionalNumber("valid-max");
    if (validMin.isPresent() && validMax.isPresent()) {
      r.requireOrdered("valid-min", validMin.getAsDouble(), "valid-max", validMax.getAsDouble());
    }
    InvalidAction invalid = r.choice("invalid-action", InvalidAction.class);
    ScalingMethod scaling = r.choice("scaling", ScalingMethod.class);
    return new ColumnSettings(
        name, role, validMin, validMax, invalid, outliers(r), missing(r), scaling, limits(r));
  }

  private static OutlierSettings outliers(ValueReader r) {
    OutlierMethod method = r.choice("outliers.method", OutlierMethod.class);
    double iqrK = r.number("outliers.iqr-k", x -> x > 0, "expected a number above 0");
    double outerK = r.number("outliers.outer-k", x -> x > 0, "expected a number above 0");
    r.requireOrdered("outliers.iqr-k", iqrK, "outliers.outer-k", outerK);
    double zLimit = r.number("outliers.z-limit", x -> x > 0, "expected a number above 0");
    double madLimit = r.number("outliers.mad-limit", x -> x > 0, "expected a number above 0");
    Direction direction = r.choice("outliers.direction", Direction.class);
    OutlierAction action = r.choice("outliers.action", OutlierAction.class);
    return new OutlierSettings(method, iqrK, outerK, zLimit, madLimit, direction, action);
  }

  private static MissingSettings missing(ValueReader r) {
    double dropNullRate =
        r.number("missing.drop-null-rate", x -> x >= 0 && x <= 1, "expected a number from 0 to 1");
    ImputeStrategy strategy = r.choice("missing.strategy", ImputeStrategy.class);
    Optional<String> constant = r.optionalScalar("missing.constant");
    if (strategy == ImputeStrategy.CONSTANT && constant.isEmpty()) {
      throw r.invalid("missing.strategy", "needs " + r.key("missing.constant") + " to be set");
    }
    boolean indicator = r.flag("missing.indicator");
    return new MissingSettings(dropNullRate, strategy, constant, indicator);
  }
}
