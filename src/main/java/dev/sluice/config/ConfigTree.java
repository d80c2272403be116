package dev.sluice.config;

import com.typesafe.config.ConfigObject;
import com.typesafe.config.ConfigRenderOptions;
import com.typesafe.config.ConfigUtil;
import com.typesafe.config.ConfigValue;
import com.typesafe.config.ConfigValueType;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;
import java.util.function.Function;

/** Small walks over HOCON trees shared by the loader, the key check and the report rendering. */
final class ConfigTree {
  private ConfigTree() {}

  /**
   * The terminal values below {@code object}, keyed by {@code join} of their path, sorted. An empty
   * object counts as terminal so that blocks such as {@code columns { }} are not lost. Nulls are
   * kept, unlike {@code Config.entrySet()}, because null is a real value here.
   */
  static Map<String, ConfigValue> leaves(
      ConfigObject object, List<String> prefix, Function<List<String>, String> join) {
    Map<String, ConfigValue> out = new TreeMap<>();
    collect(object, prefix, join, out);
    return out;
  }

  private static void collect(
      ConfigObject object,
      List<String> path,
      Function<List<String>, String> join,
      Map<String, ConfigValue> out) {
    for (Map.Entry<String, ConfigValue> entry : object.entrySet()) {
      List<String> child = append(path, entry.getKey());
      if (entry.getValue() instanceof ConfigObject inner && !inner.isEmpty()) {
        collect(inner, child, join, out);
      } else {
        out.put(join.apply(child), entry.getValue());
      }
    }
  }

  /** {@code path} with {@code key} added, as a new list. */
  static List<String> append(List<String> path, String key) {
    List<String> out = new ArrayList<>(path);
    out.add(key);
    return out;
  }

  /**
   * The plain text of a value: a string as it is, a number or boolean as it was written ({@code
   * 0.10} stays {@code 0.10}, {@code 3.0} stays {@code 3.0}), anything else in concise HOCON.
   */
  static String plain(ConfigValue value) {
    ConfigValueType type = value.valueType();
    if (type == ConfigValueType.NUMBER || type == ConfigValueType.BOOLEAN) {
      // render() would print the parsed number; getString keeps the text as written.
      return value.atKey("v").getString("v");
    }
    if (type == ConfigValueType.STRING) {
      return (String) value.unwrapped();
    }
    return render(value);
  }

  /** The value as shown in an error message: strings quoted, so an empty string is visible. */
  static String render(ConfigValue value) {
    if (value.valueType() == ConfigValueType.NUMBER
        || value.valueType() == ConfigValueType.BOOLEAN) {
      return plain(value);
    }
    return value.render(ConfigRenderOptions.concise());
  }

  /**
   * A column name as shown in a message: as it is when it is one word of letters, digits and
   * underscores, else quoted, so that "gross weight" does not read as two words.
   */
  static String shownColumn(String name) {
    return name.matches("[\\p{L}\\p{N}_]+") ? name : ConfigUtil.quoteString(name);
  }

  /** True for strings, numbers and booleans. */
  static boolean isScalar(ConfigValue value) {
    ConfigValueType type = value.valueType();
    return type == ConfigValueType.STRING
        || type == ConfigValueType.NUMBER
        || type == ConfigValueType.BOOLEAN;
  }
}
