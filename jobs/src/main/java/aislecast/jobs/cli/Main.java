package aislecast.jobs.cli;

import java.util.concurrent.Callable;
import picocli.CommandLine;
import picocli.CommandLine.Command;
import picocli.CommandLine.Model.CommandSpec;
import picocli.CommandLine.Spec;

/** Entry point of the {@code aislecast} command line. */
@Command(
    name = "aislecast",
    mixinStandardHelpOptions = true,
    version = "aislecast 0.1.0",
    description = "Store-level demand estimation and what-if scenarios from store-week sales.",
    subcommands = {
      ValidateCommand.class,
      EstimateCommand.class,
      GenerateCommand.class,
      ScenariosCommand.class,
      RecommendCommand.class,
      ReportCommand.class,
      DemoCommand.class,
      EstimateBenchCommand.class,
      CommandLine.HelpCommand.class
    })
public final class Main implements Callable<Integer> {

  @Spec CommandSpec spec;

  /** Without a subcommand: usage on stderr and exit 2 (a usage error). */
  @Override
  public Integer call() {
    spec.commandLine().usage(spec.commandLine().getErr());
    return 2;
  }

  /** The command line with the project's error handling installed. */
  public static CommandLine commandLine() {
    ExitCodeMapper mapper = new ExitCodeMapper();
    return new CommandLine(new Main())
        .setExecutionExceptionHandler(mapper)
        .setExitCodeExceptionMapper(mapper);
  }

  public static void main(String[] args) {
    System.exit(commandLine().execute(args));
  }
}
