package aislecast.jobs.cli;

import aislecast.jobs.report.ReportJob;
import aislecast.jobs.spark.SparkSessions;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.Callable;
import picocli.CommandLine.Command;
import picocli.CommandLine.Model.CommandSpec;
import picocli.CommandLine.Option;
import picocli.CommandLine.Spec;

/**
 * {@code aislecast report}: one self-contained HTML page about a run. It reads a published run
 * rather than starting one, so it takes none of the run options (--input, --conf, --seed,
 * --run-id) and its --output names the report file.
 */
@Command(
    name = "report",
    mixinStandardHelpOptions = true,
    description = {
      "Write a self-contained HTML report of a run (inline style, charts embedded, opens with"
          + " no network): run facts, convergence table, posterior densities and traces of key"
          + " parameters, per-store revenue change bands per scenario, an elasticity heat map"
          + " for one store, the recommended prices, and the cautions.",
      "Tables come from --run, any --with-run folders, and the estimation run that a scenarios"
          + " or recommend run names in its run.json; a table found nowhere is named in a note on"
          + " the page. Writes <run>/report/index.html (or --output), whole or not at all."
    },
    exitCodeListHeading = "Exit codes:%n",
    exitCodeList = {"0:written", "1:unexpected failure", "2:bad run folder or option"})
public final class ReportCommand implements Callable<Integer> {

  @Spec CommandSpec spec;

  @Option(names = "--run", paramLabel = "RUNDIR", required = true,
      description = "Run folder to report on (estimate, scenarios or recommend).")
  String run;

  @Option(names = "--with-run", paramLabel = "RUNDIR",
      description = "Another run folder whose tables join the report, e.g. the recommend run"
          + " beside a scenarios run (repeatable).")
  List<String> withRuns = new ArrayList<>();

  @Option(names = "--store", paramLabel = "STORE_ID",
      description = "Store of the elasticity heat map (default: the first store by id).")
  String store;

  @Option(names = "--output", paramLabel = "FILE",
      description = "Write the report to FILE instead of <run>/report/index.html.")
  String output;

  @Option(names = "--master", paramLabel = "URL",
      description = "Spark master that reads the tables (default: local[*], or the one"
          + " spark-submit sets).")
  String master;

  @Override
  public Integer call() {
    try (SparkSessions.Handle spark = SparkSessions.open(master, "aislecast report")) {
      ReportJob.run(spark.spark(), new ReportJob.Options(run, withRuns, store, output),
          spec.commandLine().getOut());
      return ExitCodeMapper.OK;
    } catch (Exception e) {
      return ExitCodeMapper.report(e, spec.commandLine(), spec.commandLine().getErr());
    }
  }
}
