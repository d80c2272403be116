package dev.sluice.io;

import dev.sluice.SluiceException;
import java.io.IOException;
import java.io.OutputStream;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.List;
import java.util.Set;
import org.apache.hadoop.conf.Configuration;
import org.apache.hadoop.fs.FileStatus;
import org.apache.hadoop.fs.FileSystem;
import org.apache.hadoop.fs.Path;

/**
 * The output directory and its safe publication. Every output of a run is first written under
 * {@code <out>/_staging/<run id>/}; publishing then removes the completion marker, moves each
 * staged output into place (checking every rename), and writes the marker {@value #MARKER} last.
 * A run stopped at any point therefore leaves either the previous complete output with its marker,
 * or no marker at all: never a mix that looks finished.
 *
 * <p>One run at a time per output directory. Renames are atomic on HDFS and local disks; on object
 * stores they are copies, and the marker is what tells readers the output is complete.
 */
public final class OutputLayout {
  /** Written last, with the run id and the row counts; its absence means the run did not finish. */
  public static final String MARKER = "_COMMITTED";
  static final String STAGING = "_staging";
  /** Where outputs held back by a gate breach are published instead, for review. */
  public static final String HELD = "held";
  /** The entries a run of ours writes; anything else makes the directory not ours. */
  static final Set<String> OURS = Set.of(MARKER, STAGING, HELD, "treated", "quarantine", "summary",
      "summary.csv", "correlations", "correlations.csv", "plan.json", "run.json", "report.html");

  private final FileSystem fs;
  private final Path root;
  private final Path staging;

  private OutputLayout(FileSystem fs, Path root, Path staging) {
    this.fs = fs;
    this.root = root;
    this.staging = staging;
  }

  /**
   * Checks the output directory and creates this run's staging directory. A regular file at or
   * above the output path is refused; so is a non-empty directory that holds anything not written
   * by Sluice, unless {@code replace} is set.
   */
  public static OutputLayout prepare(Configuration conf, String output, String runId, boolean replace) {
    try {
      Path root = new Path(output);
      FileSystem fs = root.getFileSystem(conf);
      checkNotUnderAFile(fs, root, output);
      if (fs.exists(root)) {
        FileStatus st = fs.getFileStatus(root);
        if (!st.isDirectory()) {
          throw SluiceException.usage("Output " + output + " is a file, not a directory");
        }
        List<String> foreign = foreign(fs, root);
        if (!foreign.isEmpty() && !replace) {
          throw SluiceException.usage("Output " + output + " is not empty and was not written by"
              + " Sluice (it holds " + String.join(", ", foreign.subList(0, Math.min(5, foreign.size())))
              + "); choose an empty directory or pass --replace");
        }
      }
      Path staging = new Path(new Path(root, STAGING), runId);
      fs.delete(new Path(root, STAGING), true); // leftovers of runs that did not finish
      if (!fs.mkdirs(staging)) {
        throw SluiceException.input("Cannot create " + staging);
      }
      return new OutputLayout(fs, root, staging);
    } catch (IOException e) {
      throw SluiceException.input("Cannot prepare output " + output + ": " + e.getMessage(), e);
    }
  }

  /** The nearest existing ancestor must be a directory: a file there is a usage error too. */
  private static void checkNotUnderAFile(FileSystem fs, Path root, String output) throws IOException {
    for (Path p = root.getParent(); p != null; p = p.getParent()) {
      if (fs.exists(p)) {
        if (!fs.getFileStatus(p).isDirectory()) {
          throw SluiceException.usage("Output " + output + " lies under " + p.toUri().getPath()
              + ", which is a file, not a directory");
        }
        return;
      }
    }
  }

  private static List<String> foreign(FileSystem fs, Path root) throws IOException {
    List<String> out = new ArrayList<>();
    for (FileStatus s : fs.listStatus(root)) {
      String name = s.getPath().getName();
      if (!OURS.contains(name)) {
        out.add(name);
      }
    }
    return out;
  }

  /** Where an output named {@code name} is staged. */
  public String staged(String name) {
    return new Path(staging, name).toString();
  }

  public String root() {
    return root.toString();
  }

  /**
   * Publishes the staged outputs and writes the marker. The outputs named in {@code byPartition}
   * replace only the partition directories the run wrote (a rerun for one day leaves the other
   * days); every other staged output replaces its earlier version whole. Earlier outputs of ours
   * that this run did not write are removed, so the directory always reflects one run. The outputs
   * named in {@code held} go whole under {@value #HELD}/ instead of into place.
   */
  public void publish(Set<String> byPartition, Set<String> held, String markerJson) {
    try {
      fs.delete(new Path(root, MARKER), false);
      List<String> staged = new ArrayList<>();
      for (FileStatus s : fs.listStatus(staging)) {
        staged.add(s.getPath().getName());
      }
      List<String> placed = new ArrayList<>(staged);
      placed.removeAll(held);
      for (String name : OURS) {
        if (!name.equals(MARKER) && !name.equals(STAGING) && !placed.contains(name)
            && !byPartition.contains(name)) {
          fs.delete(new Path(root, name), true);
        }
      }
      for (String name : staged) {
        if (held.contains(name)) {
          fs.mkdirs(new Path(root, HELD));
          rename(new Path(staging, name), new Path(new Path(root, HELD), name));
        } else if (byPartition.contains(name)) {
          mergePartitions(new Path(staging, name), new Path(root, name));
        } else {
          replace(new Path(staging, name), new Path(root, name));
        }
      }
      writeMarker(markerJson);
      fs.delete(new Path(root, STAGING), true);
    } catch (IOException e) {
      throw new UncheckedIOException("Cannot publish to " + root, e);
    }
  }

  private void replace(Path from, Path to) throws IOException {
    fs.delete(to, true);
    rename(from, to);
  }

  /** Moves each partition directory (name=value, nested) of {@code from} over the one in {@code to}. */
  private void mergePartitions(Path from, Path to) throws IOException {
    if (!fs.exists(to)) {
      rename(from, to);
      return;
    }
    for (Path leaf : partitionLeaves(from)) {
      String relative = leaf.toUri().getPath().substring(from.toUri().getPath().length() + 1);
      Path target = new Path(to, relative);
      fs.delete(target, true);
      fs.mkdirs(target.getParent());
      rename(leaf, target);
    }
    // Files directly under the table (no partition column), such as _SUCCESS.
    for (FileStatus s : fs.listStatus(from)) {
      if (s.isFile()) {
        replace(s.getPath(), new Path(to, s.getPath().getName()));
      }
    }
  }

  /** The deepest name=value directories under {@code dir}: the ones that hold data files. */
  private List<Path> partitionLeaves(Path dir) throws IOException {
    List<Path> out = new ArrayList<>();
    for (FileStatus s : fs.listStatus(dir)) {
      String n = s.getPath().getName();
      if (s.isDirectory() && n.indexOf('=') > 0) {
        List<Path> deeper = partitionLeaves(s.getPath());
        if (deeper.isEmpty()) {
          out.add(s.getPath());
        } else {
          out.addAll(deeper);
        }
      }
    }
    return out;
  }

  private void rename(Path from, Path to) throws IOException {
    if (!fs.rename(from, to)) {
      throw new IOException("rename of " + from + " to " + to + " failed");
    }
  }

  private void writeMarker(String json) throws IOException {
    try (OutputStream os = fs.create(new Path(root, MARKER), true)) {
      os.write(json.getBytes(StandardCharsets.UTF_8));
    }
  }
}
