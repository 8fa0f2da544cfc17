package aislecast.jobs.cli;

import java.util.concurrent.Callable;
import picocli.CommandLine.Command;

/** Placeholder until the generator lands; replaced by the generator work. */
@Command(name = "generate", mixinStandardHelpOptions = true,
    description = "Simulate a demo data set from the demand model (not yet implemented).")
public final class GenerateCommand implements Callable<Integer> {
  @Override
  public Integer call() {
    System.err.println("generate: not implemented yet");
    return 1;
  }
}
