package aislecast.jobs.cli;

import aislecast.jobs.io.RunLog;
import java.io.PrintWriter;
import java.util.concurrent.Callable;
import picocli.CommandLine;
import picocli.CommandLine.Mixin;
import picocli.CommandLine.Model.CommandSpec;
import picocli.CommandLine.Spec;

/**
 * Base of the job subcommands: common options, and errors routed through
 * {@link ExitCodeMapper} even when the command line was built without it (tests build
 * {@code new CommandLine(new Main())} directly).
 */
abstract class JobCommand implements Callable<Integer> {

  @Spec CommandSpec spec;

  @Mixin CommonOptions common;

  @Override
  public final Integer call() {
    try {
      return execute();
    } catch (Exception e) {
      return ExitCodeMapper.report(e, spec.commandLine(), err());
    }
  }

  /** Runs the job; returns the exit code, or throws to have the mapper choose it. */
  protected abstract int execute() throws Exception;

  protected PrintWriter out() {
    return spec.commandLine().getOut();
  }

  protected PrintWriter err() {
    return spec.commandLine().getErr();
  }

  /** The job's log on standard output, in the --log-format form. */
  protected RunLog log(String job) {
    return RunLog.create(job, common.logFormat(), out());
  }

  protected CommandLine.ParameterException usageError(String message) {
    return new CommandLine.ParameterException(spec.commandLine(), message);
  }
}
