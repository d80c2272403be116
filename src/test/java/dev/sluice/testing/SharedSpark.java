package dev.sluice.testing;

import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.extension.BeforeAllCallback;
import org.junit.jupiter.api.extension.ExtensionContext;
import org.junit.jupiter.api.extension.ParameterContext;
import org.junit.jupiter.api.extension.ParameterResolver;

/**
 * One local SparkSession for the whole test run, stopped once when the run ends. Tests ask for a
 * {@link SparkSession} parameter and get {@code newSession()} of the shared one, so SQL settings
 * do not leak between test classes.
 *
 * <pre>
 * {@literal @}ExtendWith(SharedSpark.class)
 * class MyTest { {@literal @}Test void t(SparkSession spark) { ... } }
 * </pre>
 */
public final class SharedSpark implements BeforeAllCallback, ParameterResolver {
  private static final ExtensionContext.Namespace NS =
      ExtensionContext.Namespace.create(SharedSpark.class);

  /** Holder whose close stops the session at the end of the run. */
  private static final class Holder implements ExtensionContext.Store.CloseableResource {
    final SparkSession session;

    Holder() {
      session =
          SparkSession.builder()
              .master("local[2]")
              .appName("sluice-tests")
              .config("spark.ui.enabled", "false")
              .config("spark.ui.showConsoleProgress", "false")
              .config("spark.sql.shuffle.partitions", "4")
              .config("spark.default.parallelism", "4")
              .config("spark.driver.bindAddress", "127.0.0.1")
              .config("spark.driver.host", "127.0.0.1")
              .config("spark.sql.session.timeZone", "UTC")
              .getOrCreate();
    }

    @Override
    public void close() {
      session.stop();
      SparkSession.clearActiveSession();
      SparkSession.clearDefaultSession();
    }
  }

  private static SparkSession root(ExtensionContext context) {
    return context
        .getRoot()
        .getStore(NS)
        .getOrComputeIfAbsent(Holder.class, k -> new Holder(), Holder.class)
        .session;
  }

  @Override
  public void beforeAll(ExtensionContext context) {
    root(context);
  }

  @Override
  public boolean supportsParameter(ParameterContext p, ExtensionContext e) {
    return p.getParameter().getType() == SparkSession.class;
  }

  @Override
  public Object resolveParameter(ParameterContext p, ExtensionContext e) {
    return root(e).newSession();
  }
}
