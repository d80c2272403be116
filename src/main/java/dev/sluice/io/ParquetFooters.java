package dev.sluice.io;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.util.ArrayList;
import java.util.List;
import java.util.Optional;
import org.apache.hadoop.conf.Configuration;
import org.apache.hadoop.fs.FileSystem;
import org.apache.hadoop.fs.FileStatus;
import org.apache.hadoop.fs.Path;
import org.apache.parquet.hadoop.ParquetFileReader;
import org.apache.parquet.hadoop.metadata.BlockMetaData;
import org.apache.parquet.hadoop.metadata.ParquetMetadata;
import org.apache.parquet.hadoop.util.HadoopInputFile;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.catalyst.plans.logical.LogicalPlan;
import org.apache.spark.sql.catalyst.plans.logical.Project;
import org.apache.spark.sql.execution.datasources.HadoopFsRelation;
import org.apache.spark.sql.execution.datasources.LogicalRelation;
import org.apache.spark.sql.execution.datasources.parquet.ParquetFileFormat;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * Row counts read from Parquet files' footers by the driver: no Spark job, which would cost a
 * counting job with a shuffle (and, for a written directory, a listing job) for what a few footer
 * reads give.
 */
public final class ParquetFooters {
  private static final Logger LOG = LoggerFactory.getLogger(ParquetFooters.class);

  /**
   * Most files {@link #read} reads the footers of; a table of more is counted by Spark, whose
   * tasks spread the reads over the executors.
   */
  static final int MOST_FILES = 256;

  /** Footers read at once: on an object store each read waits on the network. */
  private static final int READERS = 16;

  private ParquetFooters() {}

  /**
   * A plain Parquet read's files (sorted by path) and their footers.
   *
   * @param hadoop the Hadoop configuration Spark reads the files with
   * @param asStored whether the read's columns are the files' own, not renamed or computed
   */
  public record Files(List<Path> paths, List<ParquetMetadata> footers, Configuration hadoop,
      boolean asStored) {
    /** The rows in all the files. */
    public long rows() {
      return footers.stream().mapToLong(ParquetFooters::rowsOf).sum();
    }
  }

  /**
   * The files and footers of {@code data} when it is a plain read of Parquet files (columns
   * selected, nothing filtered, joined or limited) of at most {@link #MOST_FILES} files, and Spark
   * is not set to skip corrupt or missing files; otherwise, or when a footer cannot be read, empty.
   */
  public static Optional<Files> read(Dataset<Row> data) {
    LogicalPlan plan = data.queryExecution().optimizedPlan();
    boolean asStored = true;
    while (plan instanceof Project p) {
      asStored &= scala.jdk.javaapi.CollectionConverters.asJava(p.projectList()).stream()
          .allMatch(e -> e instanceof org.apache.spark.sql.catalyst.expressions.AttributeReference);
      plan = p.child();
    }
    if (!(plan instanceof LogicalRelation r) || !(r.relation() instanceof HadoopFsRelation fs)
        || !(fs.fileFormat() instanceof ParquetFileFormat)) {
      return Optional.empty();
    }
    var conf = data.sparkSession().sessionState().conf();
    boolean skips = scala.jdk.javaapi.CollectionConverters.asJava(fs.options()).keySet().stream()
        .anyMatch(k -> k.equalsIgnoreCase("ignoreCorruptFiles") || k.equalsIgnoreCase("ignoreMissingFiles"));
    if (skips || conf.ignoreCorruptFiles() || conf.ignoreMissingFiles()) {
      return Optional.empty();
    }
    String[] names = data.inputFiles();
    if (names.length > MOST_FILES) {
      return Optional.empty();
    }
    Configuration hadoop = data.sparkSession().sessionState().newHadoopConfWithOptions(fs.options());
    try {
      List<Path> paths = new ArrayList<>();
      for (String f : names) {
        paths.add(new Path(new java.net.URI(f)));
      }
      paths.sort(null);
      List<Footer> footers = new ArrayList<>();
      for (Path path : paths) {
        footers.add(() -> HadoopInputFile.fromPath(path, hadoop));
      }
      Files files = new Files(List.copyOf(paths), readEach(footers, m -> m), hadoop, asStored);
      LOG.info("Counted {} rows from the footers of {} Parquet file(s)", files.rows(), paths.size());
      return Optional.of(files);
    } catch (RuntimeException | java.net.URISyntaxException e) {
      // Only a shortcut: Spark counts the rows instead, and reports a file it cannot read itself.
      LOG.info("Cannot count the rows from the Parquet footers ({}); Spark counts them", e.getMessage());
      return Optional.empty();
    }
  }

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
      List<Footer> footers = new ArrayList<>();
      for (FileStatus f : files) {
        footers.add(() -> HadoopInputFile.fromStatus(f, conf));
      }
      // Each footer counted as it is read: a written table may have many more files than a read.
      return readEach(footers, ParquetFooters::rowsOf).stream().mapToLong(Long::longValue).sum();
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

  /** A Parquet file to open (on an object store, finding it is a network call too). */
  private interface Footer {
    HadoopInputFile open() throws IOException;
  }

  /** {@code what} of each footer of {@code files}, in their order, the footers read side by side. */
  private static <T> List<T> readEach(List<Footer> files, java.util.function.Function<ParquetMetadata, T> what) {
    return SideBySide.map(files, READERS, "sluice-footers", "Cannot read a Parquet footer",
        f -> what.apply(footerOf(f)));
  }

  private static long rowsOf(ParquetMetadata footer) {
    return footer.getBlocks().stream().mapToLong(BlockMetaData::getRowCount).sum();
  }

  private static ParquetMetadata footerOf(Footer f) {
    HadoopInputFile file = null;
    try {
      file = f.open();
      try (ParquetFileReader r = ParquetFileReader.open(file)) {
        return r.getFooter();
      }
    } catch (IOException e) {
      String which = file == null ? "a file" : file.getPath().toString();
      throw new UncheckedIOException("Cannot read the footer of " + which, e);
    }
  }
}
