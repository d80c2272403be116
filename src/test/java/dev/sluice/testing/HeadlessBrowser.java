package dev.sluice.testing;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.node.NullNode;
import com.fasterxml.jackson.databind.node.ObjectNode;
import com.fasterxml.jackson.databind.node.TextNode;
import java.awt.image.BufferedImage;
import java.io.ByteArrayInputStream;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.WebSocket;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.Paths;
import java.time.Duration;
import java.util.ArrayList;
import java.util.Base64;
import java.util.Comparator;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.concurrent.CompletableFuture;
import java.util.concurrent.CompletionStage;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.CopyOnWriteArrayList;
import java.util.concurrent.ExecutionException;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.TimeoutException;
import java.util.concurrent.atomic.AtomicInteger;
import java.util.stream.Stream;
import javax.imageio.ImageIO;

/**
 * Drives a headless Chromium through the Chrome DevTools Protocol, for tests that open an HTML
 * file and check what it shows. Only the JDK's WebSocket client and Jackson are used.
 *
 * <pre>
 * assumeTrue(HeadlessBrowser.available(), "no Chromium");
 * try (HeadlessBrowser browser = HeadlessBrowser.start()) {
 *   HeadlessBrowser.Page page = browser.open(reportFile);   // a Path, or a URL string
 *   assertThat(page.consoleErrors()).isEmpty();
 *   assertThat(page.evaluate("document.querySelectorAll('h2').length").asInt()).isEqualTo(3);
 *   BufferedImage shot = page.screenshot();
 * }
 * </pre>
 *
 * <p>One browser serves many pages; each {@link #open} makes a new tab. The browser is one
 * process tree with a throwaway profile directory; {@link #close} ends both (a JVM shutdown hook
 * does the same if a test forgets). Protocol calls give up after the timeout passed to {@link
 * #start(Duration)} and throw {@link IllegalStateException} with the method's name.
 *
 * <p>The protocol (methods, events and their fields) is Chrome's published DevTools Protocol,
 * https://chromedevtools.github.io/devtools-protocol/ ; the DevToolsActivePort file (port, then
 * the browser endpoint's path) and the event fields used here were checked against Debian's
 * Chromium 156.
 */
public final class HeadlessBrowser implements AutoCloseable {
  private static final ObjectMapper JSON = new ObjectMapper();
  private static final Duration DEFAULT_TIMEOUT = Duration.ofSeconds(30);
  /** After the load event, wait until no event came for this long (late console or log lines). */
  private static final long QUIET_MILLIS = 250;
  /** ... but no longer than this. */
  private static final long SETTLE_MAX_MILLIS = 3_000;
  /** The viewport of every tab, in CSS pixels at a device scale factor of 1. */
  public static final int VIEWPORT_WIDTH = 1280;
  public static final int VIEWPORT_HEIGHT = 2000;
  /** Screenshots are clipped to this height; taller captures fail in Chromium (from memory). */
  private static final int MAX_SHOT_HEIGHT = 16_384;

  private static final List<String> FLAGS =
      List.of(
          "--headless=new",
          "--remote-debugging-port=0",
          "--no-sandbox", // CI runs as root, where Chromium refuses its sandbox
          "--disable-gpu",
          "--no-first-run",
          "--no-default-browser-check",
          "--disable-extensions",
          "--disable-background-networking",
          "--disable-component-update",
          "--disable-sync",
          "--disable-dev-shm-usage", // small /dev/shm in containers crashes the renderer
          "--force-color-profile=srgb", // screenshot pixels equal the CSS colours
          "--force-device-scale-factor=1",
          "--hide-scrollbars",
          "--mute-audio",
          "--js-flags=--max-old-space-size=512",
          "--window-size=" + VIEWPORT_WIDTH + "," + VIEWPORT_HEIGHT);

  private final Process process;
  private final Path tempDir;
  private final Duration timeout;
  private final Thread shutdownHook;
  private final Connection browser;
  private final Map<String, Page> pagesBySession = new ConcurrentHashMap<>();
  private volatile boolean closed;

  private HeadlessBrowser(Process process, Path tempDir, Duration timeout, Thread shutdownHook,
      URI browserUrl) throws IOException, InterruptedException {
    this.process = process;
    this.tempDir = tempDir;
    this.timeout = timeout;
    this.shutdownHook = shutdownHook;
    this.browser = new Connection(browserUrl);
  }

  /** The Chromium binary: env CHROMIUM, then /usr/bin/chromium, then /usr/bin/chromium-browser. */
  static Optional<Path> binary() {
    List<Path> candidates = new ArrayList<>();
    String env = System.getenv("CHROMIUM");
    if (env != null && !env.isBlank()) {
      candidates.add(Paths.get(env));
    }
    candidates.add(Paths.get("/usr/bin/chromium"));
    candidates.add(Paths.get("/usr/bin/chromium-browser"));
    return candidates.stream().filter(Files::isExecutable).findFirst();
  }

  /** True when a Chromium binary is available (see {@link #binary()}). */
  public static boolean available() {
    return binary().isPresent();
  }

  /** Starts a browser with a 30 s timeout for start-up and for every protocol call. */
  public static HeadlessBrowser start() throws IOException, InterruptedException {
    return start(DEFAULT_TIMEOUT);
  }

  /**
   * Starts headless Chromium on a free port with a fresh profile in a temporary directory, and
   * connects to its browser endpoint. Chromium's output goes to {@code chromium.log} there; its
   * last lines are in the message when start-up fails.
   */
  public static HeadlessBrowser start(Duration timeout) throws IOException, InterruptedException {
    Path binary =
        binary().orElseThrow(() -> new IllegalStateException(
            "no Chromium: set CHROMIUM or install it (apt-get install -y chromium)"));
    Path tempDir = Files.createTempDirectory("sluice-chromium-");
    Path profile = tempDir.resolve("profile");
    Path log = tempDir.resolve("chromium.log");
    List<String> command = new ArrayList<>();
    command.add(binary.toString());
    command.addAll(FLAGS);
    command.add("--user-data-dir=" + profile);
    command.add("about:blank");
    Process process =
        new ProcessBuilder(command)
            .redirectErrorStream(true)
            .redirectOutput(log.toFile())
            .start();
    process.getOutputStream().close(); // Chromium reads nothing from its standard input
    Thread hook = new Thread(() -> killTree(process), "chromium-killer");
    Runtime.getRuntime().addShutdownHook(hook);
    try {
      URI url = awaitDevToolsUrl(process, profile.resolve("DevToolsActivePort"), log, timeout);
      return new HeadlessBrowser(process, tempDir, timeout, hook, url);
    } catch (IOException | InterruptedException | RuntimeException e) {
      killTree(process);
      removeHook(hook);
      deleteTree(tempDir);
      throw e;
    }
  }

  /**
   * Waits for Chromium to write DevToolsActivePort into its profile: the port on the first line,
   * the browser endpoint's path on the second.
   */
  private static URI awaitDevToolsUrl(Process process, Path portFile, Path log, Duration timeout)
      throws IOException, InterruptedException {
    long deadline = System.nanoTime() + timeout.toNanos();
    while (System.nanoTime() < deadline) {
      if (Files.exists(portFile)) {
        List<String> lines = Files.readAllLines(portFile, StandardCharsets.UTF_8);
        if (lines.size() >= 2 && !lines.get(1).isBlank()) {
          return URI.create(
              "ws://127.0.0.1:" + lines.get(0).trim() + lines.get(1).trim());
        }
      }
      if (!process.isAlive()) {
        throw new IOException("Chromium exited with code " + process.exitValue()
            + " before it opened its DevTools port; its last output:\n" + tail(log));
      }
      Thread.sleep(50);
    }
    throw new IOException("Chromium did not open its DevTools port within "
        + timeout.toSeconds() + " s; its last output:\n" + tail(log));
  }

  /** Opens a local file in a new tab; see {@link #open(String)}. */
  public Page open(Path file) {
    return open(file.toAbsolutePath().toUri().toString());
  }

  /**
   * Opens a new tab, turns on the Page, Runtime, Log and Network domains, navigates to the URL
   * and waits for its load event (then for the events to settle). Fails when the navigation
   * fails (for example a missing file) or the load does not finish in time.
   */
  public Page open(String url) {
    ObjectNode create = JSON.createObjectNode().put("url", "about:blank");
    String targetId = browser.call(null, "Target.createTarget", create).path("targetId").asText();
    ObjectNode attach = JSON.createObjectNode().put("targetId", targetId).put("flatten", true);
    String sessionId = browser.call(null, "Target.attachToTarget", attach).path("sessionId")
        .asText();
    Page page = new Page(targetId, sessionId);
    pagesBySession.put(sessionId, page);
    // The window size alone leaves a viewport a little shorter than the window; fix it exactly.
    page.call("Emulation.setDeviceMetricsOverride", JSON.createObjectNode()
        .put("width", VIEWPORT_WIDTH).put("height", VIEWPORT_HEIGHT)
        .put("deviceScaleFactor", 1).put("mobile", false));
    page.call("Page.enable", null);
    page.call("Page.setLifecycleEventsEnabled", JSON.createObjectNode().put("enabled", true));
    page.call("Runtime.enable", null);
    page.call("Log.enable", null);
    page.call("Network.enable", null);
    JsonNode nav = page.call("Page.navigate", JSON.createObjectNode().put("url", url));
    String error = nav.path("errorText").asText("");
    if (!error.isEmpty()) {
      throw new IllegalStateException("could not open " + url + ": " + error);
    }
    String loaderId = nav.path("loaderId").asText("");
    if (loaderId.isEmpty()) {
      throw new IllegalStateException("navigating to " + url + " made no new document");
    }
    // The lifecycle "load" of this navigation's loader is its Page.loadEventFired; matching the
    // loader id ignores a late load of the tab's first about:blank.
    await(page.loadFuture(loaderId), "the load event of " + url);
    page.settle();
    return page;
  }

  /** Closes the connection, ends Chromium's process tree and deletes the temporary profile. */
  @Override
  public void close() {
    if (closed) {
      return;
    }
    closed = true;
    try {
      browser.send(null, "Browser.close", null); // the answer may never come: do not wait
      process.waitFor(5, TimeUnit.SECONDS);
    } catch (InterruptedException e) {
      Thread.currentThread().interrupt();
    } catch (RuntimeException e) {
      // Already gone: killing below is enough.
    }
    browser.abort();
    killTree(process);
    removeHook(shutdownHook);
    deleteTree(tempDir);
  }

  /** One open tab, with what it logged and requested since its navigation started. */
  public final class Page {
    private final String targetId;
    private final String sessionId;
    private final List<String> consoleErrors = new CopyOnWriteArrayList<>();
    private final List<String> requests = new CopyOnWriteArrayList<>();
    private final Map<String, CompletableFuture<Void>> loads = new ConcurrentHashMap<>();
    private volatile long lastEventNanos = System.nanoTime();

    private Page(String targetId, String sessionId) {
      this.targetId = targetId;
      this.sessionId = sessionId;
    }

    /**
     * Everything the page printed with the console API (any level, as "console.TYPE: text"),
     * its uncaught exceptions ("uncaught: ..."), and browser log entries of level error or
     * warning, such as failed loads ("log.SOURCE.LEVEL: text (url)"), in arrival order.
     */
    public List<String> consoleErrors() {
      return List.copyOf(consoleErrors);
    }

    /**
     * Every URL the page requested, in order, its own URL first. Redirects add each hop; data:
     * URLs are listed too.
     */
    public List<String> requests() {
      return List.copyOf(requests);
    }

    /**
     * Evaluates a JavaScript expression in the page and returns its value as JSON. undefined
     * gives a JSON null; NaN, Infinity, -0 and BigInts give their text. DOM nodes do not
     * serialise: map them to strings or numbers in the expression. A thrown error fails with its
     * message.
     */
    public JsonNode evaluate(String expression) {
      ObjectNode params =
          JSON.createObjectNode()
              .put("expression", expression)
              .put("returnByValue", true)
              .put("awaitPromise", true);
      JsonNode answer = call("Runtime.evaluate", params);
      JsonNode thrown = answer.get("exceptionDetails");
      if (thrown != null) {
        throw new IllegalStateException(
            "evaluating `" + expression + "` threw: " + describe(thrown));
      }
      JsonNode result = answer.path("result");
      if (result.has("value")) {
        return result.get("value");
      }
      if (result.has("unserializableValue")) {
        return TextNode.valueOf(result.get("unserializableValue").asText());
      }
      return NullNode.getInstance();
    }

    /**
     * A PNG screenshot of the whole page, decoded: at least the viewport, and the full scroll
     * size beyond it (up to 16384 px high).
     */
    public BufferedImage screenshot() {
      JsonNode metrics = call("Page.getLayoutMetrics", null);
      JsonNode size = metrics.has("cssContentSize")
          ? metrics.get("cssContentSize") : metrics.path("contentSize");
      int width = Math.max(1, (int) Math.ceil(size.path("width").asDouble(1)));
      int height =
          Math.min(MAX_SHOT_HEIGHT, Math.max(1, (int) Math.ceil(size.path("height").asDouble(1))));
      ObjectNode params = JSON.createObjectNode().put("format", "png")
          .put("captureBeyondViewport", true);
      params.putObject("clip").put("x", 0).put("y", 0).put("width", width).put("height", height)
          .put("scale", 1);
      byte[] png = Base64.getDecoder().decode(call("Page.captureScreenshot", params)
          .path("data").asText());
      try {
        BufferedImage image = ImageIO.read(new ByteArrayInputStream(png));
        if (image == null) {
          throw new IllegalStateException("the screenshot is not a readable PNG");
        }
        return image;
      } catch (IOException e) {
        throw new UncheckedIOException(e);
      }
    }

    /** Closes this tab. */
    public void close() {
      pagesBySession.remove(sessionId);
      browser.call(null, "Target.closeTarget",
          JSON.createObjectNode().put("targetId", targetId));
    }

    private JsonNode call(String method, ObjectNode params) {
      return browser.call(sessionId, method, params);
    }

    private CompletableFuture<Void> loadFuture(String loaderId) {
      return loads.computeIfAbsent(loaderId, k -> new CompletableFuture<>());
    }

    /** Waits until no event came for QUIET_MILLIS, at most SETTLE_MAX_MILLIS. */
    private void settle() {
      long end = System.nanoTime() + TimeUnit.MILLISECONDS.toNanos(SETTLE_MAX_MILLIS);
      long quiet = TimeUnit.MILLISECONDS.toNanos(QUIET_MILLIS);
      try {
        while (System.nanoTime() < end && System.nanoTime() - lastEventNanos < quiet) {
          Thread.sleep(25);
        }
      } catch (InterruptedException e) {
        Thread.currentThread().interrupt();
      }
    }

    /** Runs on the WebSocket's listener thread, one event at a time. */
    private void onEvent(String method, JsonNode params) {
      lastEventNanos = System.nanoTime();
      switch (method) {
        case "Runtime.consoleAPICalled" -> {
          List<String> parts = new ArrayList<>();
          for (JsonNode arg : params.path("args")) {
            parts.add(remoteText(arg));
          }
          consoleErrors.add(
              "console." + params.path("type").asText() + ": " + String.join(" ", parts));
        }
        case "Runtime.exceptionThrown" ->
            consoleErrors.add("uncaught: " + describe(params.path("exceptionDetails")));
        case "Log.entryAdded" -> {
          JsonNode entry = params.path("entry");
          String level = entry.path("level").asText();
          if (level.equals("error") || level.equals("warning")) {
            String url = entry.path("url").asText("");
            consoleErrors.add("log." + entry.path("source").asText() + "." + level + ": "
                + entry.path("text").asText() + (url.isEmpty() ? "" : " (" + url + ")"));
          }
        }
        case "Network.requestWillBeSent" ->
            requests.add(params.path("request").path("url").asText());
        case "Page.lifecycleEvent" -> {
          if (params.path("name").asText().equals("load")) {
            loadFuture(params.path("loaderId").asText()).complete(null);
          }
        }
        case "Inspector.targetCrashed" -> {
          IllegalStateException crash = new IllegalStateException("the page crashed");
          loads.values().forEach(f -> f.completeExceptionally(crash));
          consoleErrors.add("crash: the page's renderer crashed");
        }
        default -> { }
      }
    }
  }

  /** A remote object's value as text: its JSON value, else its description. */
  private static String remoteText(JsonNode remote) {
    JsonNode value = remote.get("value");
    if (value != null) {
      return value.isTextual() ? value.asText() : value.toString();
    }
    if (remote.has("unserializableValue")) {
      return remote.get("unserializableValue").asText();
    }
    return remote.path("description").asText(remote.path("type").asText());
  }

  /** An exceptionDetails object as one line: the error's first line and where it was thrown. */
  private static String describe(JsonNode details) {
    String text = details.path("exception").path("description").asText("");
    if (text.isEmpty()) {
      text = details.path("exception").has("value")
          ? remoteText(details.path("exception")) : details.path("text").asText();
    }
    text = text.lines().findFirst().orElse("");
    String url = details.path("url").asText("");
    return url.isEmpty() ? text
        : text + " (" + url + ":" + (details.path("lineNumber").asInt() + 1) + ")";
  }

  private <T> T await(CompletableFuture<T> future, String what) {
    return awaitFuture(future, what, timeout);
  }

  private static <T> T awaitFuture(CompletableFuture<T> future, String what, Duration timeout) {
    try {
      return future.get(timeout.toMillis(), TimeUnit.MILLISECONDS);
    } catch (TimeoutException e) {
      throw new IllegalStateException(
          "Chromium: no " + what + " within " + timeout.toSeconds() + " s");
    } catch (ExecutionException e) {
      throw new IllegalStateException("Chromium: " + what + " failed: "
          + e.getCause().getMessage(), e.getCause());
    } catch (InterruptedException e) {
      Thread.currentThread().interrupt();
      throw new IllegalStateException("interrupted while waiting for " + what, e);
    }
  }

  /**
   * One WebSocket to the browser endpoint. Answers are matched to calls by id; events carry the
   * sessionId of their tab (flattened sessions) and go to its Page.
   */
  private final class Connection implements WebSocket.Listener {
    private final Map<Integer, CompletableFuture<JsonNode>> pending = new ConcurrentHashMap<>();
    private final AtomicInteger nextId = new AtomicInteger();
    private final StringBuilder partial = new StringBuilder();
    private final Object sendLock = new Object();
    private final WebSocket socket;
    private volatile String closedBecause;

    Connection(URI url) throws IOException, InterruptedException {
      try {
        socket = HttpClient.newHttpClient().newWebSocketBuilder()
            .connectTimeout(timeout)
            .buildAsync(url, this)
            .get(timeout.toMillis(), TimeUnit.MILLISECONDS);
      } catch (ExecutionException | TimeoutException e) {
        throw new IOException("could not connect to Chromium at " + url, e);
      }
    }

    /** Sends a call and waits for its answer's result; a protocol error throws. */
    JsonNode call(String sessionId, String method, ObjectNode params) {
      return awaitFuture(send(sessionId, method, params), method, timeout);
    }

    CompletableFuture<JsonNode> send(String sessionId, String method, ObjectNode params) {
      int id = nextId.incrementAndGet();
      ObjectNode message = JSON.createObjectNode().put("id", id).put("method", method);
      message.set("params", params == null ? JSON.createObjectNode() : params);
      if (sessionId != null) {
        message.put("sessionId", sessionId);
      }
      CompletableFuture<JsonNode> answer = new CompletableFuture<>();
      if (closedBecause != null) {
        answer.completeExceptionally(new IllegalStateException(closedBecause));
        return answer;
      }
      pending.put(id, answer);
      answer.whenComplete((r, e) -> pending.remove(id));
      // The JDK's WebSocket allows one outstanding send at a time.
      synchronized (sendLock) {
        awaitFuture(socket.sendText(message.toString(), true), "send of " + method, timeout);
      }
      return answer;
    }

    void abort() {
      socket.abort();
      failAll("the connection was closed");
    }

    private void failAll(String why) {
      closedBecause = why;
      IllegalStateException e = new IllegalStateException(why);
      pending.values().forEach(f -> f.completeExceptionally(e));
      pagesBySession.values().forEach(p -> p.loads.values().forEach(
          f -> f.completeExceptionally(e)));
    }

    @Override
    public void onOpen(WebSocket webSocket) {
      webSocket.request(1);
    }

    @Override
    public CompletionStage<?> onText(WebSocket webSocket, CharSequence data, boolean last) {
      // Long messages (screenshots) arrive in several parts.
      partial.append(data);
      if (last) {
        String text = partial.toString();
        partial.setLength(0);
        try {
          dispatch(JSON.readTree(text));
        } catch (IOException | RuntimeException e) {
          System.err.println("HeadlessBrowser: unreadable DevTools message: " + e);
        }
      }
      webSocket.request(1);
      return null;
    }

    private void dispatch(JsonNode message) {
      if (message.has("id")) {
        CompletableFuture<JsonNode> answer = pending.get(message.get("id").asInt());
        if (answer == null) {
          return;
        }
        JsonNode error = message.get("error");
        if (error != null) {
          answer.completeExceptionally(new IllegalStateException(
              error.path("message").asText() + " " + error.path("data").asText("")));
        } else {
          answer.complete(message.path("result"));
        }
        return;
      }
      Page page = pagesBySession.get(message.path("sessionId").asText(""));
      if (page != null) {
        page.onEvent(message.path("method").asText(), message.path("params"));
      }
    }

    @Override
    public CompletionStage<?> onClose(WebSocket webSocket, int statusCode, String reason) {
      failAll("Chromium closed the connection (" + statusCode + " " + reason + ")");
      return null;
    }

    @Override
    public void onError(WebSocket webSocket, Throwable error) {
      failAll("the connection to Chromium failed: " + error);
    }
  }

  /** Ends the process and every process it started, children first seen before the kill. */
  private static void killTree(Process process) {
    List<ProcessHandle> children = process.descendants().toList();
    process.destroyForcibly();
    children.forEach(ProcessHandle::destroyForcibly);
    try {
      process.waitFor(10, TimeUnit.SECONDS);
      for (ProcessHandle child : children) {
        child.onExit().get(5, TimeUnit.SECONDS);
      }
    } catch (InterruptedException e) {
      Thread.currentThread().interrupt();
    } catch (ExecutionException | TimeoutException e) {
      // Best effort: a child that will not die is left to the OS.
    }
  }

  private static void removeHook(Thread hook) {
    try {
      Runtime.getRuntime().removeShutdownHook(hook);
    } catch (IllegalStateException e) {
      // The JVM is shutting down; the hook runs anyway.
    }
  }

  private static void deleteTree(Path root) {
    if (!Files.exists(root)) {
      return;
    }
    try (Stream<Path> paths = Files.walk(root)) {
      paths.sorted(Comparator.reverseOrder()).forEach(p -> p.toFile().delete());
    } catch (IOException | UncheckedIOException e) {
      // A leftover temp directory is harmless.
    }
  }

  /** The last 20 lines of Chromium's output. */
  private static String tail(Path log) {
    try {
      List<String> lines = Files.readAllLines(log, StandardCharsets.UTF_8);
      return String.join("\n", lines.subList(Math.max(0, lines.size() - 20), lines.size()));
    } catch (IOException e) {
      return "(no output: " + e.getMessage() + ")";
    }
  }
}
