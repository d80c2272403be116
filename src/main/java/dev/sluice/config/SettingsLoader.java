package dev.sluice.config;

import com.typesafe.config.Config;
import com.typesafe.config.ConfigException;
import com.typesafe.config.ConfigFactory;
import com.typesafe.config.ConfigOrigin;
import com.typesafe.config.ConfigParseOptions;
import com.typesafe.config.ConfigUtil;
import com.typesafe.config.ConfigValue;
import dev.sluice.SluiceException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Collection;
import java.util.HashSet;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Optional;
import java.util.Set;
import java.util.TreeMap;
import java.util.stream.Collectors;

/**
 * Builds {@link Settings} from three layers, highest precedence first: {@code --set KEY=VALUE}
 * overrides, the user's config file, and reference.conf (which documents every key and its
 * default). Every problem is a {@link SluiceException} of kind USAGE with a one-line message.
 */
public final class SettingsLoader {
  /** Table columns named in the "not in the table" message before the list is cut short. */
  static final int LISTED_COLUMNS = 20;

  private SettingsLoader() {}

  /**
   * The settings of a run.
   *
   * @param configFile the user's HOCON file, if any
   * @param overrides "KEY=VALUE" items; KEY may leave out the leading {@code sluice.}, VALUE is a
   *     HOCON value or else plain text
   */
  public static Settings load(Optional<Path> configFile, List<String> overrides) {
    return fromConfig(effectiveConfig(configFile, overrides));
  }

  /**
   * The three layers merged and resolved, only the {@code sluice} tree, not yet checked: the run
   * record keeps it as the configuration the run actually used.
   */
  public static Config effectiveConfig(Optional<Path> configFile, List<String> overrides) {
    Config file = configFile.map(SettingsLoader::readFile).orElse(ConfigFactory.empty());
    Config layered = Overrides.parse(overrides).withFallback(file).withFallback(reference());
    return resolve(layered).withOnlyPath("sluice");
  }

  /**
   * Settings from a config that holds a {@code sluice} tree (other top-level keys are ignored);
   * what it leaves out comes from reference.conf.
   */
  public static Settings fromConfig(Config config) {
    Config merged = resolve(config.withFallback(reference()));
    KeyCheck.check(merged, reference());
    return SettingsParser.parse(merged.getConfig("sluice"));
  }

  /**
   * The settings of a run that differ from reference.conf, as sorted "key = value" lines (keys
   * without the leading {@code sluice.}; values as HOCON renders them): what the report lists.
   */
  public static List<String> differencesFromDefaults(Optional<Path> configFile, List<String> overrides) {
    Config effective = effectiveConfig(configFile, overrides);
    Config reference = reference();
    List<String> out = new ArrayList<>();
    for (Map.Entry<String, ConfigValue> e : effective.entrySet()) {
      String key = e.getKey();
      Object value = e.getValue().unwrapped();
      if (reference.hasPathOrNull(key) && !reference.getIsNull(key)
          && java.util.Objects.equals(reference.getValue(key).unwrapped(), value)) {
        continue;
      }
      out.add(key.replaceFirst("^sluice\\.", "") + " = "
          + e.getValue().render(com.typesafe.config.ConfigRenderOptions.concise()));
    }
    java.util.Collections.sort(out);
    return out;
  }

  /** The configured column names (sorted) that {@code tableColumns} lacks. */
  public static List<String> unknownColumns(Settings settings, Collection<String> tableColumns) {
    Set<String> present = new HashSet<>(tableColumns);
    return settings.columns().keySet().stream()
        .filter(name -> !present.contains(name))
        .sorted()
        .collect(Collectors.toList());
  }

  /** Fails, naming every configured column the table lacks and listing the table's columns. */
  public static void requireColumnsExist(Settings settings, Collection<String> tableColumns) {
    List<String> missing =
        unknownColumns(settings, tableColumns).stream().map(ConfigTree::shownColumn).toList();
    if (missing.isEmpty()) {
      return;
    }
    String subject =
        missing.size() == 1
            ? "Column " + missing.get(0) + " in config (sluice.columns) is"
            : "Columns " + String.join(", ", missing) + " in config (sluice.columns) are";
    throw SluiceException.usage(
        subject + " not in the table; its columns are: " + listed(tableColumns));
  }

  /** The table's columns in their order, cut after {@link #LISTED_COLUMNS} with a count. */
  public static String listed(Collection<String> tableColumns) {
    String shown =
        tableColumns.stream()
            .limit(LISTED_COLUMNS)
            .map(ConfigTree::shownColumn)
            .collect(Collectors.joining(", "));
    int rest = tableColumns.size() - LISTED_COLUMNS;
    return rest > 0 ? shown + " and " + rest + " more" : shown;
  }

  /**
   * The settings of {@code effective} that differ from reference.conf, as sorted full key (HOCON
   * path syntax) to plain value text. Everything under {@code sluice.columns} and {@code
   * sluice.spark.conf} differs by definition.
   */
  public static Map<String, String> nonDefaultSettings(Config effective) {
    Map<String, ConfigValue> now = leaves(effective);
    Map<String, ConfigValue> reference = leaves(reference());
    Map<String, String> out = new TreeMap<>();
    for (Map.Entry<String, ConfigValue> entry : now.entrySet()) {
      if (!entry.getValue().equals(reference.get(entry.getKey()))) {
        out.put(entry.getKey(), ConfigTree.plain(entry.getValue()));
      }
    }
    return out;
  }

  /**
   * For {@code treat}, whose treatment comes from the plan: refuses every setting that differs
   * from reference.conf other than the gates ({@code gates}, {@code defaults.limits}, {@code
   * columns."<name>".limits}), how the input is read ({@code input}) and the Spark session's
   * ({@code spark}).
   *
   * @return the keys that differ from reference.conf, in HOCON path syntax (sluice.gates.on-breach)
   */
  public static Set<String> requireOnlyGates(Optional<Path> configFile, List<String> overrides) {
    Set<String> given = nonDefaultSettings(effectiveConfig(configFile, overrides)).keySet();
    List<String> other = new ArrayList<>();
    for (String key : given) {
      List<String> p = ConfigUtil.splitPath(key);
      boolean gate = p.get(1).equals("gates") || p.get(1).equals("spark") || p.get(1).equals("input")
          || p.get(1).equals("defaults") && p.size() > 2 && p.get(2).equals("limits")
          || p.get(1).equals("columns") && p.size() > 3 && p.get(3).equals("limits");
      if (!gate) {
        other.add(key);
      }
    }
    if (!other.isEmpty()) {
      throw SluiceException.usage("treat takes its treatment from the plan; of the settings only gates,"
          + " limits, input and spark may be given, not " + String.join(", ", other.subList(0, Math.min(5, other.size())))
          + (other.size() > 5 ? " and " + (other.size() - 5) + " more" : ""));
    }
    return given;
  }

  private static Map<String, ConfigValue> leaves(Config config) {
    return ConfigTree.leaves(config.getObject("sluice"), List.of("sluice"), ConfigUtil::joinPath);
  }

  /**
   * How an enum constant is written in config: lower case, '-' for '_' (SET_MISSING: set-missing).
   */
  public static String configName(Enum<?> constant) {
    return constant.name().toLowerCase(Locale.ROOT).replace('_', '-');
  }

  /** The {@code sluice} tree of every reference.conf on the class path (ours is the only one). */
  static Config reference() {
    return Reference.CONFIG;
  }

  /** Parsed once, on first use. */
  private static final class Reference {
    static final Config CONFIG =
        ConfigFactory.parseResources(SettingsLoader.class.getClassLoader(), "reference.conf")
            .withOnlyPath("sluice");
  }

  private static Config readFile(Path path) {
    if (!Files.exists(path)) {
      throw SluiceException.usage("Cannot read config file " + path + ": no such file");
    }
    if (Files.isDirectory(path)) {
      throw SluiceException.usage("Cannot read config file " + path + ": it is a directory");
    }
    if (!Files.isReadable(path)) {
      throw SluiceException.usage("Cannot read config file " + path + ": permission denied");
    }
    Config file;
    try {
      file =
          ConfigFactory.parseFile(
              path.toFile(), ConfigParseOptions.defaults().setAllowMissing(false));
    } catch (ConfigException e) {
      throw unreadable(e, "config file " + path);
    }
    KeyCheck.checkFileRoot(file, path);
    return file;
  }

  private static Config resolve(Config config) {
    try {
      return config.resolve();
    } catch (ConfigException e) {
      throw unreadable(e, "settings");
    }
  }

  /**
   * "Cannot read config file F at line N: REASON", the library's location prefix moved in front.
   */
  private static SluiceException unreadable(ConfigException e, String source) {
    ConfigOrigin origin = e.origin();
    String where = source;
    String reason = e.getMessage();
    if (origin != null) {
      if (origin.filename() != null) {
        where = "config file " + origin.filename();
      }
      if (origin.lineNumber() > 0) {
        where += " at line " + origin.lineNumber();
      }
      String prefix = origin.description() + ": ";
      if (reason.startsWith(prefix)) {
        reason = reason.substring(prefix.length());
      }
    }
    return SluiceException.usage(
        "Cannot read " + where + ": " + reason.replaceAll("\\s+", " ").strip());
  }
}
