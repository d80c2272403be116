package dev.sluice.cluster;

import static org.assertj.core.api.Assertions.assertThat;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import dev.sluice.cli.Main;
import dev.sluice.testing.Fixtures;
import dev.sluice.testing.SharedSpark;
import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.InputStream;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import org.apache.hadoop.conf.Configuration;
import org.apache.hadoop.fs.FileStatus;
import org.apache.hadoop.fs.FileSystem;
import org.apache.hadoop.hdfs.MiniDFSCluster;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.ExtendWith;

/**
 * One end-to-end run with HDFS as the input and output file system: Hadoop's own minicluster (a
 * NameNode and a DataNode in this JVM, from Maven Central's hadoop-client-minicluster). The sample
 * is copied in, treated there, and compared with a run on the local file system; the staged
 * publish leaves no staging directory behind and writes the completion marker last.
 */
@ExtendWith(SharedSpark.class)
class HdfsRunIT {
  private static MiniDFSCluster hdfs;
  private static FileSystem fs;
  private static String root;

  @BeforeAll
  static void startHdfs() throws IOException {
    Path base = Path.of(System.getProperty("sluice.it.dir")).resolve("hdfs");
    Configuration conf = new Configuration();
    conf.set(MiniDFSCluster.HDFS_MINIDFS_BASEDIR, base.toAbsolutePath().toString());
    hdfs = new MiniDFSCluster.Builder(conf).numDataNodes(1).format(true).build();
    hdfs.waitActive();
    fs = hdfs.getFileSystem();
    root = "hdfs://127.0.0.1:" + hdfs.getNameNodePort();
    fs.copyFromLocalFile(new org.apache.hadoop.fs.Path(Path.of("sample-parquet").toAbsolutePath().toUri()),
        new org.apache.hadoop.fs.Path(root + "/lake/pallet_checks"));
  }

  @AfterAll
  static void stopHdfs() {
    if (hdfs != null) {
      hdfs.shutdown();
    }
  }

  @Test
  void aRunReadsAndPublishesOnHdfs(SparkSession spark) throws Exception {
    String config = Path.of("conf", "sample.conf").toAbsolutePath().toString();
    String out = root + "/clean/pallet_checks";
    Result onHdfs = run("run", "--input", root + "/lake/pallet_checks", "--output", out, "--config", config);
    assertThat(onHdfs.code()).as(onHdfs.err()).isZero();
    Path local = Path.of(System.getProperty("sluice.it.dir")).resolve("hdfs-local-out");
    Result onDisk = run("run", "--input", Path.of("sample-parquet").toAbsolutePath().toString(),
        "--output", local.toString(), "--config", config, "--replace");
    assertThat(onDisk.code()).as(onDisk.err()).isZero();

    // Published on HDFS: the outputs, the marker, and no staging left.
    List<String> names = new ArrayList<>();
    for (FileStatus s : fs.listStatus(new org.apache.hadoop.fs.Path(out))) {
      names.add(s.getPath().getName());
    }
    assertThat(names).contains("treated", "summary", "plan.json", "run.json", "_COMMITTED")
        .noneMatch(n -> n.startsWith("_staging"));
    long marker = fs.getFileStatus(new org.apache.hadoop.fs.Path(out, "_COMMITTED")).getModificationTime();
    for (FileStatus s : fs.listStatus(new org.apache.hadoop.fs.Path(out))) {
      assertThat(s.getModificationTime()).as(s.getPath().getName() + " published before the marker")
          .isLessThanOrEqualTo(marker);
    }
    ObjectMapper json = new ObjectMapper();
    JsonNode record;
    try (InputStream in = fs.open(new org.apache.hadoop.fs.Path(out, "run.json"))) {
      record = json.readTree(in);
    }
    assertThat(record.get("rows").get("reconciled").asBoolean()).isTrue();
    assertThat(record.get("rows")).isEqualTo(json.readTree(local.resolve("run.json").toFile()).get("rows"));
    JsonNode plan;
    try (InputStream in = fs.open(new org.apache.hadoop.fs.Path(out, "plan.json"))) {
      plan = json.readTree(in);
    }
    assertThat(plan).isEqualTo(json.readTree(local.resolve("plan.json").toFile()));

    // The same treated rows as on the local file system.
    Dataset<Row> a = spark.read().parquet(out + "/treated");
    Dataset<Row> b = spark.read().parquet(local.resolve("treated").toString());
    assertThat(a.count()).isEqualTo(b.count()).isPositive();
    Fixtures.assertSameRows(a, b);
    // The input was only read.
    assertThat(fs.listStatus(new org.apache.hadoop.fs.Path(root + "/lake/pallet_checks")))
        .hasSameSizeAs(new java.io.File("sample-parquet").listFiles(f -> !f.getName().startsWith(".")));
  }

  private record Result(int code, String err) {}

  private static Result run(String... args) {
    ByteArrayOutputStream err = new ByteArrayOutputStream();
    int code = Main.run(args, new PrintStream(new ByteArrayOutputStream(), true, StandardCharsets.UTF_8),
        new PrintStream(err, true, StandardCharsets.UTF_8));
    return new Result(code, err.toString(StandardCharsets.UTF_8));
  }
}
