package aislecast.jobs.cli;

import aislecast.jobs.config.RunConfig;
import aislecast.jobs.config.RunConfigLoader;
import aislecast.jobs.scenario.ScenarioFile;
import aislecast.jobs.scenario.ScenariosJob;
import aislecast.jobs.spark.SparkSessions;
import java.nio.file.Path;
import java.util.List;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;

/** {@code aislecast scenarios}: what-if price and assortment scenarios for every store. */
@Command(
    name = "scenarios",
    mixinStandardHelpOptions = true,
    description = {
      "Evaluate the scenarios of the given files for every store and posterior draw: base"
          + " period from the input, mean utilities by inverting the base shares at each draw,"
          + " marginal costs from the Bertrand first-order conditions, competitors holding"
          + " prices (hold) or re-setting them to a Bertrand-Nash equilibrium (nash).",
      "Writes <output>/<run id>/ whole or not at all: scenarios/product_detail,"
          + " scenarios/store_totals, scenarios/store_summary, scenarios/region_summary,"
          + " scenarios/store_checks (partitioned by scenario), elasticities/, validation/,"
          + " run.json. Scenario file format: the header of conf/scenarios/best-seller-cut.yaml."
    },
    exitCodeListHeading = "Exit codes:%n",
    exitCodeList = {
      "0:done (or the same run existed already: nothing to do)",
      "1:unexpected failure",
      "2:bad input, scenario file, posterior or option; or the run id exists with other"
          + " inputs (see --replace)"
    })
public final class ScenariosCommand extends JobCommand {

  @Option(names = "--posterior", paramLabel = "RUNDIR", required = true,
      description = "Run folder of a finished 'aislecast estimate' (posterior/store_draws,"
          + " run.json).")
  String posterior;

  @Option(names = "--scenario", paramLabel = "FILE", required = true,
      description = "Scenario file (YAML) or a folder of them; repeatable.")
  List<Path> scenarios;

  @Option(names = "--draws", paramLabel = "N",
      description = "Posterior draws to use, evenly spaced (overrides settings.draws; 0 = all).")
  Integer draws;

  @Option(names = "--skip-elasticities",
      description = "Do not write elasticities/ (saves one pass over the base period).")
  boolean skipElasticities;

  @Override
  protected int execute() {
    if (common.input() == null) {
      throw usageError("missing required option --input=DIR");
    }
    RunConfig config = RunConfigLoader.load(common.conf());
    ScenarioFile.Resolved files = ScenarioFile.load(scenarios);
    if (draws != null) {
      if (draws < 0) {
        throw usageError("--draws must be >= 0");
      }
      files = new ScenarioFile.Resolved(files.baseWeeks(), draws, files.portfolio(),
          files.scenarios(), files.sources());
    }
    ScenariosJob.Options o = new ScenariosJob.Options(common.input(), common.output(),
        common.runId(), posterior, files, !skipElasticities, common.replace());
    try (SparkSessions.Handle spark = SparkSessions.open(common.master(), "aislecast scenarios")) {
      ScenariosJob.run(spark.spark(), config, o, log("scenarios"));
    }
    return ExitCodeMapper.OK;
  }
}
