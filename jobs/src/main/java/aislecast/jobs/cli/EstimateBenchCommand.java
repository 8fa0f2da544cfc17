package aislecast.jobs.cli;

import aislecast.core.diag.ParameterSummary;
import aislecast.core.sim.DemandSimulator;
import aislecast.core.sim.SimSettings;
import aislecast.core.sim.SimWriter;
import aislecast.jobs.config.RunConfig;
import aislecast.jobs.config.RunConfigLoader;
import aislecast.jobs.config.SamplerConfig;
import aislecast.jobs.estimate.EstimateJob;
import aislecast.jobs.spark.SparkSessions;
import java.io.PrintWriter;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.concurrent.Callable;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;

/**
 * {@code aislecast estimate-bench}: a benchmark, not a test. Generates the demo scenario at 1x,
 * 2x, 4x ... a base number of stores (default the demo's 60, where 1x is the bundled
 * chilled-drinks sample: same settings and seed), runs the estimate job on each for a fixed number of sweeps and prints a table: wall time
 * of the sweeps, sweeps per second, the smallest bulk ESS over global parameters, ESS per second,
 * and where the sweep time goes (model work inside the tasks versus Spark and driver overhead).
 */
@Command(
    name = "estimate-bench",
    mixinStandardHelpOptions = true,
    description = "Benchmark the estimate job on the demo scenario at several store counts"
        + " and print a table (wall time, sweeps/s, min bulk ESS, ESS/s, model vs overhead).")
public final class EstimateBenchCommand implements Callable<Integer> {

  @Option(names = "--scales", split = ",", defaultValue = "1,2,4",
      description = "Multiples of the demo's 60 stores (default: ${DEFAULT-VALUE}).")
  List<Integer> scales;

  @Option(names = "--base-stores", defaultValue = "60",
      description = "Stores at scale 1 (default: ${DEFAULT-VALUE}, the demo's); other settings"
          + " are the demo scenario's.")
  int baseStores;

  @Option(names = "--warmup", defaultValue = "20", description = "Warmup sweeps (default: ${DEFAULT-VALUE}).")
  int warmup;

  @Option(names = "--sampling", defaultValue = "20", description = "Kept sweeps (default: ${DEFAULT-VALUE}).")
  int sampling;

  @Option(names = "--chains", defaultValue = "4", description = "Chains (default: ${DEFAULT-VALUE}).")
  int chains;

  @Option(names = "--local-steps", description = "Local transitions per store, chain and sweep"
      + " (default: the run configuration's default).")
  Integer localSteps;

  @Option(names = "--leapfrog-steps", description = "Leapfrog steps per local transition"
      + " (default: the run configuration's default).")
  Integer leapfrogSteps;

  @Option(names = "--master", defaultValue = "local[*]", description = "Spark master (default: ${DEFAULT-VALUE}).")
  String master;

  @Option(names = "--conf", paramLabel = "FILE",
      description = "Run configuration whose priors: and sampler: settings the runs use (as for"
          + " estimate); this command's --warmup, --sampling, --chains, --local-steps and"
          + " --leapfrog-steps replace the file's, and every run does all its sweeps"
          + " (sampler.stop_when_converged off, thin 1). Default: the built-in defaults.")
  Path conf;

  @Option(names = "--work", paramLabel = "DIR",
      description = "Folder for generated data and runs (default: a new temporary folder).")
  Path work;

  @Override
  public Integer call() throws Exception {
    PrintWriter out = new PrintWriter(System.out, true);
    Path dir = work != null ? work : Files.createTempDirectory("aislecast-bench-");
    RunConfig loaded = RunConfigLoader.load(conf);
    SamplerConfig base = loaded.sampler();
    // thin 1 and stop_when_converged off (this constructor's): every run does all its sweeps
    SamplerConfig sc = new SamplerConfig(chains, warmup, sampling,
        localSteps != null ? localSteps : base.localSteps(),
        leapfrogSteps != null ? leapfrogSteps : base.leapfrogSteps(), base.targetAccept(),
        base.shopperDraws(), base.checkpointEvery(), base.rhatMax(), base.essMin(), 1,
        base.partitions(), base.sumGroup(), base.ridgeMove(), base.fixLambdaZero(),
        base.momentumPersistence());
    RunConfig config = loaded.withSampler(sc);
    List<String> rows = new ArrayList<>();
    int cores;
    try (SparkSessions.Handle spark = SparkSessions.open(master, "aislecast estimate-bench")) {
      cores = spark.spark().sparkContext().defaultParallelism();
      for (int scale : scales) {
        SimSettings demo = SimSettings.demo();
        SimSettings s = demo.withSizes(baseStores * scale, demo.weeks(), demo.products(),
            demo.owners(), demo.attributes(), demo.draws());
        Path input = dir.resolve("data-x" + scale);
        if (!Files.exists(input)) {
          SimWriter.write(DemandSimulator.simulate(s), input, false);
        }
        String runId = "bench-x" + scale + "-" + System.currentTimeMillis();
        out.println("estimate-bench: " + s.stores() + " stores (" + scale + "x), " + chains
            + " chains, " + warmup + " + " + sampling + " sweeps, " + sc.localSteps() + " x "
            + sc.leapfrogSteps() + " local steps, master " + master
            + (conf == null ? "" : ", configuration " + conf) + " ...");
        EstimateJob.Result r = EstimateJob.run(spark.spark(), config,
            EstimateJob.Options.of(input.toString(), dir.resolve("runs").toString(), runId,
                CommonOptions.DEFAULT_SEED).withAllowUnconverged(true), out);
        double minEss = Double.POSITIVE_INFINITY;
        for (ParameterSummary p : r.summaries()) {
          if (Double.isFinite(p.essBulk())) {
            minEss = Math.min(minEss, p.essBulk());
          }
        }
        double wall = r.sweepSeconds();
        // model share: task time inside the sweep functions over the core-seconds available
        double modelShare = r.modelSeconds() / (wall * cores);
        rows.add(String.format(Locale.ROOT,
            "| %5d | %6d | %6d | %8.1f | %8.3f | %8.1f | %8.3f | %6.0f%% | %6.0f%% | %6.0f%% |",
            s.stores(), r.problem().rows(), r.sweepsDone(), wall, r.sweepsDone() / wall, minEss,
            minEss / wall, 100 * modelShare, 100 * r.driverSeconds() / wall,
            100 * (1 - modelShare - r.driverSeconds() / wall)));
      }
    }
    out.println();
    out.println("cores (Spark default parallelism): " + cores + "; sweep wall time excludes"
        + " validation, assembly and writing");
    out.println("| stores |   rows | sweeps | wall (s) | sweeps/s | min ESS  |  ESS/s   | model  | driver | Spark  |");
    out.println("|-------:|-------:|-------:|---------:|---------:|---------:|---------:|-------:|-------:|-------:|");
    rows.forEach(out::println);
    out.println("model: share of core-seconds spent inside the stores' sweep functions;"
        + " driver: conjugate draws and bookkeeping on the driver; Spark: the rest (scheduling,"
        + " (de)serialisation, aggregation, checkpoints, idle cores)");
    return 0;
  }
}
