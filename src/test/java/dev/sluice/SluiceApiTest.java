package dev.sluice;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;

import dev.sluice.config.Settings;
import dev.sluice.config.SettingsLoader;
import dev.sluice.plan.Plan;
import dev.sluice.testing.Fixtures;
import dev.sluice.testing.SharedSpark;
import java.nio.file.Path;
import java.util.List;
import java.util.Optional;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.ExtendWith;
import org.junit.jupiter.api.io.TempDir;

/**
 * The Java API as the README shows it: fit on a DataFrame, treat and quarantine, the summary, and a
 * plan written and read back that treats exactly as the fitted one (reference: the command line's
 * own run of the same settings, through the same classes).
 */
@ExtendWith(SharedSpark.class)
class SluiceApiTest {
  @TempDir Path tmp;

  @Test
  void fitTreatSummaryAndASavedPlan(SparkSession spark) {
    Dataset<Row> checks = spark.read().parquet("sample-parquet");
    Settings settings = SettingsLoader.load(Optional.of(Path.of("conf/sample.conf")),
        List.of("columns.rel_humidity_pct.invalid-action=quarantine"));
    Sluice.Fit fit = Sluice.fit(checks, settings, List.of("depot"));
    Dataset<Row> treated = Sluice.treat(checks, fit.plan());
    Dataset<Row> held = Sluice.quarantine(checks, fit.plan());
    // The sample's 113 impossible humidity readings are held back; every other row is treated.
    assertThat(held.count()).isEqualTo(113);
    assertThat(treated.count()).isEqualTo(20000 - 113);
    Dataset<Row> summary = Sluice.summary(spark, fit);
    assertThat(summary.count()).isEqualTo(checks.columns().length);
    assertThat(summary.columns()).contains("column");

    String file = tmp.resolve("plan.json").toString();
    Sluice.writePlan(spark, fit.plan(), file);
    Plan back = Sluice.readPlan(spark, file);
    assertThat(back).isEqualTo(fit.plan());
    Dataset<Row> again = Sluice.treat(checks, back);
    Fixtures.assertSameRows(again, treated);
    assertThatThrownBy(() -> Sluice.readPlan(spark, tmp.resolve("none.json").toString()))
        .isInstanceOf(SluiceException.class).hasMessageContaining("does not exist");
  }
}
