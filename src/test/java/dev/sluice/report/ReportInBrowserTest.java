package dev.sluice.report;

import static org.assertj.core.api.Assertions.assertThat;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

import dev.sluice.cli.Main;
import dev.sluice.testing.HeadlessBrowser;
import dev.sluice.testing.SharedSpark;
import java.awt.image.BufferedImage;
import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.util.HashSet;
import java.util.Set;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.functions;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.ExtendWith;
import org.junit.jupiter.api.io.TempDir;

/**
 * report.html in a real browser (headless Chromium, Debian's package; .ci/run installs it, and
 * the test is skipped where it is absent): the sample run's report opens from disk with no console
 * output and no request beyond the file itself, shows its sections, and draws; a column named like
 * a script tag shows as text.
 */
@ExtendWith(SharedSpark.class)
class ReportInBrowserTest {
  @TempDir Path tmp;

  private static int run(String... args) {
    PrintStream quiet = new PrintStream(new ByteArrayOutputStream(), true, StandardCharsets.UTF_8);
    return Main.run(args, quiet, quiet);
  }

  @Test
  void theSampleReportOpensQuietlyAndTheHostileNameIsText(SparkSession spark) throws Exception {
    assumeTrue(HeadlessBrowser.available(), "Chromium is not installed (apt-get install chromium)");
    Path sample = tmp.resolve("sample");
    assertThat(run("run", "--input", "sample-parquet", "--output", sample.toString(),
        "--config", "conf/sample.conf")).isZero();
    String hostile = "<script>alert(1)</script>";
    Path table = tmp.resolve("hostile-table");
    spark.range(300).select(functions.expr("CAST(id % 23 AS DOUBLE)").as(hostile),
        functions.expr("CAST(id % 7 AS DOUBLE)").as("depth_m")).write().parquet(table.toString());
    Path hostileOut = tmp.resolve("hostile");
    assertThat(run("survey", "--input", table.toString(), "--output", hostileOut.toString())).isZero();

    try (HeadlessBrowser browser = HeadlessBrowser.start()) {
      Path report = sample.resolve("report.html");
      HeadlessBrowser.Page page = browser.open(report);
      assertThat(page.consoleErrors()).isEmpty();
      assertThat(page.requests()).containsExactly(report.toUri().toString());
      assertThat(page.evaluate("Array.from(document.querySelectorAll('section > h2'))"
          + ".map(h => h.textContent).join('|')").asText())
          .isEqualTo("Cautions|Run|Columns|Missing values|Collinearity");
      // One box-plot figure per numeric column of the sample (9), with two boxes each.
      assertThat(page.evaluate("document.querySelectorAll('svg.boxplot').length").asInt()).isEqualTo(9);
      assertThat(page.evaluate("document.querySelectorAll('svg.boxplot rect.box').length").asInt()).isEqualTo(18);
      assertThat(page.evaluate("document.body.innerText").asText())
          .contains("not a system of record", "qualified person", "reconciled", "Counted over all 20000 rows");
      BufferedImage shot = page.screenshot();
      Set<Integer> colours = new HashSet<>();
      long afterBoxes = 0;
      for (int y = 0; y < shot.getHeight(); y++) {
        for (int x = 0; x < shot.getWidth(); x++) {
          int rgb = shot.getRGB(x, y) & 0xffffff;
          colours.add(rgb);
          afterBoxes += rgb == 0x1f5fa8 ? 1 : 0;
        }
      }
      assertThat(colours.size()).as("distinct colours on the page").isGreaterThan(20);
      assertThat(afterBoxes).as("pixels of the 'after' boxes' colour").isGreaterThan(500);

      HeadlessBrowser.Page other = browser.open(hostileOut.resolve("report.html"));
      assertThat(other.consoleErrors()).isEmpty();
      assertThat(other.requests()).hasSize(1);
      assertThat(other.evaluate("document.querySelectorAll('script').length").asInt()).isZero();
      assertThat(other.evaluate("document.body.innerText").asText()).contains(hostile);
    }
  }
}
