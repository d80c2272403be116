package dev.sluice.cluster;

import java.io.IOException;
import java.net.URI;
import java.net.http.HttpClient;
import java.net.http.HttpRequest;
import java.net.http.HttpResponse;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Map;
import java.util.concurrent.TimeUnit;
import java.util.function.Consumer;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

/**
 * A Spark standalone cluster on 127.0.0.1 for the integration tests: one master and a few workers,
 * each its own JVM, started from the Spark jars Maven resolved (no downloaded distribution). A
 * SPARK_HOME is made of links to those jars, since workers build their executors' class path from
 * SPARK_HOME/jars. Typesafe Config is left out of it: the job jar must bring its own. Closing the
 * cluster kills every process it started, executors included, whatever happened.
 */
final class StandaloneCluster implements AutoCloseable {
  private final Path dir;
  private final Path home;
  private final List<String> javaFlags;
  private final List<Process> daemons = new ArrayList<>();
  /** The master's address and status page, as the master itself reported them once bound. */
  private String masterUrl;
  private URI masterUi;

  private StandaloneCluster(Path dir, List<String> javaFlags) {
    this.dir = dir;
    this.home = dir.resolve("spark-home");
    this.javaFlags = javaFlags;
  }

  /**
   * Starts a master and {@code workers} workers of one core and {@code workerMb} MiB each; the
   * class path of every JVM of the cluster is the runtime class path plus {@code extraJars}.
   */
  static StandaloneCluster start(Path dir, Path runtimeClasspath, List<Path> extraJars,
      List<String> javaFlags, int workers, int workerMb) throws IOException, InterruptedException {
    StandaloneCluster c = new StandaloneCluster(dir, javaFlags);
    // Torn down even when the test JVM is stopped before its tests end.
    Runtime.getRuntime().addShutdownHook(new Thread(c::close, "stop-standalone-cluster"));
    try {
      c.linkJars(runtimeClasspath);
      for (Path jar : extraJars) {
        Files.createSymbolicLink(c.home.resolve("jars").resolve(jar.getFileName()), jar.toAbsolutePath());
      }
      // Every port is picked by the process that binds it (port 0) and read back from its log. A
      // port chosen here in advance and released could be taken by another daemon before its owner
      // binds it; the master would then move its status page and the wait below would ask a
      // worker's RPC port for it.
      Process master = c.java("master", List.of("-Xmx256m"), "org.apache.spark.deploy.master.Master",
          "--host", "127.0.0.1", "--port", "0", "--webui-port", "0");
      c.daemons.add(master);
      c.awaitMaster(master, Duration.ofSeconds(90));
      for (int w = 0; w < workers; w++) {
        Path work = Files.createDirectories(dir.resolve("worker-" + w));
        c.daemons.add(c.java("worker-" + w, List.of("-Xmx256m"), "org.apache.spark.deploy.worker.Worker",
            "--host", "127.0.0.1", "--cores", "1", "--memory", workerMb + "m",
            "--work-dir", work.toString(), "--port", "0", "--webui-port", "0", c.masterUrl));
      }
      c.awaitWorkers(workers, Duration.ofSeconds(90));
      return c;
    } catch (IOException | InterruptedException | RuntimeException e) {
      c.close();
      throw e;
    }
  }

  String masterUrl() {
    return masterUrl;
  }

  Path home() {
    return home;
  }

  /** The outcome of a submission: its exit code and everything it printed. */
  record Submitted(int code, String output) {}

  /**
   * Runs Spark's own submit entry point (org.apache.spark.deploy.SparkSubmit) in a new JVM with
   * {@code args}; each line it prints goes to {@code lines} as it comes.
   */
  Submitted submit(String name, List<String> args, Consumer<String> lines, Duration timeout)
      throws IOException, InterruptedException {
    Process p = java(name, List.of("-Xmx1g"), "org.apache.spark.deploy.SparkSubmit",
        args.toArray(new String[0]));
    return follow(name, p, lines, timeout);
  }

  /**
   * Runs a command (a launch script) with this cluster's SPARK_HOME, whose bin/spark-submit starts
   * Spark's submit entry point on the cluster's class path, and {@code env} added.
   */
  Submitted command(String name, List<String> command, Map<String, String> env, Duration timeout)
      throws IOException, InterruptedException {
    ProcessBuilder b = new ProcessBuilder(command).redirectErrorStream(true)
        .redirectOutput(dir.resolve(name + ".log").toFile());
    environment(b.environment());
    b.environment().putAll(env);
    return follow(name, b.start(), line -> { }, timeout);
  }

  private Submitted follow(String name, Process p, Consumer<String> lines, Duration timeout)
      throws IOException, InterruptedException {
    // The log file is the process's output; follow it as it grows.
    Path log = dir.resolve(name + ".log");
    StringBuilder seen = new StringBuilder();
    long deadline = System.nanoTime() + timeout.toNanos();
    long read = 0;
    while (true) {
      boolean done = !p.isAlive();
      String text = Files.exists(log) ? Files.readString(log, StandardCharsets.UTF_8) : "";
      if (text.length() > read) {
        String fresh = text.substring((int) read);
        int cut = done ? fresh.length() : fresh.lastIndexOf('\n') + 1;
        for (String line : fresh.substring(0, cut).split("\\R")) {
          if (!line.isEmpty()) {
            lines.accept(line);
          }
        }
        seen.append(fresh, 0, cut);
        read += cut;
      }
      if (done) {
        return new Submitted(p.exitValue(), seen.toString());
      }
      if (System.nanoTime() > deadline) {
        kill(p);
        throw new IllegalStateException(name + " did not finish within " + timeout + "; its output:\n" + text);
      }
      Thread.sleep(200);
    }
  }

  /** Kills the running executor JVM with Spark's executor id {@code id}; returns its process id. */
  long killExecutor(String id) {
    for (Process d : daemons) {
      for (ProcessHandle h : d.toHandle().descendants().toList()) {
        String cmd = h.info().commandLine().orElse("");
        if (cmd.contains("CoarseGrainedExecutorBackend") && cmd.matches(".*--executor-id " + id + "( .*|$)")) {
          h.destroyForcibly();
          return h.pid();
        }
      }
    }
    throw new IllegalStateException("No executor " + id + " is running");
  }

  @Override
  public synchronized void close() {
    for (Process d : daemons) {
      kill(d);
    }
    daemons.clear();
  }

  private static void kill(Process p) {
    p.toHandle().descendants().forEach(ProcessHandle::destroyForcibly);
    p.destroyForcibly();
    try {
      p.waitFor(30, TimeUnit.SECONDS);
    } catch (InterruptedException e) {
      Thread.currentThread().interrupt();
    }
  }

  private Process java(String name, List<String> heap, String mainClass, String... args) throws IOException {
    List<String> cmd = new ArrayList<>();
    cmd.add(Path.of(System.getProperty("java.home"), "bin", "java").toString());
    cmd.addAll(javaFlags);
    cmd.addAll(heap);
    cmd.add("-cp");
    cmd.add(home.resolve("jars") + "/*");
    cmd.add(mainClass);
    cmd.addAll(Arrays.asList(args));
    ProcessBuilder b = new ProcessBuilder(cmd).redirectErrorStream(true)
        .redirectOutput(dir.resolve(name + ".log").toFile());
    environment(b.environment());
    return b.start();
  }

  private void environment(Map<String, String> env) {
    env.put("SPARK_HOME", home.toString());
    env.put("SPARK_SCALA_VERSION", "2.13");
    env.put("SPARK_LOCAL_IP", "127.0.0.1");
    env.put("JAVA_HOME", System.getProperty("java.home"));
    env.remove("SPARK_CONF_DIR");
  }

  private void linkJars(Path runtimeClasspath) throws IOException {
    Path jars = Files.createDirectories(home.resolve("jars"));
    // What a Spark installation's bin/spark-submit does for a client-mode driver, in one line.
    Path submit = Files.createDirectories(home.resolve("bin")).resolve("spark-submit");
    Files.writeString(submit, "#!/usr/bin/env bash\nexec \"$JAVA_HOME/bin/java\" "
        + String.join(" ", javaFlags) + " -Xmx1g -cp \"$SPARK_HOME/jars/*\""
        + " org.apache.spark.deploy.SparkSubmit \"$@\"\n");
    submit.toFile().setExecutable(true);
    for (String entry : Files.readString(runtimeClasspath).strip().split(java.io.File.pathSeparator)) {
      Path jar = Path.of(entry);
      if (entry.contains("com/typesafe/config") || !entry.endsWith(".jar")) {
        continue;
      }
      Files.createSymbolicLink(jars.resolve(jar.getFileName()), jar);
    }
  }

  private static final Pattern MASTER_URL = Pattern.compile("Starting Spark master at (spark://\\S+)");
  private static final Pattern MASTER_UI =
      Pattern.compile("Bound MasterWebUI to \\S+ and started at http://[^:/\\s]+:(\\d+)");

  /** Waits until the master's log says where it listens and where its status page is. */
  private void awaitMaster(Process master, Duration timeout) throws IOException, InterruptedException {
    Path log = dir.resolve("master.log");
    long deadline = System.nanoTime() + timeout.toNanos();
    while (System.nanoTime() < deadline) {
      String text = Files.exists(log) ? Files.readString(log, StandardCharsets.UTF_8) : "";
      Matcher url = MASTER_URL.matcher(text);
      Matcher ui = MASTER_UI.matcher(text);
      if (url.find() && ui.find()) {
        masterUrl = url.group(1);
        masterUi = URI.create("http://127.0.0.1:" + ui.group(1) + "/json/");
        return;
      }
      if (!master.isAlive()) {
        throw new IllegalStateException("The master exited early; see " + log);
      }
      Thread.sleep(200);
    }
    throw new IllegalStateException("The master did not report its ports within " + timeout + "; see " + log);
  }

  /** Waits until the master's status page lists {@code n} live workers. */
  private void awaitWorkers(int n, Duration timeout) throws IOException, InterruptedException {
    HttpClient http = HttpClient.newHttpClient();
    URI status = masterUi;
    long deadline = System.nanoTime() + timeout.toNanos();
    String last = "";
    while (System.nanoTime() < deadline) {
      try {
        last = http.send(HttpRequest.newBuilder(status).timeout(Duration.ofSeconds(5)).build(),
            HttpResponse.BodyHandlers.ofString()).body();
        Matcher m = Pattern.compile("\"state\"\\s*:\\s*\"ALIVE\"").matcher(last);
        int alive = 0;
        while (m.find()) {
          alive++;
        }
        if (alive >= n) {
          return;
        }
      } catch (IOException e) {
        last = e.toString();
      }
      for (Process d : daemons) {
        if (!d.isAlive()) {
          throw new IllegalStateException("A cluster process exited early; see " + dir);
        }
      }
      Thread.sleep(500);
    }
    throw new IllegalStateException("Fewer than " + n + " workers registered within " + timeout
        + "; the master said: " + last);
  }
}
