package aislecast.jobs.config;

/**
 * A failure the user can act on, carrying the process exit code it maps to. The command line
 * prints only its message (no stack trace); see {@code aislecast.jobs.cli.ExitCodeMapper}.
 *
 * <p>Exit codes: {@link #BAD_INPUT} (2) for bad input or configuration, {@link #NOT_CONVERGED} (3)
 * for convergence limits not met, {@link #OTHER} (1) for anything else.
 */
public class RunFailure extends RuntimeException {
  public static final int OTHER = 1;
  public static final int BAD_INPUT = 2;
  public static final int NOT_CONVERGED = 3;

  private static final long serialVersionUID = 1L;
  private final int exitCode;

  public RunFailure(int exitCode, String message) {
    super(message);
    this.exitCode = exitCode;
  }

  public RunFailure(int exitCode, String message, Throwable cause) {
    super(message, cause);
    this.exitCode = exitCode;
  }

  public int exitCode() {
    return exitCode;
  }
}
