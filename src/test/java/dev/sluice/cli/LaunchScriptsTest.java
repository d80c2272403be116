package dev.sluice.cli;

import static org.assertj.core.api.Assertions.assertThat;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;

/**
 * The spark-submit commands the launch scripts under jobs/ compose (SLUICE_DRY_RUN=1 prints them
 * instead of running them); the standalone script also runs for real in ClusterRunIT.
 */
class LaunchScriptsTest {
  private record Ran(int code, String out) {}

  private static Ran script(String name, Map<String, String> env, String... args)
      throws IOException, InterruptedException {
    List<String> cmd = new ArrayList<>(List.of("bash", Path.of("jobs", name).toString()));
    cmd.addAll(List.of(args));
    ProcessBuilder b = new ProcessBuilder(cmd).redirectErrorStream(true);
    b.environment().keySet().removeIf(k -> k.startsWith("SLUICE_") || k.equals("SPARK_HOME"));
    b.environment().put("SLUICE_DRY_RUN", "1");
    b.environment().put("SLUICE_JAR", "/opt/sluice/sluice-job.jar");
    b.environment().putAll(env);
    Process p = b.start();
    String out = new String(p.getInputStream().readAllBytes(), StandardCharsets.UTF_8);
    return new Ran(p.waitFor(), out);
  }

  @Test
  void yarnClusterModeShipsTheSettingsFileAndNamesItByItsBaseName() throws Exception {
    Ran r = script("submit-yarn.sh", Map.of("SLUICE_CONFIG", "conf/sample.conf", "SLUICE_EXECUTORS", "6"),
        "run", "--input", "hdfs:///lake/t", "--output", "hdfs:///clean/t");
    assertThat(r.code()).as(r.out()).isZero();
    assertThat(r.out()).contains("--master yarn", "--deploy-mode cluster", "--num-executors 6",
        "--files conf/sample.conf", "--class dev.sluice.cli.Main",
        "/opt/sluice/sluice-job.jar run --input hdfs:///lake/t --output hdfs:///clean/t --config sample.conf");
  }

  @Test
  void standaloneIsClientModeWithMemoryAndCoresAndNeedsAMaster() throws Exception {
    Ran r = script("submit-standalone.sh", Map.of("SLUICE_MASTER", "spark://m:7077",
        "SLUICE_CONFIG", "conf/sample.conf", "SLUICE_EXECUTOR_MEMORY", "6g"), "survey", "--input", "a b", "--output", "c");
    assertThat(r.code()).as(r.out()).isZero();
    assertThat(r.out()).contains("--deploy-mode client", "--master spark://m:7077", "--executor-memory 6g",
        "--driver-memory 2g", "--files conf/sample.conf", "survey --input a\\ b --output c --config conf/sample.conf");
    Ran missing = script("submit-standalone.sh", Map.of(), "run");
    assertThat(missing.code()).isNotZero();
    assertThat(missing.out()).contains("set SLUICE_MASTER");
  }

  @Test
  void kubernetesTakesTheImageAndASettingsFileInsideIt() throws Exception {
    Ran r = script("submit-k8s.sh", Map.of("SLUICE_K8S_MASTER", "k8s://https://api:6443",
        "SLUICE_IMAGE", "registry.example/sluice:0.1", "SLUICE_CONFIG", "local:///opt/sluice/app.conf"),
        "run", "--input", "s3a://l/t", "--output", "s3a://c/t");
    assertThat(r.code()).as(r.out()).isZero();
    assertThat(r.out()).contains("--deploy-mode cluster", "--master k8s://https://api:6443",
        "spark.kubernetes.container.image=registry.example/sluice:0.1", "--config /opt/sluice/app.conf")
        .doesNotContain("--files");
  }

  @Test
  void savedPlanExampleFitsAWindowThenTreatsADayWithoutSettings() throws Exception {
    Ran fit = script("daily-with-saved-plan.sh", Map.of(), "fit", "2026-10-01", "2026-10-28");
    assertThat(fit.code()).as(fit.out()).isZero();
    assertThat(fit.out()).contains("fit --input hdfs:///lake/pallet_checks --output hdfs:///plans/pallet_checks",
        "BETWEEN\\ DATE\\'2026-10-01\\'\\ AND\\ DATE\\'2026-10-28\\'", "--config sample.conf");
    Ran treat = script("daily-with-saved-plan.sh", Map.of("SLUICE_CONFIG", "conf/sample.conf"), "treat", "2026-11-30");
    assertThat(treat.code()).as(treat.out()).isZero();
    assertThat(treat.out()).contains("treat --plan hdfs:///plans/pallet_checks/plan.json", "DATE\\'2026-11-30\\'")
        .doesNotContain("--config").doesNotContain("--files");
    assertThat(script("daily-with-saved-plan.sh", Map.of(), "treat", "tomorrow").code()).isEqualTo(2);
    assertThat(script("daily-with-saved-plan.sh", Map.of(), "refit").code()).isEqualTo(2);
  }

  @Test
  void dailyExampleTreatsOneDayAndRefusesAMalformedDay() throws Exception {
    Ran r = script("daily-example.sh", Map.of(), "2026-11-30");
    assertThat(r.code()).as(r.out()).isZero();
    assertThat(r.out()).contains("--where check_date\\ =\\ DATE\\'2026-11-30\\'", "--master yarn");
    Ran bad = script("daily-example.sh", Map.of(), "30.11.2026");
    assertThat(bad.code()).isEqualTo(2);
    assertThat(bad.out()).contains("YYYY-MM-DD");
    Ran noFile = script("submit-yarn.sh", Map.of("SLUICE_CONFIG", "no/such.conf"), "run");
    assertThat(noFile.code()).isEqualTo(2);
    assertThat(noFile.out()).contains("is not a file");
  }
}
