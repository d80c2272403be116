package dev.sluice.config;

import com.typesafe.config.Config;
import com.typesafe.config.ConfigException;
import com.typesafe.config.ConfigFactory;
import com.typesafe.config.ConfigUtil;
import com.typesafe.config.ConfigValue;
import com.typesafe.config.ConfigValueFactory;
import com.typesafe.config.ConfigValueType;
import dev.sluice.SluiceException;
import java.util.ArrayList;
import java.util.List;

/** The command-line layer: {@code --set KEY=VALUE} arguments as one config, later ones winning. */
final class Overrides {
  private Overrides() {}

  /** All overrides as one config; a key set twice keeps the later value. */
  static Config parse(List<String> overrides) {
    Config layer = ConfigFactory.empty();
    for (String arg : overrides) {
      layer = one(arg).withFallback(layer);
    }
    return layer;
  }

  private static Config one(String arg) {
    int equals = separator(arg);
    String key = equals < 0 ? "" : arg.substring(0, equals).strip();
    if (key.isEmpty()) {
      throw SluiceException.usage("Cannot read --set " + arg + ": expected KEY=VALUE");
    }
    String path = ConfigUtil.joinPath(path(arg, key));
    return ConfigFactory.empty().withValue(path, value(arg.substring(equals + 1).strip()));
  }

  /** The first '=' outside double quotes, so a quoted column name may contain one; -1 if none. */
  private static int separator(String arg) {
    boolean quoted = false;
    for (int i = 0; i < arg.length(); i++) {
      char c = arg.charAt(i);
      if (c == '"') {
        quoted = !quoted;
      } else if (c == '=' && !quoted) {
        return i;
      }
    }
    return -1;
  }

  /** The key's parts, with the leading {@code sluice} added when the user left it out. */
  private static List<String> path(String arg, String key) {
    List<String> parts;
    try {
      parts = new ArrayList<>(ConfigUtil.splitPath(key));
    } catch (ConfigException e) {
      throw SluiceException.usage(
          "Cannot read --set " + arg + ": " + key + " is not a valid setting key");
    }
    if (!parts.get(0).equals("sluice")) {
      parts.add(0, "sluice");
    }
    return parts;
  }

  /**
   * The text as a HOCON value (numbers, booleans, null, lists, objects, quoted strings). Text that
   * is not one HOCON value, or is an unquoted string, is taken literally: HOCON would drop what
   * follows {@code //} or {@code #} in unquoted text, and a path such as {@code s3://b/t} or an
   * option such as {@code -Dx=y} must reach the setting unchanged.
   */
  static ConfigValue value(String text) {
    try {
      Config parsed = ConfigFactory.parseString("v = " + text).resolve();
      ConfigValue value = parsed.root().get("v");
      boolean single = parsed.root().size() == 1 && value != null;
      if (single && (value.valueType() != ConfigValueType.STRING || text.startsWith("\""))) {
        return value;
      }
    } catch (ConfigException e) {
      // Not a HOCON value: the text itself is the value (see above).
    }
    return ConfigValueFactory.fromAnyRef(text, "--set");
  }
}
