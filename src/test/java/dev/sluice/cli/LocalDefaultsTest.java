package dev.sluice.cli;

import static org.assertj.core.api.Assertions.assertThat;

import org.apache.spark.SparkConf;
import org.junit.jupiter.api.Test;

/** The settings a local session gives itself, and only a local one, unless they are given. */
class LocalDefaultsTest {
  @Test
  void aLocalSessionSendsTaskResultsDirectly() {
    SparkConf local = new SparkConf(false).setMaster("local[2]");
    Main.localDefaults(local);
    assertThat(local.get(Main.DIRECT_RESULT_SIZE)).isEqualTo("128m");
  }

  @Test
  void aGivenValueAndAClusterKeepTheirOwn() {
    SparkConf given = new SparkConf(false).setMaster("local[*]").set(Main.DIRECT_RESULT_SIZE, "4m");
    Main.localDefaults(given);
    assertThat(given.get(Main.DIRECT_RESULT_SIZE)).isEqualTo("4m");
    SparkConf cluster = new SparkConf(false).setMaster("spark://127.0.0.1:7077");
    Main.localDefaults(cluster);
    assertThat(cluster.contains(Main.DIRECT_RESULT_SIZE)).isFalse();
    SparkConf none = new SparkConf(false);
    Main.localDefaults(none);
    assertThat(none.contains(Main.DIRECT_RESULT_SIZE)).isFalse();
  }
}
