package dev.sluice.cli;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.PrintStream;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;

/** Runs the command line in-process and reads its JSON outputs back, for end-to-end tests. */
final class Runs {
  private Runs() {}

  record Result(int code, String out, String err) {
    String lastErrLine() {
      String[] lines = err.strip().split("\\R");
      return lines[lines.length - 1];
    }
  }

  static Result run(String... args) {
    ByteArrayOutputStream out = new ByteArrayOutputStream();
    ByteArrayOutputStream err = new ByteArrayOutputStream();
    int code = Main.run(args, new PrintStream(out, true, StandardCharsets.UTF_8),
        new PrintStream(err, true, StandardCharsets.UTF_8));
    return new Result(code, out.toString(StandardCharsets.UTF_8), err.toString(StandardCharsets.UTF_8));
  }

  static JsonNode json(Path file) {
    try {
      return new ObjectMapper().readTree(file.toFile());
    } catch (IOException e) {
      throw new UncheckedIOException(e);
    }
  }
}
