package aislecast.jobs.cli;

import aislecast.core.scenario.Response;
import aislecast.jobs.config.RunConfig;
import aislecast.jobs.config.RunConfigLoader;
import aislecast.jobs.scenario.RecommendJob;
import aislecast.jobs.spark.SparkSessions;
import java.util.List;
import java.util.Locale;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;

/** {@code aislecast recommend}: portfolio prices per store within guard-rails. */
@Command(
    name = "recommend",
    mixinStandardHelpOptions = true,
    description = {
      "Per store, the portfolio's prices within guard-rails (at most --max-move from the"
          + " current price, never below the posterior mean marginal cost) that maximise the"
          + " posterior mean, or a quantile, of the portfolio margin change, with competitors"
          + " holding prices or re-setting them to a Bertrand-Nash equilibrium.",
      "Writes <output>/<run id>/recommendations (Parquet), validation/ and run.json, whole or"
          + " not at all."
    },
    exitCodeListHeading = "Exit codes:%n",
    exitCodeList = {
      "0:done (or the same run existed already: nothing to do)",
      "1:unexpected failure",
      "2:bad input, posterior or option; or the run id exists with other inputs (see --replace)"
    })
public final class RecommendCommand extends JobCommand {

  @Option(names = "--posterior", paramLabel = "RUNDIR", required = true,
      description = "Run folder of a finished 'aislecast estimate'.")
  String posterior;

  @Option(names = "--portfolio", paramLabel = "OWNER", required = true,
      description = "Owner whose products are priced (repeatable).")
  List<String> portfolio;

  @Option(names = "--max-move", paramLabel = "F", defaultValue = "0.10",
      description = "Largest relative price move, e.g. 0.10 for +-10% (default: ${DEFAULT-VALUE}).")
  double maxMove;

  @Option(names = "--objective", paramLabel = "mean|qNN", defaultValue = "mean",
      description = "Maximise the posterior mean margin change, or its quantile (q05 = 5%%)"
          + " (default: ${DEFAULT-VALUE}).")
  String objective;

  @Option(names = "--response", paramLabel = "nash|hold", defaultValue = "nash",
      description = "Competitors re-set prices (nash) or keep them (hold)"
          + " (default: ${DEFAULT-VALUE}).")
  String response;

  @Option(names = "--base-weeks", paramLabel = "N", defaultValue = "1",
      description = "Base period: the mean of the last N weeks (default: ${DEFAULT-VALUE}, the"
          + " latest week).")
  int baseWeeks;

  @Option(names = "--own-cost-column", paramLabel = "COLUMN",
      description = "Sales cost-shifter column holding the portfolio's own unit costs (e.g."
          + " unit_cost); its mean over the base weeks replaces the first-order-condition cost of"
          + " the portfolio's products. Default: every cost from the first-order conditions, so"
          + " current prices are (near) optimal by construction.")
  String ownCostColumn;

  @Option(names = "--draws", paramLabel = "N", defaultValue = "100",
      description = "Posterior draws to use, evenly spaced; 0 = all (default: ${DEFAULT-VALUE}).")
  int draws;

  @Override
  protected int execute() {
    if (common.input() == null) {
      throw usageError("missing required option --input=DIR");
    }
    if (!(maxMove > 0 && maxMove < 1)) {
      throw usageError("--max-move must be in (0, 1), got " + maxMove);
    }
    if (baseWeeks < 1 || draws < 0) {
      throw usageError("--base-weeks must be >= 1 and --draws >= 0");
    }
    double quantile = parseObjective(objective);
    Response r;
    try {
      r = Response.valueOf(response.toUpperCase(Locale.ROOT));
    } catch (IllegalArgumentException e) {
      throw usageError("--response must be nash or hold, got '" + response + "'");
    }
    RunConfig config = RunConfigLoader.load(common.conf());
    RecommendJob.Options o = new RecommendJob.Options(common.input(), common.output(),
        common.runId(), posterior, baseWeeks, draws, portfolio, maxMove, quantile, r,
        ownCostColumn, common.replace());
    try (SparkSessions.Handle spark = SparkSessions.open(common.master(), "aislecast recommend")) {
      RecommendJob.run(spark.spark(), config, o, log("recommend"));
    }
    return ExitCodeMapper.OK;
  }

  private double parseObjective(String s) {
    if ("mean".equals(s)) {
      return Double.NaN;
    }
    if (s.matches("q\\d\\d")) {
      int level = Integer.parseInt(s.substring(1));
      if (level >= 1 && level <= 99) {
        return level / 100.0;
      }
    }
    throw usageError("--objective must be mean or qNN with NN in 01..99 (e.g. q05), got '" + s
        + "'");
  }
}
