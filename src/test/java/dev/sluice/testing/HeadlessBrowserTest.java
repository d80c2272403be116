package dev.sluice.testing;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.assertThatThrownBy;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

import com.fasterxml.jackson.databind.JsonNode;
import java.awt.image.BufferedImage;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.HashSet;
import java.util.Set;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** Checks {@link HeadlessBrowser} against a real headless Chromium; skipped where there is none. */
class HeadlessBrowserTest {
  /** The rectangle's fill, rgb(214, 40, 40). */
  private static final int BOX_RGB = 0xD62828;

  private static HeadlessBrowser browser;

  @TempDir Path dir;

  @BeforeAll
  static void startBrowser() throws IOException, InterruptedException {
    assumeTrue(HeadlessBrowser.available(), "no Chromium (apt-get install -y chromium)");
    browser = HeadlessBrowser.start();
  }

  @AfterAll
  static void stopBrowser() {
    if (browser != null) {
      browser.close();
    }
  }

  @Test
  void opensAQuietStaticPageAndSeesItsHeadingAndColours() throws IOException {
    Path file = write("quiet.html", """
        <!DOCTYPE html>
        <html><head><meta charset="utf-8"><title>quiet</title>
        <style>body { margin: 0; background: #ffffff; } svg { display: block; }</style></head>
        <body><h1>Sluice smoke page</h1>
        <svg xmlns="http://www.w3.org/2000/svg" width="200" height="100">
          <rect id="box" x="0" y="0" width="200" height="100" fill="rgb(214, 40, 40)"/>
        </svg></body></html>
        """);

    HeadlessBrowser.Page page = browser.open(file);

    assertThat(page.consoleErrors()).isEmpty();
    assertThat(page.requests()).containsExactly(file.toUri().toString());
    assertThat(page.evaluate("document.querySelector('h1').textContent").asText())
        .isEqualTo("Sluice smoke page");
    assertThat(page.evaluate("document.querySelectorAll('svg rect').length").asInt())
        .isEqualTo(1);
    // A million-character answer arrives in many WebSocket parts and must be joined whole.
    assertThat(page.evaluate("'x'.repeat(1000000)").asText()).hasSize(1_000_000);

    JsonNode box = page.evaluate(
        "(() => { const r = document.getElementById('box').getBoundingClientRect();"
            + " return {x: r.x, y: r.y, w: r.width, h: r.height}; })()");
    BufferedImage shot = page.screenshot();
    assertThat(shot.getWidth()).isEqualTo(HeadlessBrowser.VIEWPORT_WIDTH);
    assertThat(shot.getHeight()).isEqualTo(HeadlessBrowser.VIEWPORT_HEIGHT);
    Set<Integer> colours = new HashSet<>();
    int boxPixels = 0;
    for (int y = 0; y < shot.getHeight(); y++) {
      for (int x = 0; x < shot.getWidth(); x++) {
        int rgb = shot.getRGB(x, y) & 0xFFFFFF;
        colours.add(rgb);
        if (rgb == BOX_RGB) {
          boxPixels++;
        }
      }
    }
    assertThat(colours).hasSizeGreaterThan(2).contains(0xFFFFFF, BOX_RGB);
    // The 200 x 100 rectangle sits on whole pixels, so nearly all its pixels are exactly its fill.
    assertThat(boxPixels).isBetween(19_000, 20_000);
    int centreX = (int) (box.get("x").asDouble() + box.get("w").asDouble() / 2);
    int centreY = (int) (box.get("y").asDouble() + box.get("h").asDouble() / 2);
    assertThat(shot.getRGB(centreX, centreY) & 0xFFFFFF).isEqualTo(BOX_RGB);
  }

  @Test
  void reportsConsoleErrorsExceptionsAndOutsideRequests() throws IOException {
    Path file = write("noisy.html", """
        <!DOCTYPE html>
        <html><head><meta charset="utf-8"><title>noisy</title></head>
        <body><p>noisy</p>
        <script>console.error('boom')</script>
        <img src="http://127.0.0.1:9/x.png" alt="">
        <script>notDefinedAnywhere()</script>
        </body></html>
        """);

    HeadlessBrowser.Page page = browser.open(file);

    assertThat(page.consoleErrors())
        .anySatisfy(line -> assertThat(line).isEqualTo("console.error: boom"))
        .anySatisfy(line -> assertThat(line).startsWith("uncaught: ")
            .contains("notDefinedAnywhere"));
    assertThat(page.requests())
        .startsWith(file.toUri().toString())
        .contains("http://127.0.0.1:9/x.png");
    assertThatThrownBy(() -> page.evaluate("(() => { throw new Error('nope'); })()"))
        .isInstanceOf(IllegalStateException.class)
        .hasMessageContaining("nope");
  }

  @Test
  void screenshotCoversThePageBelowTheViewport() throws IOException {
    Path file = write("tall.html", """
        <!DOCTYPE html>
        <html><head><meta charset="utf-8"><title>tall</title></head>
        <body style="margin: 0">
        <div style="height: 3000px"></div>
        <div style="height: 50px; background: rgb(30, 60, 200)"></div>
        </body></html>
        """);

    BufferedImage shot = browser.open(file).screenshot();

    assertThat(shot.getHeight()).isEqualTo(3050);
    assertThat(shot.getRGB(640, 3025) & 0xFFFFFF).isEqualTo(0x1E3CC8);
    assertThat(shot.getRGB(640, 2975) & 0xFFFFFF).isEqualTo(0xFFFFFF);
  }

  @Test
  void failsClearlyOnAMissingFile() {
    Path missing = dir.resolve("absent.html");
    assertThatThrownBy(() -> browser.open(missing))
        .isInstanceOf(IllegalStateException.class)
        .hasMessageContaining("absent.html")
        .hasMessageContaining("ERR_FILE_NOT_FOUND");
  }

  private Path write(String name, String html) throws IOException {
    return Files.writeString(dir.resolve(name), html, StandardCharsets.UTF_8);
  }
}
