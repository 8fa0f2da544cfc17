package aislecast.jobs.estimate;

import aislecast.core.diag.Diagnostics;
import aislecast.core.diag.ParameterSummary;
import aislecast.core.estimate.DriverState;
import aislecast.core.estimate.SamplerSettings;
import aislecast.core.estimate.StoreBlock;
import aislecast.core.estimate.SweepInput;
import aislecast.core.estimate.SweepStats;
import aislecast.core.estimate.Sweeps;
import aislecast.core.globals.Dims;
import aislecast.core.globals.Globals;
import aislecast.core.globals.Priors;
import aislecast.core.mcmc.StoreSampler;
import aislecast.core.model.LocalParams;
import aislecast.core.model.StoreData;
import aislecast.jobs.io.RunLog;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import org.apache.spark.TaskContext;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.api.java.JavaSparkContext;
import org.apache.spark.api.java.function.Function;
import org.apache.spark.broadcast.Broadcast;
import org.apache.spark.storage.StorageLevel;

/**
 * The estimation sweeps on Spark (DESIGN section 5), one stage per sweep:
 *
 * <ol>
 *   <li>broadcast {@link Sweeps#input} (every chain's globals and ridge shifts);
 *   <li>map every store block to a copy advanced by {@link Sweeps#sweepStore};
 *   <li>{@code treeAggregate} the stores' {@link SweepStats} in a fixed order ({@link
 *       OrderedStats}), which also materialises the new, persisted state RDD;
 *   <li>{@link Sweeps#driverStep} on the driver; unpersist the previous state RDD.
 * </ol>
 *
 * <p>Every {@code checkpointEvery} sweeps the state goes to {@link StateCheckpoints} and is read
 * back, which cuts the lineage; the broadcasts of the sweeps before it are destroyed then, not
 * earlier: until the checkpoint every task serialises the whole lineage (cached or not), and a
 * lost cached partition is recomputed through them.
 */
final class SweepLoop {
  /**
   * @param stopAtSweep stop (with a checkpoint) once this many sweeps are done; -1 runs all
   * @param failAtSweep fault test: the first attempt of partition 0's task in this sweep throws;
   *     -1 never
   * @param stopWhenConverged end the sampling early, at a progress line where every global
   *     parameter is within {@code rhatMax} and {@code essMin} ({@link #stoppedEarly})
   */
  record Settings(SamplerSettings sampler, Priors priors, int partitions, int sumGroup,
      int checkpointEvery, int progressEvery, int stopAtSweep, int failAtSweep,
      boolean stopWhenConverged, double rhatMax, double essMin) {}

  private static final StorageLevel LEVEL = StorageLevel.MEMORY_AND_DISK();

  private final JavaSparkContext jsc;
  private final EstimationProblem problem;
  private final Settings cfg;
  private final StateCheckpoints checkpoints;
  private final RunLog log;
  private final Dims dims;
  private final String[] names;
  private final List<Broadcast<?>> liveBroadcasts = new ArrayList<>();
  private JavaRDD<SweptStore> state;
  private ChainRecord record;
  private long runStartNanos;
  private int sweepsAtStart;
  private double worstRhat = Double.NaN;
  private String worstParameter = "";
  private int lastCheckpoint = -1;
  private boolean stoppedEarly;

  SweepLoop(JavaSparkContext jsc, EstimationProblem problem, Settings cfg,
      StateCheckpoints checkpoints, RunLog log) {
    this.jsc = jsc;
    this.problem = problem;
    this.cfg = cfg;
    this.checkpoints = checkpoints;
    this.log = log;
    this.dims = problem.dims();
    this.names = Globals.parameterNames(dims);
  }

  /**
   * Fresh chains: globals per chain (from the data, or a warm start), every store block
   * initialised from them; {@code warm} holds per-store chain positions to start from instead
   * (stores whose data layout matches the earlier run), possibly empty.
   */
  void start(String key, Globals[] globals, Map<String, double[][]> warm) {
    SamplerSettings set = cfg.sampler();
    record = new ChainRecord(key, productIds(), DriverState.start(globals), set.chains(),
        set.keptDraws());
    LocalParams[] params = Sweeps.localParams(globals);
    Broadcast<LocalParams[]> bp = jsc.broadcast(params);
    Broadcast<Map<String, double[][]>> bw = jsc.broadcast(warm);
    double[] x = problem.catalog().x();
    int kx = problem.kx();
    // laid out by store index as checkpoints are read back, so a reload keeps the layout
    JavaRDD<StoreData> stores = StateCheckpoints.byStoreIndex(
        jsc.parallelize(problem.stores(), cfg.partitions()), d -> d.storeIndex, cfg.partitions());
    JavaRDD<SweptStore> init = stores
        .map(d -> {
          StoreBlock b = Sweeps.initStore(d, x, kx, bp.value(), set);
          double[][] pos = bw.value().get(d.storeId);
          if (pos != null) {
            for (int c = 0; c < b.chains.length; c++) {
              b.chains[c].position = pos[c % pos.length].clone();
            }
          }
          return new SweptStore(b, null, 0L);
        })
        .setName("stores@init");
    init.persist(LEVEL).count();
    // tasks of later sweeps serialise this RDD's lineage too, so these broadcasts must live
    // until the first checkpoint cuts it
    liveBroadcasts.add(bp);
    liveBroadcasts.add(bw);
    state = init;
  }

  /** Continues from a checkpoint folder written by {@link StateCheckpoints#save}. */
  void resume(org.apache.hadoop.fs.Path sweepDir, ChainRecord saved) {
    record = saved;
    state = checkpoints.readBlocks(sweepDir, cfg.partitions())
        .map(b -> new SweptStore(b, null, 0L))
        .setName("stores@" + saved.nextSweep());
    state.persist(LEVEL).count();
    lastCheckpoint = saved.nextSweep();
  }

  /**
   * Continues a finished run's final state (a published run's {@code _checkpoint}) with more
   * kept sweeps: {@code grown} is its record with room for them, and every store block gets the
   * same room. The sweeps that follow are those an uninterrupted run with the larger count makes.
   */
  void extend(StateCheckpoints earlier, org.apache.hadoop.fs.Path sweepDir, ChainRecord grown) {
    record = grown;
    int kpsi = dims.kpsi();
    int capacity = grown.keptCapacity();
    state = earlier.readBlocks(sweepDir, cfg.partitions())
        .map(b -> new SweptStore(b.withCapacity(kpsi, capacity), null, 0L))
        .setName("stores@" + grown.nextSweep() + " (extended)");
    state.persist(LEVEL).count();
  }

  private String[] productIds() {
    String[] ids = new String[problem.catalog().size()];
    for (int p = 0; p < ids.length; p++) {
      ids[p] = problem.catalog().id(p);
    }
    return ids;
  }

  ChainRecord record() {
    return record;
  }

  JavaRDD<SweptStore> state() {
    return state;
  }

  /**
   * Runs sweeps until all are done, or every limit is met with {@code stopWhenConverged} (true,
   * {@link #stoppedEarly} tells which), or the stop sweep is reached (false).
   */
  boolean run() {
    SamplerSettings set = cfg.sampler();
    int total = set.totalSweeps();
    runStartNanos = System.nanoTime();
    sweepsAtStart = record.nextSweep();
    double[] x = problem.catalog().x();
    int kx = problem.kx();
    int stores = problem.stores().size();
    while (record.nextSweep() < total) {
      if (cfg.stopAtSweep() >= 0 && record.nextSweep() >= cfg.stopAtSweep()) {
        if (lastCheckpoint != record.nextSweep()) {
          checkpoint();
        }
        return false;
      }
      int sweep = record.nextSweep();
      long t0 = System.nanoTime();
      SweepInput in = Sweeps.input(record.state, set);
      Broadcast<SweepInput> bin = jsc.broadcast(in);
      liveBroadcasts.add(bin);
      JavaRDD<SweptStore> next = state
          .map(new StoreSweep(bin, x, kx, set, sweep, dims, cfg.failAtSweep()))
          .setName("stores@" + (sweep + 1));
      next.persist(LEVEL);
      OrderedStats agg = next.treeAggregate(
          new OrderedStats(cfg.sumGroup(), stores, dims, set.chains()),
          (a, s) -> a.add(s.storeIndex(), s.stats, s.nanos),
          OrderedStats::merge, 2);
      long t1 = System.nanoTime();
      SweepStats merged = agg.total();
      record.state = Sweeps.driverStep(record.state, merged, in, cfg.priors(), set);
      state.unpersist(false);
      state = next;
      long t2 = System.nanoTime();
      keep(sweep, merged, set);
      record.sweepSeconds += (t2 - t0) * 1e-9;
      record.aggregateSeconds += (t1 - t0) * 1e-9;
      record.driverSeconds += (t2 - t1) * 1e-9;
      record.modelSeconds += agg.modelNanos() * 1e-9;
      int done = record.nextSweep();
      if (done % cfg.checkpointEvery() == 0 && done < total) {
        checkpoint();
      }
      if (done % cfg.progressEvery() == 0 || done == total) {
        ParameterSummary[] summaries = mayStopAt(done, total) ? summarizeKept() : null;
        progress(done, total, summaries);
        if (summaries != null && convergedAt(done, summaries)) {
          stoppedEarly = true;
          return true;
        }
      }
    }
    return true;
  }

  /**
   * Whether the run is to look at its diagnostics after {@code done} of {@code total} sweeps, to
   * end early: asked for, before the last sweep, in the sampling phase at a kept sweep, with
   * enough kept draws. Only progress lines are looked at, so the run looks a bounded number of
   * times (each look is a chance to stop on a lucky fluctuation: README, "Usage").
   */
  private boolean mayStopAt(int done, int total) {
    SamplerSettings set = cfg.sampler();
    int sampled = done - set.warmupSweeps();
    return cfg.stopWhenConverged() && done < total && sampled > 0 && sampled % set.thin() == 0
        && record.keptDraws >= Diagnostics.MIN_DRAWS;
  }

  private ParameterSummary[] summarizeKept() {
    ParameterSummary[] summaries = new ParameterSummary[names.length];
    for (int p = 0; p < names.length; p++) {
      summaries[p] = Diagnostics.summarize(record.chainsOf(p));
    }
    return summaries;
  }

  /**
   * Whether the sampling may end after {@code done} sweeps ({@link #mayStopAt}): every global
   * parameter within the limits by the very test the finished run applies
   * ({@link EstimateJob#convergenceFailures}) on the {@code summaries} of the kept draws.
   */
  private boolean convergedAt(int done, ParameterSummary[] summaries) {
    SamplerSettings set = cfg.sampler();
    int sampled = done - set.warmupSweeps();
    List<String> failures =
        EstimateJob.convergenceFailures(names, summaries, cfg.rhatMax(), cfg.essMin());
    if (!failures.isEmpty()) {
      int slowest = EstimateJob.slowest(summaries);
      double ess = slowest < 0 ? Double.NaN : summaries[slowest].essBulk();
      int need = EstimateJob.samplingSweepsNeeded(summaries, cfg.essMin(), sampled, set.thin());
      // seconds to that point at this process's pace (its sweeps so far, checkpoints included)
      int doneHere = done - sweepsAtStart;
      double left = doneHere > 0 && need > sampled
          ? (System.nanoTime() - runStartNanos) * 1e-9 / doneHere * (need - sampled) : Double.NaN;
      String eta = need > 0 ? String.format(java.util.Locale.ROOT, "; at its pace so far every"
          + " bulk ESS reaches the limit near %d sampling sweeps (%s from here), R-hat not"
          + " extrapolated", need, clock(left)) : "";
      log.info("convergence_check", String.format(java.util.Locale.ROOT, "  after %d sampling"
          + " sweeps %d of %d global parameters are beyond the limits; smallest bulk ESS %.0f"
          + " (%s), limit %s%s: going on (sampler.stop_when_converged)", sampled,
          failures.size(), names.length, ess, slowest < 0 ? "-" : names[slowest],
          EstimateJob.plain(cfg.essMin()), eta), "sampling_sweeps", sampled, "beyond_limits",
          failures.size(), "ess_bulk_min", ess, "sampling_sweeps_needed_estimate",
          need > 0 ? need : null, "eta_to_estimate_s", left);
      return false;
    }
    log.info("converged_early", String.format(java.util.Locale.ROOT, "  every global parameter"
        + " within the limits (R-hat <= %s, bulk ESS >= %s) after %d of %d sampling sweeps:"
        + " stopping here (sampler.stop_when_converged)", EstimateJob.plain(cfg.rhatMax()),
        EstimateJob.plain(cfg.essMin()), sampled, set.samplingSweeps()), "sampling_sweeps", sampled,
        "sampling_max", set.samplingSweeps());
    return true;
  }

  /**
   * After an early stop: the record and every store block shrink to the draws kept, under
   * {@code key} (that of a run whose sampling sweeps are those done), so the final state is what
   * that shorter run ends with.
   */
  void endEarly(String key) {
    record = record.extendedTo(key, record.keptDraws, record.extendsRun);
    int kpsi = dims.kpsi();
    int kept = record.keptDraws;
    JavaRDD<SweptStore> trimmed = state
        .map(s -> new SweptStore(s.block.withCapacity(kpsi, kept), null, 0L))
        .setName("stores@" + record.nextSweep() + " (" + kept + " kept)");
    trimmed.persist(LEVEL).count();
    state.unpersist(false);
    state = trimmed;
  }

  /** Whether {@link #run} ended the sampling early, every limit met (stopWhenConverged). */
  boolean stoppedEarly() {
    return stoppedEarly;
  }

  /** Destroys every broadcast still alive (call when the loop's RDDs are no longer needed). */
  void releaseBroadcasts() {
    for (Broadcast<?> b : liveBroadcasts) {
      b.destroy();
    }
    liveBroadcasts.clear();
  }

  double worstRhat() {
    return worstRhat;
  }

  String worstParameter() {
    return worstParameter;
  }

  private void keep(int sweep, SweepStats merged, SamplerSettings set) {
    if (sweep >= set.warmupSweeps()) {
      record.acceptSampling += merged.meanAcceptance();
      record.divergentSampling += merged.totalDivergent();
      if (set.isKept(sweep)) {
        Globals[] g = record.state.globals();
        for (int c = 0; c < g.length; c++) {
          record.kept[c][set.keptIndex(sweep)] = g[c].toFlat();
        }
        record.keptDraws = set.keptIndex(sweep) + 1;
      }
    } else {
      record.acceptWarmup += merged.meanAcceptance();
      record.divergentWarmup += merged.totalDivergent();
    }
  }

  private void checkpoint() {
    checkpoints.save(state, record);
    lastCheckpoint = record.nextSweep();
    org.apache.hadoop.fs.Path latest = checkpoints.latest().orElseThrow();
    JavaRDD<SweptStore> reloaded = checkpoints.readBlocks(latest, cfg.partitions())
        .map(b -> new SweptStore(b, null, 0L))
        .setName("stores@" + record.nextSweep() + " (checkpoint)");
    reloaded.persist(LEVEL).count();
    state.unpersist(false);
    state = reloaded;
    releaseBroadcasts();
  }

  /**
   * Logs a progress line; the worst R-hat from {@code summaries} when given (those of the kept
   * draws), else computed here.
   */
  private void progress(int done, int total, ParameterSummary[] summaries) {
    if (record.keptDraws >= Diagnostics.MIN_DRAWS) {
      worstRhat = Double.NaN;
      worstParameter = "";
      for (int p = 0; p < names.length; p++) {
        double r = summaries != null ? summaries[p].rhat()
            : Diagnostics.rankRhat(record.chainsOf(p));
        if (Double.isFinite(r) && !(r <= worstRhat)) {
          worstRhat = r;
          worstParameter = names[p];
        }
      }
    }
    double elapsed = (System.nanoTime() - runStartNanos) * 1e-9;
    int doneHere = done - sweepsAtStart;
    double eta = doneHere > 0 ? elapsed / doneHere * (total - done) : Double.NaN;
    String phase = done <= cfg.sampler().warmupSweeps() ? "warmup" : "sampling";
    log.progress(new RunLog.Progress("sweep", done, total, phase, elapsed, eta, worstRhat,
        worstParameter));
  }

  static String clock(double seconds) {
    return RunLog.clock(seconds);
  }

  /** The task of one sweep: copy each store's block and advance it. */
  private static final class StoreSweep implements Function<SweptStore, SweptStore> {
    private static final long serialVersionUID = 1L;
    private final Broadcast<SweepInput> input;
    private final double[] x;
    private final int kx;
    private final SamplerSettings set;
    private final int sweep;
    private final Dims dims;
    private final int failAtSweep;

    StoreSweep(Broadcast<SweepInput> input, double[] x, int kx, SamplerSettings set, int sweep,
        Dims dims, int failAtSweep) {
      this.input = input;
      this.x = x;
      this.kx = kx;
      this.set = set;
      this.sweep = sweep;
      this.dims = dims;
      this.failAtSweep = failAtSweep;
    }

    @Override
    public SweptStore call(SweptStore prev) {
      long t0 = System.nanoTime();
      // the previous RDD is cached: never change what its blocks hold (StoreBlock.copy)
      StoreBlock b = prev.block.copy();
      StoreData d = b.data;
      SweepStats stats = new SweepStats(dims, set.chains());
      Sweeps.sweepStore(b, new StoreSampler(d, x, kx), x, kx, input.value(), set, sweep, stats);
      TaskContext tc = TaskContext.get();
      if (sweep == failAtSweep && tc != null && tc.partitionId() == 0
          && tc.attemptNumber() == 0) {
        throw new IllegalStateException("injected task failure (fault test), sweep " + sweep);
      }
      return new SweptStore(b, stats, System.nanoTime() - t0);
    }
  }
}
