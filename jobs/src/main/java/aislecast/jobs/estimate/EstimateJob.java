package aislecast.jobs.estimate;

import aislecast.core.diag.Diagnostics;
import aislecast.core.diag.ParameterSummary;
import aislecast.core.estimate.FirstPass;
import aislecast.core.estimate.InitialGlobals;
import aislecast.core.estimate.PriorPull;
import aislecast.core.estimate.SamplerSettings;
import aislecast.core.estimate.StoreBlock;
import aislecast.core.globals.Dims;
import aislecast.core.globals.Globals;
import aislecast.core.globals.Priors;
import aislecast.core.model.StoreData;
import aislecast.jobs.config.RunConfig;
import aislecast.jobs.config.RunConfigLoader;
import aislecast.jobs.config.RunFailure;
import aislecast.jobs.config.SamplerConfig;
import aislecast.jobs.io.InputFingerprint;
import aislecast.jobs.io.RunDirectory;
import aislecast.jobs.io.RunIdentity;
import aislecast.jobs.io.RunLog;
import aislecast.jobs.validate.InputValidator;
import aislecast.jobs.validate.ValidatedInput;
import com.fasterxml.jackson.databind.JsonNode;
import java.io.IOException;
import java.io.PrintWriter;
import java.io.Serializable;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import org.apache.hadoop.fs.FileSystem;
import org.apache.hadoop.fs.Path;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.api.java.JavaSparkContext;
import org.apache.spark.sql.SparkSession;

/**
 * {@code aislecast estimate} as a recipe (DESIGN sections 5, 7, 8): read and validate the input,
 * build the stores' data, run the sweeps on Spark, summarise, write the run folder whole, then
 * report convergence. The numerical work is in {@code aislecast.core.estimate}.
 *
 * <p>Folders: the run appears as {@code <output>/<run id>/} only when complete (written to a
 * hidden staging folder first). While it runs, checkpoints live in {@code
 * <output>/.work-<run id>/_checkpoint/}, which {@code --resume} continues from and which is
 * removed once the run is published; the published run keeps its final state in {@code
 * _checkpoint/} for {@code --warm-start}.
 */
public final class EstimateJob {
  public static final String RUN_JSON = "run.json";
  public static final String CHECKPOINT_DIR = "_checkpoint";

  /**
   * @param stopAtSweep stop with a checkpoint once this many sweeps are done (-1: run all);
   *     continue later with {@code resume}
   * @param failAtSweep fault test only: fail the first attempt of one task in this sweep (-1)
   * @param extend a finished run folder whose chains this new run continues with more kept
   *     sweeps (its draws carried over), or null
   */
  public record Options(String input, String outputRoot, String runId, long seed, boolean resume,
      String warmStart, boolean allowUnconverged, int stopAtSweep, int failAtSweep,
      String confSource, boolean replace, String extend) {
    public Options {
      if (input == null || outputRoot == null || runId == null) {
        throw new IllegalArgumentException("input, output and run id must be set");
      }
    }

    /** Without --replace. */
    public Options(String input, String outputRoot, String runId, long seed, boolean resume,
        String warmStart, boolean allowUnconverged, int stopAtSweep, int failAtSweep,
        String confSource) {
      this(input, outputRoot, runId, seed, resume, warmStart, allowUnconverged, stopAtSweep,
          failAtSweep, confSource, false, null);
    }

    public static Options of(String input, String outputRoot, String runId, long seed) {
      return new Options(input, outputRoot, runId, seed, false, null, false, -1, -1, null, false,
          null);
    }

    public Options withResume(boolean r) {
      return new Options(input, outputRoot, runId, seed, r, warmStart, allowUnconverged,
          stopAtSweep, failAtSweep, confSource, replace, extend);
    }

    public Options withStopAtSweep(int k) {
      return new Options(input, outputRoot, runId, seed, resume, warmStart, allowUnconverged, k,
          failAtSweep, confSource, replace, extend);
    }

    public Options withFailAtSweep(int k) {
      return new Options(input, outputRoot, runId, seed, resume, warmStart, allowUnconverged,
          stopAtSweep, k, confSource, replace, extend);
    }

    public Options withWarmStart(String runDir) {
      return new Options(input, outputRoot, runId, seed, resume, runDir, allowUnconverged,
          stopAtSweep, failAtSweep, confSource, replace, extend);
    }

    public Options withAllowUnconverged(boolean a) {
      return new Options(input, outputRoot, runId, seed, resume, warmStart, a, stopAtSweep,
          failAtSweep, confSource, replace, extend);
    }

    public Options withConfSource(String s) {
      return new Options(input, outputRoot, runId, seed, resume, warmStart, allowUnconverged,
          stopAtSweep, failAtSweep, s, replace, extend);
    }

    /** Continue the published run in {@code runDir} with more kept sweeps ({@code --extend}). */
    public Options withExtend(String runDir) {
      return new Options(input, outputRoot, runId, seed, resume, warmStart, allowUnconverged,
          stopAtSweep, failAtSweep, confSource, replace, runDir);
    }

    public Options withReplace(boolean r) {
      return new Options(input, outputRoot, runId, seed, resume, warmStart, allowUnconverged,
          stopAtSweep, failAtSweep, confSource, r, extend);
    }
  }

  /** Run status as recorded in run.json. */
  public enum Status {
    CONVERGED("converged"),
    UNCONVERGED_ALLOWED("not_converged_allowed"),
    NOT_CONVERGED("not_converged"),
    STOPPED("stopped");

    public final String label;

    Status(String label) {
      this.label = label;
    }
  }

  /**
   * @param runDir the published run folder (null when stopped)
   * @param failures convergence failures, one line per parameter (empty when converged)
   * @param globalDraws kept draws, {@code [chain][draw][parameter]}
   */
  public record Result(Status status, String runDir, String[] parameterNames,
      double[][][] globalDraws, ParameterSummary[] summaries, List<String> failures,
      int sweepsDone, double sweepSeconds, double modelSeconds, double aggregateSeconds,
      double driverSeconds, EstimationProblem problem) {
    public boolean converged() {
      return failures.isEmpty();
    }
  }

  private EstimateJob() {}

  /** The sampler settings of a run configuration and seed. */
  public static SamplerSettings samplerSettings(SamplerConfig s, long seed) {
    return new SamplerSettings(s.chains(), s.warmup(), s.sampling(), s.localSteps(),
        s.leapfrogSteps(), s.targetAccept(), seed, s.fixLambdaZero(), s.ridgeMove(),
        s.momentumPersistence(), s.thin());
  }

  /**
   * Runs the whole job. Convergence failures do not throw: they are in the result (and run.json),
   * and the caller decides the exit code; bad input and configuration throw {@link RunFailure}.
   */
  public static Result run(SparkSession spark, RunConfig config, Options o, PrintWriter out) {
    return run(spark, config, o, RunLog.plain("estimate", out));
  }

  /**
   * As {@link #run(SparkSession, RunConfig, Options, PrintWriter)}, logging to {@code log}. When
   * the run folder exists with the same input files, configuration, seed (and warm-start run),
   * nothing is computed: the result carries the stored status and convergence failures only.
   */
  public static Result run(SparkSession spark, RunConfig config, Options o, RunLog log) {
    PrintWriter out = log.out();
    JavaSparkContext jsc = JavaSparkContext.fromSparkContext(spark.sparkContext());
    SamplerConfig sc = config.sampler();
    Map<String, Double> timings = new LinkedHashMap<>();
    long tStart = System.nanoTime();

    // 1. The run folder: nothing to do when this very run exists; else a staging folder.
    String workDir = new Path(new Path(o.outputRoot()), ".work-" + o.runId()).toString();
    StateCheckpoints work = new StateCheckpoints(jsc, workDir + "/" + CHECKPOINT_DIR);
    RunIdentity identity = identity(spark, config, o);
    RunDirectory run = RunDirectory.create(spark, o.outputRoot(), o.runId(), identity,
        o.replace());
    run.notes().forEach(n -> log.info("repair", "estimate: " + n));
    if (run.identicalExists()) {
      return existing(run, o, work, log);
    }
    ValidatedInput validated = null;
    SweepLoop loop = null;
    try {
      // Where the stopped state lives, and whether this call may use it.
      if (o.resume() && work.latest().isEmpty()) {
        throw new RunFailure(RunFailure.BAD_INPUT, "nothing to resume: run '" + o.runId()
            + "' has no checkpoint in " + work.location());
      }
      if (!o.resume() && work.exists()) {
        throw new RunFailure(RunFailure.BAD_INPUT, "run '" + o.runId() + "' was stopped before"
            + " and has checkpoints in " + work.location() + "; continue it with --resume, or"
            + " delete that folder to start over");
      }
      if (o.resume() && o.warmStart() != null) {
        throw new RunFailure(RunFailure.BAD_INPUT, "--resume and --warm-start exclude each"
            + " other");
      }
      if (o.extend() != null) {
        requireExtensible(spark, o);
      }

      // 2. Read and validate (rejects go to the run folder).
      long t = System.nanoTime();
      validated = InputValidator.run(spark, config, o.input(), run.staging());
      double maxShare = config.validation().maxRejectShare();
      out.println("estimate: input " + o.input() + " (run " + o.runId() + ")");
      out.print(validated.summary().format(maxShare));
      for (String note : validated.notes()) {
        out.println("  note: " + note);
      }
      if (validated.summary().rejectShare() > maxShare) {
        // publish the rejects so the user can see them, then stop with exit 2
        Manifest.writeRejected(run.staging(), spark, o, identity, validated);
        run.commit();
        validated.requireRejectShareAtMost(maxShare,
            run.target() + "/" + InputValidator.REJECTS_DIR);
      }
      timings.put("validate", secondsSince(t));

      // 3. The stores' data.
      t = System.nanoTime();
      EstimationProblem problem = ProblemBuilder.build(jsc, validated, o.seed(),
          sc.shopperDraws());
      out.println("  model: " + ProblemBuilder.describe(problem));
      for (String note : problem.notes()) {
        out.println("  note: " + note);
      }
      timings.put("assemble", secondsSince(t));

      // 4. Start, resume or warm-start the chains.
      t = System.nanoTime();
      SamplerSettings set = samplerSettings(sc, o.seed());
      Dims dims = problem.dims();
      double firstPass = Double.NaN;
      if (config.priors().priceNoiseAuto()) {
        firstPass = FirstPass.priceResidualVariance(problem.stores(), dims.products(), dims.kc());
        if (!(firstPass > 0) || !Double.isFinite(firstPass)) {
          throw new RunFailure(RunFailure.BAD_INPUT, "priors.price_noise_scale: auto could not"
              + " measure the price noise (first-pass regression of log price on products and"
              + " cost shifters gave " + firstPass + "); set a number instead");
        }
      }
      Priors priors = config.priors().toPriors(problem.kd(), problem.kx(), firstPass);
      if (config.priors().priceNoiseAuto()) {
        out.printf(Locale.ROOT, "  prior: sigma_p2 ~ Inv-Gamma(%s, %.4g), the scale from a"
            + " first-pass regression of log price on products and cost shifters"
            + " (price_noise_scale: auto)%n",
            plain(priors.sigmaP2().shape()), priors.sigmaP2().scale());
      }
      String key = runKey(problem, set, config);
      int partitions = sc.partitions() > 0 ? sc.partitions()
          : Math.max(1, Math.min(problem.stores().size(), 2 * jsc.defaultParallelism()));
      SweepLoop.Settings loopSettings = new SweepLoop.Settings(set, priors, partitions,
          sc.sumGroup(), sc.checkpointEvery(), sc.progressEvery(), o.stopAtSweep(),
          o.failAtSweep(), sc.stopWhenConverged(), sc.rhatMax(), sc.essMin());
      loop = new SweepLoop(jsc, problem, loopSettings, work, log);
      if (o.resume()) {
        Path latest = work.latest().orElseThrow();
        ChainRecord saved = work.readRecord(latest);
        if (!saved.key.equals(key)) {
          throw new RunFailure(RunFailure.BAD_INPUT, "cannot resume run '" + o.runId()
              + "': its checkpoint was written for other input data, seed or sampler/prior"
              + " settings; rerun with the same --input, --conf and --seed, or start a new run");
        }
        loop.resume(latest, saved);
        out.println("  resuming after sweep " + saved.nextSweep() + " of " + set.totalSweeps());
      } else if (o.extend() != null) {
        StateCheckpoints earlier = new StateCheckpoints(jsc, o.extend() + "/" + CHECKPOINT_DIR);
        Path last = earlier.latest().orElseThrow(() -> new RunFailure(RunFailure.BAD_INPUT,
            "--extend " + o.extend() + ": no final state in " + earlier.location()
                + " (is it a finished estimate run folder?)"));
        ChainRecord saved = earlier.readRecord(last);
        int had = saved.keptCapacity() * set.thin();
        if (saved.nextSweep() != set.warmupSweeps() + had
            || !saved.key.equals(runKey(problem, set.withSamplingSweeps(had), config))) {
          throw new RunFailure(RunFailure.BAD_INPUT, "cannot extend " + o.extend() + ": it was"
              + " made with other input data, seed, or sampler or prior settings; extend it with"
              + " the same --input, --seed and configuration, only sampler.sampling raised");
        }
        if (set.samplingSweeps() <= had) {
          throw new RunFailure(RunFailure.BAD_INPUT, "--extend " + o.extend() + ": that run made "
              + had + " sampling sweeps per chain and sampler.sampling is " + set.samplingSweeps()
              + "; set sampler.sampling to the total wanted after extending, above " + had);
        }
        loop.extend(earlier, last, saved.extendedTo(key, set.keptDraws(), o.extend()));
        out.println("  extending " + o.extend() + ": its " + had + " sampling sweeps per chain"
            + " continue to " + set.samplingSweeps());
      } else if (o.warmStart() != null) {
        WarmStart warm = WarmStart.read(jsc, o.warmStart(), problem, set.chains());
        loop.start(key, warm.globals(), warm.positions());
        out.println("  warm start from " + o.warmStart() + ": globals of its last sweep, store"
            + " positions for " + warm.positions().size() + " of " + problem.stores().size()
            + " stores (the others' data changed)");
      } else {
        loop.start(key, InitialGlobals.of(problem.stores(), dims, problem.kx(), set),
            Map.of());
      }
      timings.put("initialise", secondsSince(t));
      out.printf(Locale.ROOT, "  sampler: %d chains, %d warmup + %d kept sweeps%s, %d partitions,"
          + " checkpoint every %d sweeps%n", set.chains(), set.warmupSweeps(),
          set.samplingSweeps(), set.thin() == 1 ? ""
              : " (1 in " + set.thin() + " recorded: " + set.keptDraws() + " draws per chain)",
          partitions, sc.checkpointEvery());
      out.flush();

      // 5. The sweeps.
      t = System.nanoTime();
      boolean finished = loop.run();
      timings.put("sweeps", secondsSince(t));
      ChainRecord rec = loop.record();
      if (!finished) {
        run.abort();
        out.println("estimate: stopped after sweep " + rec.nextSweep() + " of "
            + set.totalSweeps() + "; state saved in " + work.location()
            + "; continue with: aislecast estimate --resume --run-id " + o.runId()
            + " (same --input, --output, --conf, --seed)");
        out.flush();
        return new Result(Status.STOPPED, null, Globals.parameterNames(dims), rec.kept, null,
            List.of(), rec.nextSweep(), rec.sweepSeconds, rec.modelSeconds,
            rec.aggregateSeconds, rec.driverSeconds, problem);
      }

      if (loop.stoppedEarly()) {
        // published as the run with this many sampling sweeps would be (same draws: no sweep
        // depends on the total), so it resumes, extends and reads back like one
        set = set.withSamplingSweeps(rec.nextSweep() - set.warmupSweeps());
        loop.endEarly(runKey(problem, set, config));
        rec = loop.record();
      }

      // 6. Diagnostics.
      t = System.nanoTime();
      String[] names = Globals.parameterNames(dims);
      ParameterSummary[] summaries = new ParameterSummary[names.length];
      for (int p = 0; p < names.length; p++) {
        summaries[p] = Diagnostics.summarize(rec.chainsOf(p));
      }
      List<String> failures = convergenceFailures(names, summaries, sc.rhatMax(), sc.essMin());
      Status status = failures.isEmpty() ? Status.CONVERGED
          : o.allowUnconverged() ? Status.UNCONVERGED_ALLOWED : Status.NOT_CONVERGED;
      // variance priors far above where the posterior puts the variance pull on weakly
      // identified directions (README, "Priors that pull"): say so in run.json and on the console
      List<String> priorNotes = new ArrayList<>(
          PriorPull.varianceNotes(priors, names, summaries));
      priorNotes.addAll(
          PriorPull.hierarchyNotes(priors, names, summaries, problem.stores().size()));
      timings.put("diagnostics", secondsSince(t));

      // 7. Outputs, written whole into the staging folder, then published.
      t = System.nanoTime();
      String staging = run.staging();
      JavaRDD<StoreBlock> blocks = loop.state().map(s -> s.block);
      PosteriorWriter.writeGlobalDraws(spark, staging, rec.kept, names);
      PosteriorWriter.writeStoreDraws(spark, staging, blocks,
          EstimationProblem.psiNames(problem.kx()));
      PosteriorWriter.writeSummary(spark, staging, names, summaries);
      new StateCheckpoints(jsc, staging + "/" + CHECKPOINT_DIR).save(loop.state(), rec);
      timings.put("write", secondsSince(t));
      timings.put("total", secondsSince(tStart));
      Manifest.write(staging, spark, o, config, identity, set, problem, rec, summaries, names,
          failures, status, timings, validated, priorNotes, priors, config.priors());
      run.commit();
      log.info("published", "estimate: published " + run.target() + (o.replace()
          ? " (replacing the earlier run of this id)" : ""), "run_dir", run.target(), "status",
          status.label, "replaced", o.replace());
      work.deleteWithParent();

      Result result = new Result(status, run.target(), names, rec.kept, summaries, failures,
          rec.nextSweep(), rec.sweepSeconds, rec.modelSeconds, rec.aggregateSeconds,
          rec.driverSeconds, problem);
      printOutputs(out, result, sc, jsc.defaultParallelism());
      for (String note : priorNotes) {
        out.println("note: " + note);
        log.info("prior_note", "estimate: " + note);
      }
      StringBuilder phases = new StringBuilder("  timings:");
      timings.forEach((k, v) -> phases.append(String.format(Locale.ROOT, " %s %.1fs", k, v)));
      out.println(phases);
      out.flush();
      return result;
    } finally {
      run.abort();
      if (loop != null) {
        loop.releaseBroadcasts();
        if (loop.state() != null) {
          loop.state().unpersist(false);
        }
      }
      if (validated != null) {
        validated.close();
      }
    }
  }

  /**
   * What the chains' state is tied to: a checkpoint or earlier run with another key cannot be
   * continued by this run. The key holds the input's fingerprint, every sampler setting (the
   * seed and both sweep counts included), the priors and the summation grouping.
   */
  static String runKey(EstimationProblem problem, SamplerSettings set, RunConfig config) {
    return problem.fingerprint() + "|" + set + "|" + config.priors() + "|sum_group="
        + config.sampler().sumGroup();
  }

  /** {@code --extend} starts a new run id from a finished run, and only from one. */
  private static void requireExtensible(SparkSession spark, Options o) {
    if (o.resume() || o.warmStart() != null) {
      throw new RunFailure(RunFailure.BAD_INPUT, "--extend starts a new run and excludes"
          + " --resume and --warm-start (a stopped extension continues with --resume alone)");
    }
    try {
      Path from = new Path(o.extend());
      FileSystem fs = from.getFileSystem(spark.sparkContext().hadoopConfiguration());
      if (fs.makeQualified(from).equals(fs.makeQualified(new Path(o.outputRoot(), o.runId())))) {
        throw new RunFailure(RunFailure.BAD_INPUT, "--extend " + o.extend() + " is this run's"
            + " own folder; give the extended run a new --run-id");
      }
    } catch (IOException e) {
      throw new RunFailure(RunFailure.BAD_INPUT, "--extend " + o.extend() + ": " + e.getMessage(),
          e);
    }
  }

  /**
   * What makes a rerun of this run id the same run: the input tables' files, the effective
   * configuration, the seed, and the run.json of the run it warm-starts from or extends, when
   * there is one. {@code --allow-unconverged} is left out: it changes the exit code, not the
   * outputs.
   */
  static RunIdentity identity(SparkSession spark, RunConfig config, Options o) {
    RunIdentity id = RunIdentity.of("estimate", config)
        .part("inputs", "input files", InputFingerprint.ofInput(spark, config, o.input()))
        .seed(o.seed());
    if (o.warmStart() != null) {
      id.part("warm_start_run", "warm-start run", runJson(spark, o.warmStart(), "--warm-start"));
    }
    if (o.extend() != null) {
      id.part("extended_run", "extended run", runJson(spark, o.extend(), "--extend"));
    }
    return id;
  }

  /** The digest of an earlier run's run.json (none when it has none). */
  private static List<InputFingerprint.FileDigest> runJson(SparkSession spark, String runDir,
      String option) {
    Path json = new Path(runDir, RUN_JSON);
    List<InputFingerprint.FileDigest> files = new ArrayList<>();
    try {
      FileSystem fs = json.getFileSystem(spark.sparkContext().hadoopConfiguration());
      if (fs.exists(json)) {
        files.add(InputFingerprint.ofFile(fs, json, RUN_JSON));
      }
    } catch (IOException e) {
      throw new RunFailure(RunFailure.BAD_INPUT, option + " " + runDir + ": cannot read "
          + RUN_JSON + ": " + e.getMessage(), e);
    }
    return files;
  }

  /**
   * The result of an identical run that exists already. Its exit status follows the stored
   * convergence verdict under this call's {@code --allow-unconverged}; a stale work folder (a
   * driver that died after publishing) is removed.
   */
  private static Result existing(RunDirectory run, Options o, StateCheckpoints work,
      RunLog log) {
    JsonNode m = run.existing();
    String label = m.path("status").asText();
    if (work.exists()) {
      work.deleteWithParent();
      log.info("repair", "estimate: removed stale checkpoints of the published run from "
          + work.location());
    }
    log.info("run_exists", "estimate: run " + run.target() + " already exists with the same"
        + " input files, configuration and seed (status " + label + "); nothing to do",
        "run_dir", run.target(), "status", label);
    if (Manifest.BAD_INPUT.equals(label)) {
      throw new RunFailure(RunFailure.BAD_INPUT, "that run stopped for too many rejected input"
          + " rows; see " + run.target() + "/" + InputValidator.REJECTS_DIR);
    }
    List<String> failures = new ArrayList<>();
    m.path("convergence").path("failures").forEach(f -> failures.add(f.asText()));
    Status status;
    if (Status.CONVERGED.label.equals(label)) {
      status = Status.CONVERGED;
    } else if (Status.NOT_CONVERGED.label.equals(label)
        || Status.UNCONVERGED_ALLOWED.label.equals(label)) {
      status = o.allowUnconverged() ? Status.UNCONVERGED_ALLOWED : Status.NOT_CONVERGED;
    } else {
      throw new RunFailure(RunFailure.OTHER, run.target() + "/" + RUN_JSON + " has an unknown"
          + " status '" + label + "'");
    }
    return new Result(status, run.target(), null, null, null, failures,
        m.path("sampler").path("sweeps_done").asInt(), 0, 0, 0, 0, null);
  }

  /**
   * Global parameters beyond the limits: R-hat above {@code rhatMax} or bulk ESS below
   * {@code essMin}. A parameter whose draws are all equal (e.g. lambda held at 0) has no R-hat
   * and is skipped; non-finite draws are a failure.
   */
  static List<String> convergenceFailures(String[] names, ParameterSummary[] s, double rhatMax,
      double essMin) {
    List<String> out = new ArrayList<>();
    for (int p = 0; p < names.length; p++) {
      ParameterSummary q = s[p];
      if (Double.isNaN(q.mean())) {
        out.add(names[p] + ": non-finite draws");
        continue;
      }
      if (q.sd() == 0.0) {
        continue;
      }
      boolean badRhat = !(q.rhat() <= rhatMax);
      boolean badEss = !(q.essBulk() >= essMin);
      if (badRhat || badEss) {
        out.add(String.format(Locale.ROOT, "%s: R-hat %.3f%s, bulk ESS %.0f%s", names[p],
            q.rhat(), badRhat ? " > " + rhatMax : "", q.essBulk(),
            badEss ? " < " + essMin : ""));
      }
    }
    return out;
  }

  /**
   * Sweeps per chain, in all, at which every global parameter's bulk ESS would reach
   * {@code essMin} if it kept growing in proportion to the sweeps, as it does for a chain past
   * its transient (common practice): {@code kept * essMin / ess} for the slowest parameter,
   * {@code kept} being the sweeps the summaries come from, rounded up to a multiple of 100. An
   * extrapolation for planning an {@code --extend}, not a promise; R-hat is not extrapolated.
   * -1 when every bulk ESS meets the limit or none is usable (constant or non-finite draws).
   */
  public static int sweepsNeeded(ParameterSummary[] summaries, double essMin, int kept) {
    double need = 0;
    for (ParameterSummary q : summaries) {
      double ess = q.essBulk();
      if (!(q.sd() > 0) || !(ess > 0) || !Double.isFinite(ess) || ess >= essMin) {
        continue;
      }
      need = Math.max(need, kept * essMin / ess);
    }
    return need > kept ? (int) Math.min(Integer.MAX_VALUE, Math.ceil(need / 100.0) * 100) : -1;
  }

  /**
   * {@link #sweepsNeeded} for a run of {@code sampling} sampling sweeps, every
   * {@code thin}-th kept, in sampling sweeps (what {@code sampler.sampling} would have to be).
   */
  public static int samplingSweepsNeeded(ParameterSummary[] summaries, double essMin,
      int sampling, int thin) {
    int kept = sweepsNeeded(summaries, essMin, sampling);
    if (kept < 0) {
      return -1;
    }
    // a multiple of 100 and of thin, so it is a valid sampler.sampling
    long step = 100L * thin / gcd(100, thin);
    return (int) Math.min(Integer.MAX_VALUE, (kept + step - 1) / step * step);
  }

  /** Index of the smallest finite bulk ESS in {@code summaries} (first of ties); -1 if none. */
  static int slowest(ParameterSummary[] summaries) {
    int slowest = -1;
    for (int p = 0; p < summaries.length; p++) {
      if (Double.isFinite(summaries[p].essBulk())
          && (slowest < 0 || summaries[p].essBulk() < summaries[slowest].essBulk())) {
        slowest = p;
      }
    }
    return slowest;
  }

  /** {@code v} as written in a configuration: no exponent, no trailing zeros (0.01, 400, 2). */
  static String plain(double v) {
    return java.math.BigDecimal.valueOf(v).stripTrailingZeros().toPlainString();
  }

  private static int gcd(int a, int b) {
    return b == 0 ? a : gcd(b, a % b);
  }

  private static void printOutputs(PrintWriter out, Result r, SamplerConfig sc, int cores) {
    // model work is summed over parallel tasks, so compare it with the core-seconds available
    out.printf(Locale.ROOT, "estimate: %d sweeps in %s (%.2f sweeps/s; model work %.0f%% of"
        + " %d cores' time, the rest is Spark and driver overhead or idle cores)%n",
        r.sweepsDone(), SweepLoop.clock(r.sweepSeconds()),
        r.sweepsDone() / Math.max(1e-9, r.sweepSeconds()),
        100 * r.modelSeconds() / Math.max(1e-9, r.sweepSeconds() * cores), cores);
    double worst = Double.NaN;
    for (ParameterSummary s : r.summaries()) {
      if (!(s.rhat() <= worst)) {
        worst = Double.isNaN(s.rhat()) ? worst : s.rhat();
      }
    }
    int slowest = slowest(r.summaries());
    double minEss = slowest < 0 ? Double.NaN : r.summaries()[slowest].essBulk();
    out.printf(Locale.ROOT, "  worst R-hat %.3f (limit %.3f), smallest bulk ESS %.0f (limit %.0f)"
        + " over %d global parameters%n", worst, sc.rhatMax(), minEss, sc.essMin(),
        r.parameterNames().length);
    out.println("Outputs (run " + r.status().label + "):");
    for (String p : new String[] {PosteriorWriter.GLOBAL_DRAWS, PosteriorWriter.STORE_DRAWS,
        PosteriorWriter.SUMMARY, InputValidator.REJECTS_DIR, RUN_JSON}) {
      out.println("  " + r.runDir() + "/" + p);
    }
    if (!r.converged()) {
      out.println("Convergence limits not met for " + r.failures().size() + " of "
          + r.parameterNames().length + " global parameters:");
      for (String f : r.failures().subList(0, Math.min(10, r.failures().size()))) {
        out.println("  " + f);
      }
      if (r.failures().size() > 10) {
        out.println("  ... (see " + PosteriorWriter.SUMMARY + ")");
      }
      int sampling = r.globalDraws()[0].length * sc.thin();
      int need = samplingSweepsNeeded(r.summaries(), sc.essMin(), sampling, sc.thin());
      if (need > 0) {
        out.printf(Locale.ROOT, "At this run's rate every bulk ESS would reach %.0f at about %d"
            + " sampling sweeps per chain (this run made %d; an extrapolation, R-hat not"
            + " included): continue with --extend %s --run-id <new id> and sampler.sampling: %d%n",
            sc.essMin(), need, sampling, r.runDir(), need);
      }
    }
    out.flush();
  }

  private static double secondsSince(long t0) {
    return (System.nanoTime() - t0) * 1e-9;
  }

  /** Starting values taken from an earlier run's final state. */
  record WarmStart(Globals[] globals, Map<String, double[][]> positions) {
    private record Local(String storeId, String[] weeks, int[] product, double[][] positions)
        implements Serializable {}

    static WarmStart read(JavaSparkContext jsc, String runDir, EstimationProblem problem,
        int chains) {
      StateCheckpoints prev = new StateCheckpoints(jsc, runDir + "/" + CHECKPOINT_DIR);
      Path latest = prev.latest().orElseThrow(() -> new RunFailure(RunFailure.BAD_INPUT,
          "--warm-start " + runDir + ": no final state in " + prev.location()
              + " (is it a finished estimate run folder?)"));
      ChainRecord rec = prev.readRecord(latest);
      String[] ids = new String[problem.catalog().size()];
      for (int p = 0; p < ids.length; p++) {
        ids[p] = problem.catalog().id(p);
      }
      Globals[] last = rec.state.globals();
      if (!Arrays.equals(rec.productIds, ids) || !last[0].dims().equals(problem.dims())) {
        throw new RunFailure(RunFailure.BAD_INPUT, "--warm-start " + runDir + ": that run had"
            + " other products, attributes, demographics or shifters (" + last[0].dims()
            + " vs " + problem.dims() + "); its globals cannot start this run");
      }
      Globals[] globals = new Globals[chains];
      for (int c = 0; c < chains; c++) {
        globals[c] = last[c % last.length];
      }
      List<Local> locals = prev.readBlocks(latest).map(b -> {
        double[][] pos = new double[b.chains.length][];
        for (int c = 0; c < pos.length; c++) {
          pos[c] = b.chains[c].position;
        }
        return new Local(b.data.storeId, b.data.weeks, b.data.product, pos);
      }).collect();
      Map<String, StoreData> now = new HashMap<>();
      for (StoreData d : problem.stores()) {
        now.put(d.storeId, d);
      }
      Map<String, double[][]> positions = new HashMap<>();
      for (Local l : locals) {
        StoreData d = now.get(l.storeId());
        // positions index (psi, kappa per stocked product, delta per row): same layout only
        if (d != null && Arrays.equals(d.weeks, l.weeks()) && Arrays.equals(d.product,
            l.product())) {
          positions.put(l.storeId(), l.positions());
        }
      }
      return new WarmStart(globals, positions);
    }
  }

  /** The configuration as JSON text, for the manifest. */
  static String configJson(RunConfig config) {
    return RunConfigLoader.toJson(config);
  }
}
