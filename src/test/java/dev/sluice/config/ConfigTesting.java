package dev.sluice.config;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.catchThrowableOfType;

import com.typesafe.config.ConfigFactory;
import dev.sluice.SluiceException;
import java.util.List;
import java.util.Optional;
import org.assertj.core.api.AbstractStringAssert;
import org.assertj.core.api.ThrowableAssert.ThrowingCallable;

/** Shortcuts for the config tests: settings from HOCON text, and the message they fail with. */
final class ConfigTesting {
  private ConfigTesting() {}

  /** Settings from a HOCON text, reference.conf underneath. */
  static Settings parse(String hocon) {
    return SettingsLoader.fromConfig(ConfigFactory.parseString(hocon));
  }

  /** Settings from reference.conf and the given overrides only. */
  static Settings withOverrides(String... overrides) {
    return SettingsLoader.load(Optional.empty(), List.of(overrides));
  }

  /** Asserts the HOCON text is rejected and returns an assertion on the message, for pinning. */
  static AbstractStringAssert<?> rejection(String hocon) {
    return failure(() -> parse(hocon));
  }

  /** Asserts the call fails with a one-line usage error (exit 2); returns its message assertion. */
  static AbstractStringAssert<?> failure(ThrowingCallable call) {
    SluiceException e = catchThrowableOfType(SluiceException.class, call);
    assertThat(e).as("expected a SluiceException").isNotNull();
    assertThat(e.kind()).isEqualTo(SluiceException.Kind.USAGE);
    assertThat(e.getMessage()).doesNotContain("\n");
    return assertThat(e.getMessage());
  }
}
