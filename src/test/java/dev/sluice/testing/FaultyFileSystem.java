package dev.sluice.testing;

import java.io.IOException;
import java.net.URI;
import java.nio.file.FileAlreadyExistsException;
import java.nio.file.Files;
import java.util.Set;
import java.util.concurrent.ConcurrentHashMap;
import org.apache.hadoop.fs.FSDataOutputStream;
import org.apache.hadoop.fs.Path;
import org.apache.hadoop.fs.RawLocalFileSystem;
import org.apache.hadoop.fs.permission.FsPermission;
import org.apache.hadoop.util.Progressable;
import org.apache.spark.TaskContext;

/**
 * The local file system under the scheme {@code faulty:}, for the cluster tests: a file that a task
 * creates under a path containing {@link #MATCH} can be made slow (each task attempt waits
 * {@link #SLOW_MS} before its first such file) or fail (the first such file in the whole cluster
 * fails once, remembered by a marker file under {@link #MARKERS}). Everything else is the local
 * file system. Registered with {@code spark.hadoop.fs.faulty.impl}.
 */
public final class FaultyFileSystem extends RawLocalFileSystem {
  public static final String SCHEME = "faulty";
  /** Path fragment the faults apply to, such as {@code /treated/}. */
  public static final String MATCH = "sluice.test.fault.match";
  /** Milliseconds each task attempt waits before creating its first matching file. */
  public static final String SLOW_MS = "sluice.test.fault.slow-ms";
  /** A local directory: when set, the first matching create in a task fails once. */
  public static final String MARKERS = "sluice.test.fault.markers";

  private static final Set<Long> SLOWED = ConcurrentHashMap.newKeySet();

  @Override
  public URI getUri() {
    return URI.create(SCHEME + ":///");
  }

  @Override
  public String getScheme() {
    return SCHEME;
  }

  @Override
  public FSDataOutputStream create(Path f, boolean overwrite, int bufferSize, short replication,
      long blockSize, Progressable progress) throws IOException {
    fault(f);
    return super.create(f, overwrite, bufferSize, replication, blockSize, progress);
  }

  @Override
  public FSDataOutputStream create(Path f, FsPermission permission, boolean overwrite, int bufferSize,
      short replication, long blockSize, Progressable progress) throws IOException {
    fault(f);
    return super.create(f, permission, overwrite, bufferSize, replication, blockSize, progress);
  }

  private void fault(Path f) throws IOException {
    TaskContext task = TaskContext.get();
    String match = getConf().get(MATCH, "");
    if (task == null || match.isEmpty() || !f.toString().contains(match)) {
      return;
    }
    long slow = getConf().getLong(SLOW_MS, 0);
    if (slow > 0 && SLOWED.add(task.taskAttemptId())) {
      try {
        Thread.sleep(slow);
      } catch (InterruptedException e) {
        Thread.currentThread().interrupt();
        throw new IOException("Interrupted while slowed down", e);
      }
    }
    String markers = getConf().get(MARKERS, "");
    if (!markers.isEmpty()) {
      try {
        Files.createFile(java.nio.file.Path.of(markers, "failed-once"));
      } catch (FileAlreadyExistsException e) {
        return;
      }
      throw new IOException("Injected failure of task attempt " + task.taskAttemptId()
          + " (attempt number " + task.attemptNumber() + ") creating " + f);
    }
  }
}
