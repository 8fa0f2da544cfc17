package aislecast.jobs.cli;

import aislecast.jobs.config.RunFailure;
import java.io.PrintWriter;
import picocli.CommandLine;
import picocli.CommandLine.IExecutionExceptionHandler;
import picocli.CommandLine.IExitCodeExceptionMapper;
import picocli.CommandLine.ParameterException;
import picocli.CommandLine.ParseResult;

/**
 * The one place errors become exit codes and messages: 0 ok, 2 bad input or configuration
 * ({@link RunFailure} with code 2, or a command-line usage error), 3 convergence limits not met,
 * 1 anything else. Failures the user can fix print one line; only unexpected ones (exit 1) print
 * a stack trace, because they are bugs or environment trouble worth reporting.
 */
public final class ExitCodeMapper implements IExecutionExceptionHandler, IExitCodeExceptionMapper {

  public static final int OK = 0;

  @Override
  public int getExitCode(Throwable t) {
    RunFailure f = runFailure(t);
    if (f != null) {
      return f.exitCode();
    }
    return t instanceof ParameterException ? RunFailure.BAD_INPUT : RunFailure.OTHER;
  }

  @Override
  public int handleExecutionException(Exception ex, CommandLine cmd, ParseResult parseResult) {
    return report(ex, cmd, cmd.getErr());
  }

  /** Prints {@code t} for the user and returns its exit code. */
  public static int report(Throwable t, CommandLine cmd, PrintWriter err) {
    String who = "aislecast " + cmd.getCommandName();
    RunFailure f = runFailure(t);
    int code;
    if (f != null) {
      err.println(who + ": " + f.getMessage());
      code = f.exitCode();
    } else if (t instanceof ParameterException pe) {
      err.println(who + ": " + pe.getMessage());
      err.println("Run '" + cmd.getCommandSpec().qualifiedName() + " --help' for the options.");
      code = RunFailure.BAD_INPUT;
    } else {
      err.println(who + ": failed unexpectedly: " + t);
      t.printStackTrace(err);
      code = RunFailure.OTHER;
    }
    err.flush();
    return code;
  }

  /** The RunFailure in {@code t}'s cause chain (Spark wraps errors thrown inside tasks). */
  static RunFailure runFailure(Throwable t) {
    for (Throwable c = t; c != null; c = c.getCause()) {
      if (c instanceof RunFailure f) {
        return f;
      }
      if (c.getCause() == c) {
        break;
      }
    }
    return null;
  }
}
