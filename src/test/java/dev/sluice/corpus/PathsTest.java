package dev.sluice.corpus;

import static dev.sluice.corpus.Corpus.assertReconciled;
import static dev.sluice.corpus.Corpus.assertRefused;
import static dev.sluice.corpus.Corpus.assertRefusedAtOnce;
import static dev.sluice.corpus.Corpus.assertRefusedWith;
import static dev.sluice.corpus.Corpus.palletChecks;
import static dev.sluice.corpus.Corpus.run;
import static org.assertj.core.api.Assertions.assertThat;

import dev.sluice.testing.SharedSpark;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.attribute.PosixFilePermissions;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.Assumptions;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.extension.ExtendWith;
import org.junit.jupiter.api.io.TempDir;

/**
 * Bad input and output paths: every one is refused with its exit code and a one-line message that
 * names the path, and nothing is published. Exit 3 for input that cannot be found or read (and
 * for an output directory that cannot be created), 2 for a choice of paths the job refuses.
 */
@ExtendWith(SharedSpark.class)
class PathsTest {
  @TempDir Path tmp;

  @Test
  void inputPathThatDoesNotExistIsNamed() {
    Path missing = tmp.resolve("depot-7").resolve("checks-2026-03.csv");
    Path out = tmp.resolve("out");
    Corpus.Result r = run("run", missing, out);
    assertRefusedAtOnce(r, 3, "Input path " + missing + " does not exist", out);
    assertThat(out).as("no output directory is made for a missing input").doesNotExist();
  }

  @Test
  void inputOnAFilesystemWithoutADriverIsNamed() {
    Path out = tmp.resolve("out");
    Corpus.Result r = run("run", "--input", "coldvault://depot-7/checks", "--output", out.toString());
    assertRefusedAtOnce(r, 3, "Cannot open input path coldvault://depot-7/checks: No FileSystem for"
        + " scheme \"coldvault\"", out);
  }

  @Test
  void emptyDirectoryIsNotATable() throws Exception {
    Path empty = Files.createDirectories(tmp.resolve("checks-empty"));
    Path out = tmp.resolve("out");
    String message = assertRefusedWith(run("run", empty, out), 3,
        "Cannot read " + empty + " as parquet: ", out);
    assertThat(message).contains("UNABLE_TO_INFER_SCHEMA");
  }

  @Test
  void zeroByteFileNamedParquetIsNamed() throws Exception {
    Path file = Files.write(tmp.resolve("checks.parquet"), new byte[0]);
    Path out = tmp.resolve("out");
    String message = assertRefusedWith(run("run", file, out), 3,
        "Cannot read " + file + " as parquet: ", out);
    assertThat(message).contains(file.toString());
  }

  @Test
  void directoryOfGarbageBytesNamedParquetIsNamed() throws Exception {
    // Unreadable even for root: the part file holds bytes that are no Parquet footer.
    Path dir = Files.createDirectories(tmp.resolve("checks"));
    Files.write(dir.resolve("part-00000.parquet"), "door log, not a table\n".getBytes());
    Path out = tmp.resolve("out");
    String message = assertRefusedWith(run("run", dir, out), 3,
        "Cannot read " + dir + " as parquet: ", out);
    assertThat(message).as("the bad part file is named too").contains("part-00000.parquet");
  }

  @Test
  void partFileThatIsADanglingLinkIsRefused() throws Exception {
    // Another input that root cannot read either: the only part file points nowhere.
    Path dir = Files.createDirectories(tmp.resolve("checks"));
    Files.createSymbolicLink(dir.resolve("part-00000.parquet"), tmp.resolve("moved-away.parquet"));
    Path out = tmp.resolve("out");
    assertRefusedWith(run("run", dir, out), 3, "Cannot read " + dir + " as parquet: ", out);
  }

  @Test
  void partFileWithoutReadPermissionIsRefused(SparkSession spark) throws Exception {
    Path dir = palletChecks(spark, tmp.resolve("checks"), 12);
    Path part;
    try (var files = Files.list(dir)) {
      part = files.filter(f -> f.getFileName().toString().endsWith(".parquet")).findFirst().orElseThrow();
    }
    Files.setPosixFilePermissions(part, PosixFilePermissions.fromString("---------"));
    try {
      Assumptions.assumeFalse(Files.isReadable(part),
          "this user reads a file of mode 000 (root): see the garbage-bytes and dangling-link cases");
      Path out = tmp.resolve("out");
      assertRefusedWith(run("run", dir, out), 3, "Cannot read " + dir + " as parquet: ", out);
    } finally {
      Files.setPosixFilePermissions(part, PosixFilePermissions.fromString("rw-r--r--"));
    }
  }

  @Test
  void outputEqualToTheInputWrittenWithATrailingSlashIsRefused(SparkSession spark) {
    Path in = palletChecks(spark, tmp.resolve("checks"), 12);
    Corpus.Result r = run("run", "--input", in + "/", "--output", in.toString());
    assertRefused(r, 2, "Output " + in + " overlaps input " + in + "/; choose an output directory"
        + " outside the input", null);
    assertThat(in.resolve("_staging")).as("nothing written into the input").doesNotExist();
  }

  @Test
  void outputInsideTheInputThroughDotSegmentsIsRefused(SparkSession spark) {
    Path in = palletChecks(spark, tmp.resolve("checks"), 12);
    String out = in + "/./reports/../treated-here";
    Corpus.Result r = run("run", "--input", in.toString(), "--output", out);
    assertRefused(r, 2, "Output " + out + " overlaps input " + in + "; choose an output directory"
        + " outside the input", null);
    assertThat(in.resolve("treated-here")).doesNotExist();
  }

  @Test
  void inputInsideTheOutputIsRefused(SparkSession spark) {
    Path in = palletChecks(spark, tmp.resolve("warehouse").resolve("checks"), 12);
    Path out = tmp.resolve("warehouse");
    Corpus.Result r = run("run", in, out);
    assertRefused(r, 2, "Output " + out + " overlaps input " + in + "; choose an output directory"
        + " outside the input", out);
    assertThat(out.resolve("_staging")).doesNotExist();
  }

  @Test
  void outputIsARegularFileEvenWithReplace(SparkSession spark) throws Exception {
    Path in = palletChecks(spark, tmp.resolve("checks"), 12);
    Path file = Corpus.text(tmp.resolve("report"), "last week's notes\n");
    Corpus.Result r = run("survey", in, file, "--replace");
    assertRefused(r, 2, "Output " + file + " is a file, not a directory", null);
    assertThat(Files.readString(file)).as("--replace does not overwrite a file").isEqualTo("last week's notes\n");
  }

  @Test
  void outputBelowARegularFileIsNamed(SparkSession spark) {
    // A file where a directory is expected, one level up: bad usage (exit 2), like an output path
    // that is itself a file.
    Path in = palletChecks(spark, tmp.resolve("checks"), 12);
    Path file = Corpus.text(tmp.resolve("notes.txt"), "x\n");
    Path out = file.resolve("out");
    Corpus.Result r = run("run", in, out);
    assertRefused(r, 2, "Output " + out + " lies under " + file + ", which is a file, not a directory", null);
  }

  @Test
  void foreignOutputIsRefusedThenAcceptedWithReplaceAndKeptIntact(SparkSession spark) throws Exception {
    Path in = palletChecks(spark, tmp.resolve("checks"), 15);
    Path out = Files.createDirectories(tmp.resolve("shared-drive"));
    Path archive = Files.createDirectories(out.resolve("archive-2025"));
    Corpus.text(archive.resolve("depot-7.txt"), "do not delete\n");
    Corpus.Result refused = run("run", in, out);
    assertRefused(refused, 2, "Output " + out + " is not empty and was not written by Sluice (it"
        + " holds archive-2025); choose an empty directory or pass --replace", out);
    assertThat(out.resolve("treated")).doesNotExist();

    Corpus.Result r = run("run", in, out, "--replace");
    assertReconciled(spark, r, out, 15);
    assertThat(Files.readString(archive.resolve("depot-7.txt"))).isEqualTo("do not delete\n");
  }

  @Test
  void missingConfigFileIsRefusedBeforeAnythingIsWritten(SparkSession spark) {
    Path in = palletChecks(spark, tmp.resolve("checks"), 12);
    Path conf = tmp.resolve("conf").resolve("cold-room.conf");
    Path out = tmp.resolve("out");
    Corpus.Result r = run("run", in, out, "--config", conf.toString());
    assertRefusedAtOnce(r, 2, "Cannot read config file " + conf + ": no such file", out);
    assertThat(out).doesNotExist();
  }
}
