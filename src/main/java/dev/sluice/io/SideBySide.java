package dev.sluice.io;

import java.io.UncheckedIOException;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.ExecutionException;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
import java.util.function.Function;

/**
 * Reads on the driver that each wait on a file (on an object store, on the network), run side by
 * side on daemon threads of their own, results in the order of their inputs.
 */
final class SideBySide {
  private SideBySide() {}

  /**
   * {@code read} of each item, on at most {@code threads} threads named {@code name} (one item is
   * read on the caller's thread). A read's {@link UncheckedIOException} is thrown as it is; any
   * other failure as an {@link IllegalStateException} saying {@code failure}.
   */
  static <T, R> List<R> map(List<T> items, int threads, String name, String failure, Function<T, R> read) {
    if (items.size() <= 1) {
      return items.stream().map(read).toList();
    }
    ExecutorService pool = Executors.newFixedThreadPool(Math.min(threads, items.size()), r -> {
      Thread t = new Thread(r, name);
      t.setDaemon(true);
      return t;
    });
    try {
      List<Future<R>> started = new ArrayList<>();
      for (T item : items) {
        started.add(pool.submit(() -> read.apply(item)));
      }
      List<R> out = new ArrayList<>();
      for (Future<R> f : started) {
        out.add(f.get());
      }
      return out;
    } catch (ExecutionException e) {
      if (e.getCause() instanceof UncheckedIOException u) {
        throw u;
      }
      throw new IllegalStateException(failure, e.getCause());
    } catch (InterruptedException e) {
      Thread.currentThread().interrupt();
      throw new IllegalStateException("Interrupted: " + failure, e);
    } finally {
      pool.shutdownNow();
    }
  }
}
