package aislecast.jobs.cli;

import picocli.CommandLine;
import picocli.CommandLine.Command;

/** Entry point of the {@code aislecast} command line. */
@Command(
    name = "aislecast",
    mixinStandardHelpOptions = true,
    version = "aislecast 0.1.0",
    description = "Store-level demand estimation and what-if scenarios from store-week sales.",
    subcommands = {GenerateCommand.class, CommandLine.HelpCommand.class})
public final class Main implements Runnable {

  @Override
  public void run() {
    new CommandLine(this).usage(System.out);
  }

  public static void main(String[] args) {
    System.exit(new CommandLine(new Main()).execute(args));
  }
}
