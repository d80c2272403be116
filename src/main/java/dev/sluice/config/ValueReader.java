package dev.sluice.config;

import com.typesafe.config.Config;
import com.typesafe.config.ConfigException;
import com.typesafe.config.ConfigValue;
import com.typesafe.config.ConfigValueFactory;
import dev.sluice.SluiceException;
import java.util.Arrays;
import java.util.Optional;
import java.util.OptionalDouble;
import java.util.function.DoublePredicate;
import java.util.stream.Collectors;

/**
 * Typed reads of one block of settings (the whole tree, the defaults or one column), each failure
 * turned into the one-line "Cannot set KEY to VALUE: REASON" message. Keys passed in are relative
 * to the block; messages name the full key.
 */
final class ValueReader {
  /** Largest whole number a double holds exactly. */
  private static final double MAX_WHOLE = 9007199254740992.0;

  private final Config merged;
  private final Config own;
  private final String prefix;

  /**
   * @param merged the values to read: the block over its fallbacks
   * @param own what the block sets itself; decides which of two clashing keys is blamed
   * @param prefix the full key of the block, e.g. {@code sluice.columns."gross.weight"}
   */
  ValueReader(Config merged, Config own, String prefix) {
    this.merged = merged;
    this.own = own;
    this.prefix = prefix;
  }

  /** The full key of {@code key}. */
  String key(String key) {
    return prefix + "." + key;
  }

  /** Whether the block sets {@code key} itself rather than inheriting it. */
  boolean sets(String key) {
    return own.hasPathOrNull(key);
  }

  /** The error for the current value of {@code key}. */
  SluiceException invalid(String key, String reason) {
    return SluiceException.usage(
        "Cannot set " + key(key) + " to " + ConfigTree.render(value(key)) + ": " + reason);
  }

  /** The value of {@code key}, null as a null value rather than an exception. */
  ConfigValue value(String key) {
    return merged.getIsNull(key) ? ConfigValueFactory.fromAnyRef(null) : merged.getValue(key);
  }

  /** A finite number. */
  double number(String key) {
    double x;
    try {
      x = merged.getDouble(key);
    } catch (ConfigException.Missing | ConfigException.WrongType e) {
      throw invalid(key, "expected a number");
    }
    if (!Double.isFinite(x)) {
      throw invalid(key, "expected a finite number");
    }
    return x;
  }

  /** A finite number that passes {@code ok}; {@code expectation} says which numbers do. */
  double number(String key, DoublePredicate ok, String expectation) {
    double x = number(key);
    if (!ok.test(x)) {
      throw invalid(key, expectation);
    }
    return x;
  }

  /** A whole number from {@code min} to {@code max}; {@code expectation} says so in words. */
  long whole(String key, long min, long max, String expectation) {
    double x = number(key);
    if (x != Math.rint(x) || Math.abs(x) > MAX_WHOLE) {
      throw invalid(key, "expected a whole number");
    }
    if (x < min || x > max) {
      throw invalid(key, expectation);
    }
    return (long) x;
  }

  /** A number, or empty for null. */
  OptionalDouble optionalNumber(String key) {
    return merged.getIsNull(key) ? OptionalDouble.empty() : OptionalDouble.of(number(key));
  }

  /** true or false (HOCON also accepts yes/no and on/off). */
  boolean flag(String key) {
    try {
      return merged.getBoolean(key);
    } catch (ConfigException.Missing | ConfigException.WrongType e) {
      throw invalid(key, "expected true or false");
    }
  }

  /** A string; numbers and booleans are taken in their written form. */
  String text(String key) {
    try {
      return merged.getString(key);
    } catch (ConfigException.Missing | ConfigException.WrongType e) {
      throw invalid(key, "expected a string");
    }
  }

  /** A list of strings (numbers and booleans taken in their written form). */
  java.util.List<String> textList(String key) {
    try {
      return java.util.List.copyOf(merged.getStringList(key));
    } catch (ConfigException.Missing | ConfigException.WrongType e) {
      throw invalid(key, "expected a list of strings, e.g. [\"depot\"]");
    }
  }

  /** A string, number or boolean in its plain text form, or empty for null. */
  Optional<String> optionalScalar(String key) {
    ConfigValue value = value(key);
    if (merged.getIsNull(key)) {
      return Optional.empty();
    }
    if (!ConfigTree.isScalar(value)) {
      throw invalid(key, "expected a string, a number or null");
    }
    return Optional.of(ConfigTree.plain(value));
  }

  /** One of the constants of {@code type}, written as {@link SettingsLoader#configName}. */
  <E extends Enum<E>> E choice(String key, Class<E> type) {
    String written = merged.getIsNull(key) ? null : text(key);
    for (E constant : type.getEnumConstants()) {
      if (SettingsLoader.configName(constant).equals(written)) {
        return constant;
      }
    }
    throw invalid(key, "expected one of " + allowed(type));
  }

  private static String allowed(Class<? extends Enum<?>> type) {
    return Arrays.stream(type.getEnumConstants())
        .map(SettingsLoader::configName)
        .collect(Collectors.joining(", "));
  }

  /**
   * Requires {@code low <= high}. The key the block sets itself is blamed, so a column that only
   * raises {@code iqr-k} above the default {@code outer-k} is told about its own {@code iqr-k}.
   */
  void requireOrdered(String lowKey, double low, String highKey, double high) {
    if (low <= high) {
      return;
    }
    if (sets(highKey) || !sets(lowKey)) {
      throw invalid(highKey, "expected at least " + key(lowKey) + " (" + shown(lowKey) + ")");
    }
    throw invalid(lowKey, "expected at most " + key(highKey) + " (" + shown(highKey) + ")");
  }

  private String shown(String key) {
    return ConfigTree.render(value(key));
  }
}
