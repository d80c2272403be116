package dev.sluice.cluster;

import static org.assertj.core.api.Assertions.assertThat;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import dev.sluice.testing.FaultyFileSystem;
import dev.sluice.testing.Fixtures;
import dev.sluice.testing.SharedSpark;
import java.io.IOException;
import java.io.OutputStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Map;
import java.util.concurrent.atomic.AtomicLong;
import java.util.concurrent.atomic.AtomicReference;
import java.util.jar.JarEntry;
import java.util.jar.JarOutputStream;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import java.util.stream.Stream;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.ExtendWith;

/**
 * The packaged job jar on a real Spark standalone cluster (a master and two workers on 127.0.0.1,
 * each its own JVM), submitted in client mode with jobs/submit-standalone.sh through Spark's own
 * submit entry point: the sample is treated, and the result is compared row for row with a
 * local-mode run of the same jar and config. Then the same run with faults: an executor killed while the rows are written, and a
 * task whose first attempt fails. Runs after {@code package} (Maven's failsafe plugin).
 */
@ExtendWith(SharedSpark.class)
class ClusterRunIT {
  private static final Duration RUN_LIMIT = Duration.ofMinutes(5);
  private static Path dir;
  private static Path jobJar;
  private static StandaloneCluster cluster;
  private static Path localOut;

  @BeforeAll
  static void startCluster() throws Exception {
    dir = Path.of(System.getProperty("sluice.it.dir")).resolve("cluster");
    deleteTree(dir);
    Files.createDirectories(dir);
    jobJar = Path.of(System.getProperty("sluice.job.jar"));
    assertThat(jobJar).as("the job jar, built by mvn package").exists();
    List<String> flags = Arrays.asList(System.getProperty("sluice.java.flags").trim().split("\\s+"));
    cluster = StandaloneCluster.start(dir, Path.of(System.getProperty("sluice.runtime.classpath")),
        List.of(faultJar()), flags, 2, 1536);
    localOut = dir.resolve("out-local");
    StandaloneCluster.Submitted local = cluster.submit("submit-local", submitArgs("local[2]",
        localOut.toString(), List.of()), line -> { }, RUN_LIMIT);
    assertThat(local.code()).as(local.output()).isZero();
  }

  @AfterAll
  static void stopCluster() {
    if (cluster != null) {
      cluster.close();
    }
  }

  @Test
  void theJarRunsOnTheClusterAsInLocalMode(SparkSession spark) throws Exception {
    // Through the launch script users run, with its settings.
    Path out = dir.resolve("out-cluster");
    StandaloneCluster.Submitted run = cluster.command("submit-cluster", List.of(
        Path.of("jobs", "submit-standalone.sh").toAbsolutePath().toString(), "run",
        "--input", Path.of("sample-parquet").toAbsolutePath().toString(), "--output", out.toString()),
        Map.of("SLUICE_MASTER", cluster.masterUrl(), "SLUICE_JAR", jobJar.toString(),
            "SLUICE_CONFIG", Path.of("conf", "sample.conf").toAbsolutePath().toString(),
            "SLUICE_DRIVER_MEMORY", "1g", "SLUICE_EXECUTOR_MEMORY", "1g", "SLUICE_EXECUTOR_CORES", "1",
            "SLUICE_TOTAL_CORES", "2", "SLUICE_SUBMIT_OPTS", "--conf spark.ui.enabled=false"),
        RUN_LIMIT);
    assertThat(run.code()).as(run.output()).isZero();
    assertThat(run.output()).contains("sluice: run finished");
    assertSameAsLocal(spark, out);
    // The work ran on both workers' executors, not in the driver.
    for (String worker : List.of("worker-0", "worker-1")) {
      try (Stream<Path> files = Files.walk(dir.resolve(worker))) {
        assertThat(files.filter(f -> f.getFileName().toString().equals("stderr")).anyMatch(f -> {
          try {
            return Files.readString(f).contains("Finished task");
          } catch (IOException e) {
            return false;
          }
        })).as(worker + " ran tasks").isTrue();
      }
    }
  }

  @Test
  void anExecutorKilledWhileTheRowsAreWrittenChangesNothing(SparkSession spark) throws Exception {
    Path out = dir.resolve("out-killed");
    AtomicLong killed = new AtomicLong(-1);
    AtomicReference<String> writeStage = new AtomicReference<>();
    Pattern stage = Pattern.compile("Final stage: ResultStage (\\d+) \\(parquet at Job\\.java");
    Pattern task = Pattern.compile("Starting task \\S+ in stage (\\d+)\\.\\d+ \\(TID \\d+\\) \\([^,]*,\\s*executor (\\d+),");
    // Each write task waits 4 s before its first file; the executor running the first task of the
    // writing stage is killed 1 s into that wait, so the kill lands in the middle of a write task.
    List<String> faults = List.of(
        "--conf", "spark.hadoop." + FaultyFileSystem.MATCH + "=/treated/",
        "--conf", "spark.hadoop." + FaultyFileSystem.SLOW_MS + "=4000");
    StandaloneCluster.Submitted run = cluster.submit("submit-killed",
        submitArgs(cluster.masterUrl(), FaultyFileSystem.SCHEME + "://" + out, faults), line -> {
          Matcher s = stage.matcher(line);
          if (s.find() && writeStage.get() == null) {
            writeStage.set(s.group(1));
          }
          Matcher t = task.matcher(line);
          if (t.find() && t.group(1).equals(writeStage.get()) && killed.compareAndSet(-1, 0)) {
            String executor = t.group(2);
            Thread killer = new Thread(() -> {
              try {
                Thread.sleep(1000);
                killed.set(cluster.killExecutor(executor));
              } catch (InterruptedException e) {
                Thread.currentThread().interrupt();
              }
            });
            killer.start();
          }
        }, RUN_LIMIT);
    assertThat(run.code()).as(run.output()).isZero();
    assertThat(writeStage.get()).as("the writing stage was seen").isNotNull();
    assertThat(killed.get()).as("an executor was killed during the writing pass").isPositive();
    // A task of the writing pass was running on it, and ran again elsewhere (Spark words this
    // either way, depending on which it notices first: the lost executor or the failed task).
    assertThat(run.output()).contains("Lost executor")
        .containsPattern("ExecutorLostFailure|its executor exited for a reason unrelated to the task");
    assertSameAsLocal(spark, out);
  }

  @Test
  void aTaskThatFailsOnItsFirstAttemptIsRetried(SparkSession spark) throws Exception {
    Path out = dir.resolve("out-retried");
    Path markers = Files.createDirectories(dir.resolve("markers"));
    List<String> faults = List.of(
        "--conf", "spark.hadoop." + FaultyFileSystem.MATCH + "=/treated/",
        "--conf", "spark.hadoop." + FaultyFileSystem.MARKERS + "=" + markers);
    StandaloneCluster.Submitted run = cluster.submit("submit-retried",
        submitArgs(cluster.masterUrl(), FaultyFileSystem.SCHEME + "://" + out, faults), line -> { }, RUN_LIMIT);
    assertThat(run.code()).as(run.output()).isZero();
    assertThat(markers.resolve("failed-once")).as("the injected failure happened").exists();
    assertThat(run.output()).contains("Injected failure of task attempt");
    assertSameAsLocal(spark, out);
  }

  /** Treated rows, plan and reconciled counts equal to those of the local-mode run. */
  private static void assertSameAsLocal(SparkSession spark, Path out) throws IOException {
    assertThat(out.resolve("_COMMITTED")).exists();
    Dataset<Row> a = spark.read().parquet(out.resolve("treated").toString());
    Dataset<Row> b = spark.read().parquet(localOut.resolve("treated").toString());
    assertThat(a.count()).isEqualTo(b.count()).isPositive();
    Fixtures.assertSameRows(a, b);
    ObjectMapper json = new ObjectMapper();
    assertThat(json.readTree(out.resolve("plan.json").toFile()))
        .isEqualTo(json.readTree(localOut.resolve("plan.json").toFile()));
    JsonNode rows = json.readTree(out.resolve("run.json").toFile()).get("rows");
    assertThat(rows).isEqualTo(json.readTree(localOut.resolve("run.json").toFile()).get("rows"));
    assertThat(rows.get("reconciled").asBoolean()).isTrue();
  }

  private static List<String> submitArgs(String master, String output, List<String> extra) {
    List<String> a = new ArrayList<>(List.of("--master", master, "--deploy-mode", "client",
        "--class", "dev.sluice.cli.Main",
        "--conf", "spark.ui.enabled=false",
        "--conf", "spark.executor.memory=1g",
        "--conf", "spark.hadoop.fs." + FaultyFileSystem.SCHEME + ".impl=" + FaultyFileSystem.class.getName(),
        "--conf", "spark.hadoop.fs." + FaultyFileSystem.SCHEME + ".impl.disable.cache=true"));
    a.addAll(extra);
    a.addAll(List.of(jobJar.toString(), "run", "--input", Path.of("sample-parquet").toAbsolutePath().toString(),
        "--output", output, "--config", Path.of("conf", "sample.conf").toAbsolutePath().toString()));
    return a;
  }

  /** A jar of the test file system, for the cluster's class path (drivers and executors). */
  private static Path faultJar() throws IOException {
    Path jar = dir.resolve("faults.jar");
    String name = FaultyFileSystem.class.getName().replace('.', '/') + ".class";
    try (OutputStream f = Files.newOutputStream(jar); JarOutputStream j = new JarOutputStream(f);
        var in = FaultyFileSystem.class.getClassLoader().getResourceAsStream(name)) {
      j.putNextEntry(new JarEntry(name));
      in.transferTo(j);
      j.closeEntry();
    }
    return jar;
  }

  private static void deleteTree(Path p) throws IOException {
    if (!Files.exists(p)) {
      return;
    }
    try (Stream<Path> all = Files.walk(p)) {
      for (Path f : all.sorted(java.util.Comparator.reverseOrder()).toList()) {
        Files.delete(f);
      }
    }
  }
}
