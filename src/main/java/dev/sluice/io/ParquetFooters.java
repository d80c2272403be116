package dev.sluice.io;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.util.ArrayList;
import java.util.List;
import org.apache.hadoop.conf.Configuration;
import org.apache.hadoop.fs.FileSystem;
import org.apache.hadoop.fs.LocatedFileStatus;
import org.apache.hadoop.fs.Path;
import org.apache.hadoop.fs.RemoteIterator;
import org.apache.parquet.hadoop.ParquetFileReader;
import org.apache.parquet.hadoop.util.HadoopInputFile;

/**
 * Row counts of a written Parquet directory, read from its files' footers by the driver: no Spark
 * job, which would cost a listing job and a counting job with a shuffle for what a few footer
 * reads give. The files are those a Spark write leaves: {@code *.parquet} files, in partition
 * directories or not; names starting with {@code _} or {@code .} (markers, staging) are skipped.
 */
public final class ParquetFooters {
  private ParquetFooters() {}

  /** The rows in every Parquet file under {@code dir}; 0 when it does not exist or holds none. */
  public static long rows(Configuration conf, String dir) {
    Path given = new Path(dir);
    try {
      FileSystem fs = given.getFileSystem(conf);
      Path root = fs.makeQualified(given);
      if (!fs.exists(root)) {
        return 0;
      }
      List<LocatedFileStatus> files = new ArrayList<>();
      RemoteIterator<LocatedFileStatus> it = fs.listFiles(root, true);
      while (it.hasNext()) {
        LocatedFileStatus f = it.next();
        if (f.getPath().getName().endsWith(".parquet") && !hidden(root, f.getPath())) {
          files.add(f);
        }
      }
      // Footers read side by side: on an object store each read waits on the network.
      return files.parallelStream().mapToLong(f -> rowsOf(conf, f)).sum();
    } catch (IOException e) {
      throw new UncheckedIOException("Cannot list the Parquet files under " + dir, e);
    }
  }

  private static long rowsOf(Configuration conf, LocatedFileStatus f) {
    try (ParquetFileReader r = ParquetFileReader.open(HadoopInputFile.fromStatus(f, conf))) {
      return r.getRecordCount();
    } catch (IOException e) {
      throw new UncheckedIOException("Cannot read the footer of " + f.getPath(), e);
    }
  }

  /**
   * Whether the file, or a directory between it and the (qualified) root, is hidden (_ or .
   * first); the root's own parents do not count (outputs are staged under {@code _staging}).
   */
  private static boolean hidden(Path root, Path file) {
    for (Path p = file; p != null && !p.equals(root); p = p.getParent()) {
      String name = p.getName();
      if (name.startsWith("_") || name.startsWith(".")) {
        return true;
      }
    }
    return false;
  }
}
