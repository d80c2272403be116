package dev.sluice.config;

import com.typesafe.config.Config;
import com.typesafe.config.ConfigObject;
import com.typesafe.config.ConfigUtil;
import com.typesafe.config.ConfigValue;
import dev.sluice.SluiceException;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;
import java.util.Optional;
import java.util.TreeSet;
import java.util.function.Function;

/**
 * Rejects keys that reference.conf does not define, so that a misspelt key fails the run instead of
 * silently leaving the default in place.
 */
final class KeyCheck {
  private static final List<String> SPARK_CONF = List.of("sluice", "spark", "conf");
  private static final List<String> COLUMNS = List.of("sluice", "columns");

  /** Column blocks start after sluice.columns.NAME. */
  private static final int COLUMN_DEPTH = 3;

  private final ConfigObject defaults;
  private final List<String> knownColumnKeys;

  private KeyCheck(ConfigObject referenceRoot) {
    defaults = (ConfigObject) referenceRoot.get("defaults");
    knownColumnKeys = knownKeys(defaults, List.of());
  }

  /** Checks the {@code sluice} tree of {@code merged} against the one of {@code reference}. */
  static void check(Config merged, Config reference) {
    ConfigObject referenceRoot = reference.getObject("sluice");
    List<String> known = knownKeys(referenceRoot, List.of("sluice"));
    Function<List<String>, SluiceException> unknown =
        path -> unknownSetting("Unknown setting " + ConfigUtil.joinPath(path), path, known);
    new KeyCheck(referenceRoot)
        .walk(List.of("sluice"), merged.root().get("sluice"), referenceRoot, unknown);
  }

  /**
   * Rejects top-level keys of a config file other than {@code sluice}: a file written without the
   * {@code sluice { }} wrapper would otherwise be ignored as a whole.
   */
  static void checkFileRoot(Config file, Path path) {
    for (String key : new TreeSet<>(file.root().keySet())) {
      if (!key.equals("sluice")) {
        List<String> leaf = firstLeaf(List.of(key), file.root().get(key));
        throw SluiceException.usage(
            "Unknown setting "
                + ConfigUtil.joinPath(leaf)
                + " in "
                + path
                + " (every setting goes under sluice)");
      }
    }
  }

  private void walk(
      List<String> path,
      ConfigValue actual,
      ConfigObject reference,
      Function<List<String>, SluiceException> unknown) {
    if (!(actual instanceof ConfigObject object)) {
      throw notAnObject(path, actual, "an object");
    }
    if (path.equals(SPARK_CONF)) {
      return; // free-form: Spark's own keys, checked for scalar values when read
    }
    if (path.equals(COLUMNS)) {
      checkColumns(object);
      return;
    }
    for (String key : new TreeSet<>(object.keySet())) {
      List<String> child = ConfigTree.append(path, key);
      ConfigValue expected = reference.get(key);
      if (expected == null) {
        throw unknown.apply(firstLeaf(child, object.get(key)));
      }
      if (expected instanceof ConfigObject inner) {
        walk(child, object.get(key), inner, unknown);
      }
    }
  }

  /** Each column block may hold the keys of {@code defaults}, and only those. */
  private void checkColumns(ConfigObject columns) {
    for (String name : new TreeSet<>(columns.keySet())) {
      List<String> path = List.of("sluice", "columns", name);
      ConfigValue block = columns.get(name);
      if (!(block instanceof ConfigObject)) {
        throw notAnObject(path, block, "a block of column settings");
      }
      Function<List<String>, SluiceException> unknown =
          full -> {
            List<String> own = full.subList(COLUMN_DEPTH, full.size());
            String shown =
                "Column " + ConfigTree.shownColumn(name) + " in config has unknown setting ";
            return unknownSetting(shown + ConfigUtil.joinPath(own), own, knownColumnKeys);
          };
      walk(path, block, defaults, unknown);
    }
  }

  private static SluiceException notAnObject(List<String> path, ConfigValue actual, String what) {
    return SluiceException.usage(
        "Cannot set "
            + ConfigUtil.joinPath(path)
            + " to "
            + ConfigTree.render(actual)
            + ": expected "
            + what);
  }

  /** Descends into an unknown block so that the message names a whole key. */
  private static List<String> firstLeaf(List<String> path, ConfigValue value) {
    List<String> out = path;
    ConfigValue current = value;
    while (current instanceof ConfigObject object && !object.isEmpty()) {
      String first = new TreeSet<>(object.keySet()).first();
      out = ConfigTree.append(out, first);
      current = object.get(first);
    }
    return out;
  }

  private static List<String> knownKeys(ConfigObject reference, List<String> prefix) {
    return new ArrayList<>(ConfigTree.leaves(reference, prefix, ConfigUtil::joinPath).keySet());
  }

  private static SluiceException unknownSetting(
      String message, List<String> path, List<String> known) {
    return SluiceException.usage(message + suggestion(path, known));
  }

  /**
   * " (did you mean K?)" for the known key whose last part is closest to the unknown one's (at most
   * two edits), ties broken by the whole key; empty when nothing is close.
   */
  static String suggestion(List<String> path, List<String> known) {
    String last = path.get(path.size() - 1);
    String whole = ConfigUtil.joinPath(path);
    int limit = Math.max(1, Math.min(2, last.length() / 3));
    Optional<String> best =
        known.stream()
            .filter(k -> distance(lastPart(k), last) <= limit)
            .min(
                Comparator.comparingInt((String k) -> distance(lastPart(k), last))
                    .thenComparingInt(k -> distance(k, whole)));
    return best.map(k -> " (did you mean " + k + "?)").orElse("");
  }

  private static String lastPart(String key) {
    List<String> parts = ConfigUtil.splitPath(key);
    return parts.get(parts.size() - 1);
  }

  /** Levenshtein distance. */
  static int distance(String a, String b) {
    int[] previous = new int[b.length() + 1];
    int[] current = new int[b.length() + 1];
    for (int j = 0; j <= b.length(); j++) {
      previous[j] = j;
    }
    for (int i = 1; i <= a.length(); i++) {
      current[0] = i;
      for (int j = 1; j <= b.length(); j++) {
        int substitute = previous[j - 1] + (a.charAt(i - 1) == b.charAt(j - 1) ? 0 : 1);
        current[j] = Math.min(substitute, Math.min(previous[j], current[j - 1]) + 1);
      }
      int[] swap = previous;
      previous = current;
      current = swap;
    }
    return previous[b.length()];
  }
}
