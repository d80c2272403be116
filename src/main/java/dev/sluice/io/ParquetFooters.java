package dev.sluice.io;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.util.ArrayList;
import java.util.List;
import org.apache.hadoop.conf.Configuration;
import org.apache.hadoop.fs.FileSystem;
import org.apache.hadoop.fs.FileStatus;
import org.apache.hadoop.fs.Path;
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
      List<FileStatus> files = new ArrayList<>();
      collect(fs, root, files);
      // Footers read side by side: on an object store each read waits on the network.
      return files.parallelStream().mapToLong(f -> rowsOf(conf, f)).sum();
    } catch (IOException e) {
      throw new UncheckedIOException("Cannot list the Parquet files under " + dir, e);
    }
  }

  /**
   * The visible Parquet files under {@code dir}, its partition directories included. Plain
   * directory listings: a recursive {@code listFiles} asks each file for its permissions, which
   * not every file system can tell.
   */
  private static void collect(FileSystem fs, Path dir, List<FileStatus> files) throws IOException {
    for (FileStatus f : fs.listStatus(dir)) {
      String name = f.getPath().getName();
      if (name.startsWith("_") || name.startsWith(".")) {
        continue;
      }
      if (f.isDirectory()) {
        collect(fs, f.getPath(), files);
      } else if (name.endsWith(".parquet")) {
        files.add(f);
      }
    }
  }

  private static long rowsOf(Configuration conf, FileStatus f) {
    try (ParquetFileReader r = ParquetFileReader.open(HadoopInputFile.fromStatus(f, conf))) {
      return r.getRecordCount();
    } catch (IOException e) {
      throw new UncheckedIOException("Cannot read the footer of " + f.getPath(), e);
    }
  }
}
