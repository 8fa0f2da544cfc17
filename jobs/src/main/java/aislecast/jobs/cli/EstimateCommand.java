package aislecast.jobs.cli;

import aislecast.jobs.config.RunConfig;
import aislecast.jobs.config.RunConfigLoader;
import aislecast.jobs.config.RunFailure;
import aislecast.jobs.estimate.EstimateJob;
import aislecast.jobs.spark.SparkSessions;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;

/** {@code aislecast estimate}: the Bayesian demand model's posterior, sampled on Spark. */
@Command(
    name = "estimate",
    mixinStandardHelpOptions = true,
    description = {
      "Validate the input, then sample the posterior of the store-level demand model"
          + " (random-coefficients logit with endogenous prices) with several chains on Spark,"
          + " one stage per sweep.",
      "Writes <output>/<run id>/ whole or not at all: posterior/global_draws,"
          + " posterior/store_draws, posterior/summary (Parquet), validation/, run.json.",
      "Sampler and prior settings: the sampler: and priors: sections of the configuration"
          + " (conf/defaults.yaml)."
    },
    exitCodeListHeading = "Exit codes:%n",
    exitCodeList = {
      "0:done, convergence limits met (or --allow-unconverged); also when the same run"
          + " (inputs, configuration, seed) existed already",
      "1:unexpected failure",
      "2:bad input or configuration; or the run id exists with other inputs, configuration"
          + " or seed (see --replace)",
      "3:R-hat or bulk ESS limits not met for some global parameter (outputs are written)"
    })
public final class EstimateCommand extends JobCommand {

  @Option(names = "--resume",
      description = "Continue the stopped run named by --run-id from its last checkpoint"
          + " (same --input, --output, --conf and --seed).")
  boolean resume;

  @Option(names = "--warm-start", paramLabel = "RUNDIR",
      description = "Start the chains from an earlier run's final state: its last globals, and"
          + " store positions where a store's weeks and products are unchanged.")
  String warmStart;

  @Option(names = "--extend", paramLabel = "RUNDIR",
      description = "Continue a finished run's chains under a new --run-id with more kept sweeps:"
          + " same --input, --seed and configuration, sampler.sampling raised to the total"
          + " wanted. Its draws are carried over; no new warmup.")
  String extend;

  @Option(names = "--allow-unconverged",
      description = "Exit 0 even when R-hat or ESS limits are not met (recorded in run.json).")
  boolean allowUnconverged;

  @Option(names = "--stop-after-sweep", paramLabel = "K", hidden = true, defaultValue = "-1",
      description = "Stop with a checkpoint once K sweeps are done (continue with --resume).")
  int stopAfterSweep;

  @Override
  protected int execute() {
    if (common.input() == null) {
      throw usageError("missing required option --input=DIR");
    }
    if (resume && common.runId == null) {
      throw usageError("--resume needs --run-id ID of the stopped run");
    }
    RunConfig config = RunConfigLoader.load(common.conf());
    EstimateJob.Options o = new EstimateJob.Options(common.input(), common.output(),
        common.runId(), common.seed(), resume, warmStart, allowUnconverged, stopAfterSweep, -1,
        common.conf() == null ? null : common.conf().toString(), common.replace(), extend);
    EstimateJob.Result r;
    try (SparkSessions.Handle spark = SparkSessions.open(common.master(), "aislecast estimate")) {
      r = EstimateJob.run(spark.spark(), config, o, log("estimate"));
    }
    if (r.status() == EstimateJob.Status.NOT_CONVERGED) {
      throw new RunFailure(RunFailure.NOT_CONVERGED, "convergence limits not met for "
          + r.failures().size() + " global parameter(s) (first: " + r.failures().get(0)
          + "); outputs are in " + r.runDir() + ". Run more sweeps: continue this run with"
          + " --extend " + r.runDir() + " --run-id <new id> and sampler.sampling raised, or"
          + " start over with more sampler.warmup and sampler.sampling; or pass"
          + " --allow-unconverged");
    }
    return ExitCodeMapper.OK;
  }
}
