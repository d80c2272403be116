package dev.sluice;

/**
 * A failure the user can act on, with the exit code it maps to. Its message is one line that
 * names the key, column or path at fault.
 */
public class SluiceException extends RuntimeException {
  private static final long serialVersionUID = 1L;

  /** Exit codes of the command line. */
  public enum Kind {
    /** Bad command-line usage or configuration: exit 2. */
    USAGE(2),
    /** Missing or unreadable input: exit 3. */
    INPUT(3),
    /** The data passed a gate limit: exit 4 (the outputs are published, the treated ones held back by default). */
    GATES(4),
    /** A check inside the job failed: exit 1. */
    INTERNAL(1);

    public final int exitCode;

    Kind(int exitCode) {
      this.exitCode = exitCode;
    }
  }

  private final Kind kind;

  public SluiceException(Kind kind, String message) {
    super(message);
    this.kind = kind;
  }

  public SluiceException(Kind kind, String message, Throwable cause) {
    super(message, cause);
    this.kind = kind;
  }

  public static SluiceException usage(String message) {
    return new SluiceException(Kind.USAGE, message);
  }

  public static SluiceException input(String message) {
    return new SluiceException(Kind.INPUT, message);
  }

  public static SluiceException input(String message, Throwable cause) {
    return new SluiceException(Kind.INPUT, message, cause);
  }

  public Kind kind() {
    return kind;
  }
}
