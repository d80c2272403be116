package dev.sluice.config;

import com.typesafe.config.Config;
import com.typesafe.config.ConfigObject;
import com.typesafe.config.ConfigUtil;
import com.typesafe.config.ConfigValue;
import dev.sluice.SluiceException;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Collection;
import java.util.Comparator;
import java.util.List;
import java.util.Map;
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

  /** Settings that earlier versions had, with what became of them. */
  private static final Map<String, String> RETIRED = Map.of(
      "sluice.quantiles.exact-max-count", "quantiles are now exact on tables of any size",
      "sluice.quantiles.relative-error", "quantiles are now exact on tables of any size",
      "sluice.quantiles.sketch", "quantiles are now exact on tables of any size",
      "sluice.quantiles.rank-grid-size",
      "Spearman's rho now comes from ranks in a row sample (sluice.collinearity.spearman-rows)");

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
    KeyCheck checker = new KeyCheck(referenceRoot);
    Function<Unknown, SluiceException> unknown =
        u ->
            u.report(
                "Unknown setting " + ConfigUtil.joinPath(u.leaf()),
                u.leaf(),
                u.fixed().filter(c -> checker.isKnown(c, known)),
                known);
    checker.walk(List.of("sluice"), merged.root().get("sluice"), referenceRoot, unknown);
  }

  /**
   * Whether a whole key exists: a key of reference.conf, a Spark setting, or a known key of a
   * column block. A misspelt part is only corrected into a key that exists.
   */
  private boolean isKnown(List<String> key, List<String> known) {
    if (key.size() > SPARK_CONF.size() && key.subList(0, SPARK_CONF.size()).equals(SPARK_CONF)) {
      return true;
    }
    if (key.size() > COLUMN_DEPTH && key.subList(0, COLUMNS.size()).equals(COLUMNS)) {
      return knownColumnKeys.contains(ConfigUtil.joinPath(inColumn(key)));
    }
    return known.contains(ConfigUtil.joinPath(key));
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
      Function<Unknown, SluiceException> unknown) {
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
        String retired = RETIRED.get(ConfigUtil.joinPath(child));
        if (retired != null) {
          throw SluiceException.usage("Setting " + ConfigUtil.joinPath(child)
              + " is no longer used: " + retired + "; remove it");
        }
        List<String> leaf = firstLeaf(child, object.get(key));
        Optional<List<String>> fixed =
            closest(key, reference.keySet()).map(near -> replaced(leaf, path.size(), near));
        throw unknown.apply(new Unknown(leaf, fixed));
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
      String shown = "Column " + ConfigTree.shownColumn(name) + " in config has unknown setting ";
      Function<Unknown, SluiceException> unknown =
          u -> {
            List<String> own = inColumn(u.leaf());
            Optional<List<String>> fixed = u.fixed().map(KeyCheck::inColumn)
                .filter(c -> knownColumnKeys.contains(ConfigUtil.joinPath(c)));
            return u.report(shown + ConfigUtil.joinPath(own), own, fixed, knownColumnKeys);
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

  /** A key of a column block, relative to the block. */
  private static List<String> inColumn(List<String> full) {
    return full.subList(COLUMN_DEPTH, full.size());
  }

  /** {@code path} with its part at {@code index} replaced. */
  private static List<String> replaced(List<String> path, int index, String part) {
    List<String> out = new ArrayList<>(path);
    out.set(index, part);
    return out;
  }

  /**
   * An unknown key, named by its first whole key.
   *
   * @param leaf the whole key
   * @param fixed the same key with the misspelt part corrected, when a sibling key is close
   */
  private record Unknown(List<String> leaf, Optional<List<String>> fixed) {
    /** The message with a "did you mean": the corrected key, else the closest known key. */
    SluiceException report(
        String message, List<String> shown, Optional<List<String>> corrected, List<String> known) {
      String hint =
          corrected
              .map(c -> " (did you mean " + ConfigUtil.joinPath(c) + "?)")
              .orElseGet(() -> suggestion(shown, known));
      return SluiceException.usage(message + hint);
    }
  }

  /**
   * " (did you mean K?)" for the known key whose last part is closest to the unknown one's, ties
   * broken by the whole key; empty when nothing is close.
   */
  static String suggestion(List<String> path, List<String> known) {
    String last = path.get(path.size() - 1);
    String whole = ConfigUtil.joinPath(path);
    Optional<String> best =
        known.stream()
            .filter(k -> distance(lastPart(k), last) <= limit(last))
            .min(
                Comparator.comparingInt((String k) -> distance(lastPart(k), last))
                    .thenComparingInt(k -> distance(k, whole)));
    return best.map(k -> " (did you mean " + k + "?)").orElse("");
  }

  /** The candidate closest to {@code word}, if it is close enough to be a misspelling. */
  private static Optional<String> closest(String word, Collection<String> candidates) {
    return candidates.stream()
        .filter(c -> distance(c, word) <= limit(word))
        .min(Comparator.comparingInt((String c) -> distance(c, word)).thenComparing(c -> c));
  }

  /** Edits that still count as a misspelling: two, one for words of up to five characters. */
  private static int limit(String word) {
    return Math.max(1, Math.min(2, word.length() / 3));
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
