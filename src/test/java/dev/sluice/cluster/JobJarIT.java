package dev.sluice.cluster;

import static org.assertj.core.api.Assertions.assertThat;

import java.io.IOException;
import java.io.InputStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.util.List;
import java.util.jar.JarFile;
import org.junit.jupiter.api.Test;

/** What the job jar for spark-submit holds, and what it must not (runs after package). */
class JobJarIT {
  @Test
  void holdsOurClassesAndRelocatedConfigButNoSpark() throws IOException {
    try (JarFile jar = new JarFile(Path.of(System.getProperty("sluice.job.jar")).toFile())) {
      List<String> names = jar.stream().map(e -> e.getName()).toList();
      assertThat(jar.getManifest().getMainAttributes().getValue("Main-Class")).isEqualTo("dev.sluice.cli.Main");
      assertThat(names).contains("dev/sluice/cli/Main.class", "dev/sluice/shaded/config/ConfigFactory.class",
          "reference.conf", "dev/sluice/version.properties");
      assertThat(names).noneMatch(n -> n.startsWith("com/typesafe/"))
          .noneMatch(n -> n.startsWith("org/apache/spark/") || n.startsWith("scala/"))
          .noneMatch(n -> n.startsWith("org/apache/hadoop/") || n.startsWith("org/apache/commons/math3/"))
          .noneMatch(n -> n.matches("META-INF/[^/]+\\.(SF|DSA|RSA|EC)"));
      // Our classes call the relocated Config, never the original package.
      try (InputStream in = jar.getInputStream(jar.getEntry("dev/sluice/config/SettingsLoader.class"))) {
        String bytes = new String(in.readAllBytes(), StandardCharsets.ISO_8859_1);
        assertThat(bytes).contains("dev/sluice/shaded/config/ConfigFactory").doesNotContain("com/typesafe/config");
      }
      try (InputStream in = jar.getInputStream(jar.getEntry("reference.conf"))) {
        assertThat(new String(in.readAllBytes(), StandardCharsets.UTF_8)).contains("max-held-values");
      }
    }
  }
}
