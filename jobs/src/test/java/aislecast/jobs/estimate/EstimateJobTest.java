package aislecast.jobs.estimate;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import aislecast.core.estimate.InProcessRunner;
import aislecast.core.estimate.SamplerSettings;
import aislecast.core.sim.DemandSimulator;
import aislecast.core.sim.SimSettings;
import aislecast.core.sim.SimWriter;
import aislecast.jobs.cli.Main;
import aislecast.jobs.config.RunConfig;
import aislecast.jobs.config.RunFailure;
import aislecast.jobs.config.SamplerConfig;
import aislecast.jobs.spark.SparkSessions;
import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.io.PrintWriter;
import java.io.StringWriter;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Arrays;
import java.util.List;
import java.util.stream.Stream;
import java.util.concurrent.atomic.AtomicInteger;
import org.apache.spark.api.java.JavaSparkContext;
import org.apache.spark.scheduler.SparkListener;
import org.apache.spark.scheduler.SparkListenerTaskEnd;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * End-to-end runs of the Spark estimation job on small data simulated from the model (4 stores,
 * 6 weeks, 5 products, 2 attributes, 30 shopper draws), with few sweeps. The reference for the
 * draws is {@link InProcessRunner}: the same sweep functions composed in one JVM without Spark
 * (common practice for distributed iterative algorithms: the distributed loop must reproduce a
 * serial one exactly when every random stream is keyed by (seed, chain, store, sweep)).
 */
class EstimateJobTest {
  private static final long SEED = 77L;
  private static final int STORES = 4;

  @TempDir static Path data;
  @TempDir Path out;

  @BeforeAll
  static void simulate() throws Exception {
    // tiny tables: one shuffle partition keeps validation's SQL stages cheap
    System.setProperty("spark.sql.shuffle.partitions", "1");
    SimSettings s = SimSettings.demo().withSizes(STORES, 6, 5, 2, 2, 30);
    SimWriter.write(DemandSimulator.simulate(s), data.resolve("in"), false);
  }

  @AfterEach
  void stopSpark() {
    SparkSession.getActiveSession().foreach(s -> {
      s.stop();
      return null;
    });
    SparkSession.clearActiveSession();
    SparkSession.clearDefaultSession();
  }

  /** Few sweeps, checkpoints every 4, 2 partitions, one summation group for all stores. */
  private static SamplerConfig small(int partitions, int sumGroup) {
    return small(partitions, sumGroup, 8);
  }

  private static SamplerConfig small(int partitions, int sumGroup, int sampling) {
    return new SamplerConfig(3, 8, sampling, 1, 8, 0.8, 200, 4, 1.01, 400, 5, partitions,
        sumGroup, true, false, SamplerConfig.DEFAULT_MOMENTUM_PERSISTENCE);
  }

  private static SparkSession spark(String master) {
    return SparkSessions.open(master, "estimate-test").spark();
  }

  private EstimateJob.Result run(SparkSession spark, SamplerConfig sc, EstimateJob.Options o) {
    StringWriter text = new StringWriter();
    EstimateJob.Result r = EstimateJob.run(spark, RunConfig.defaults().withSampler(sc), o,
        new PrintWriter(text, true));
    System.out.print(text);
    return r;
  }

  private EstimateJob.Options options(String runId) {
    return EstimateJob.Options.of(data.resolve("in").toString(), out.toString(), runId, SEED);
  }

  /** The serial reference on exactly the stores the job assembled. */
  private static double[][][] reference(EstimateJob.Result r, SamplerConfig sc) {
    EstimationProblem p = r.problem();
    SamplerSettings set = EstimateJob.samplerSettings(sc, SEED);
    InProcessRunner.Result ref = InProcessRunner.run(p.stores(), p.catalog(), p.kd(), p.kz(),
        p.kc(), RunConfig.defaults().priors().toPriors(p.kd(), p.kx()), set);
    return ref.globalDraws();
  }

  private static void assertSameDraws(double[][][] expected, double[][][] actual) {
    assertEquals(expected.length, actual.length, "chains");
    for (int c = 0; c < expected.length; c++) {
      assertEquals(expected[c].length, actual[c].length, "draws of chain " + c);
      for (int d = 0; d < expected[c].length; d++) {
        // exact: assertArrayEquals on doubles compares bit patterns via Double.equals
        assertArrayEquals(expected[c][d], actual[c][d], "chain " + c + " draw " + d);
      }
    }
  }

  @Test
  void sparkDrawsEqualTheInProcessRunnerBitForBit() {
    SamplerConfig sc = small(2, 64);
    EstimateJob.Result r = run(spark("local[2]"), sc, options("a"));
    assertEquals(STORES, r.problem().stores().size());
    double[][][] ref = reference(r, sc);
    assertSameDraws(ref, r.globalDraws());
    // the draws are not trivially constant: the chains moved
    assertFalse(Arrays.equals(ref[0][0], ref[0][7]), "chain 0 did not move");

    // and the Parquet table holds exactly those numbers
    SparkSession spark = SparkSession.active();
    List<Row> rows = spark.read().parquet(r.runDir() + "/" + PosteriorWriter.GLOBAL_DRAWS)
        .collectAsList();
    assertEquals(3 * 8 * r.parameterNames().length, rows.size());
    List<String> names = Arrays.asList(r.parameterNames());
    for (Row row : rows) {
      int c = row.getInt(0);
      int d = row.getInt(1);
      int p = names.indexOf(row.getString(2));
      assertEquals(ref[c][d][p], row.getDouble(3), 0.0);
    }
  }

  @Test
  void oneCoreAndTwoCoresAndOtherPartitioningsGiveIdenticalDraws() {
    // several summation groups (2 stores each) and partitions cutting through them
    SamplerConfig threeParts = small(3, 2);
    SamplerConfig oneStoreEach = small(4, 2);
    EstimateJob.Result one = run(spark("local[1]"), threeParts, options("b1"));
    stopSpark();
    EstimateJob.Result two = run(spark("local[2]"), oneStoreEach, options("b2"));
    assertSameDraws(one.globalDraws(), two.globalDraws());
    // and with one group for all stores, local[1] reproduces the serial reference too
    stopSpark();
    SamplerConfig oneGroup = small(3, 64);
    EstimateJob.Result serialOrder = run(spark("local[1]"), oneGroup, options("b3"));
    assertSameDraws(reference(serialOrder, oneGroup), serialOrder.globalDraws());
  }

  @Test
  void aTaskFailureAndRetryGiveIdenticalDraws() throws Exception {
    SamplerConfig sc = small(2, 64);
    // local[2,4]: 2 threads, a task may fail up to 4 times
    SparkSession spark = spark("local[2,4]");
    AtomicInteger failed = new AtomicInteger();
    spark.sparkContext().addSparkListener(new SparkListener() {
      @Override
      public void onTaskEnd(SparkListenerTaskEnd end) {
        if (end.taskInfo().failed()) {
          failed.incrementAndGet();
        }
      }
    });
    EstimateJob.Result r = run(spark, sc, options("c").withFailAtSweep(5));
    spark.sparkContext().listenerBus().waitUntilEmpty();
    assertEquals(1, failed.get(), "exactly the injected task failed once and was retried");
    assertSameDraws(reference(r, sc), r.globalDraws());
  }

  @Test
  void aStoppedAndResumedRunEqualsAnUninterruptedOne() throws Exception {
    SamplerConfig sc = small(2, 64);
    SparkSession spark = spark("local[2]");
    // stop after 7 sweeps: between checkpoints (every 4), during warmup (8 sweeps)
    EstimateJob.Result stopped = run(spark, sc, options("d").withStopAtSweep(7));
    assertEquals(EstimateJob.Status.STOPPED, stopped.status());
    assertNull(stopped.runDir());
    assertFalse(Files.exists(out.resolve("d")), "a stopped run must not be visible");
    assertTrue(Files.isDirectory(out.resolve(".work-d")));
    // its checkpoint read back spread over any partition count by store index, every store
    // exactly once: with the count it was saved with (2, one file each) as saved, without a
    // shuffle, and that layout is by store index too; with any other count after a shuffle
    StateCheckpoints saved = new StateCheckpoints(
        JavaSparkContext.fromSparkContext(spark.sparkContext()),
        out.resolve(".work-d").resolve(EstimateJob.CHECKPOINT_DIR).toString());
    org.apache.hadoop.fs.Path latest = saved.latest().orElseThrow();
    assertEquals(2, saved.readBlocks(latest).getNumPartitions());
    for (int parts : new int[] {1, 2, 3, 7}) {
      var read = saved.readBlocks(latest, parts);
      assertEquals(parts != 2, read.rdd().toDebugString().contains("ShuffledRDD"),
          "shuffled only to change the count: " + read.rdd().toDebugString());
      List<List<Integer>> byPartition = read.map(b -> b.data.storeIndex).glom().collect();
      assertEquals(parts, byPartition.size());
      List<Integer> all = new java.util.ArrayList<>();
      for (int p = 0; p < parts; p++) {
        for (int index : byPartition.get(p)) {
          assertEquals(p, index % parts, "store " + index + " in partition " + p);
          all.add(index);
        }
      }
      java.util.Collections.sort(all);
      assertEquals(java.util.stream.IntStream.range(0, STORES).boxed().toList(), all);
    }
    // without --resume the stopped run is protected
    RunFailure again = assertThrows(RunFailure.class, () -> run(spark, sc, options("d")));
    assertEquals(2, again.exitCode());
    assertTrue(again.getMessage().contains("--resume"), again.getMessage());
    // a resume with another seed is refused
    RunFailure otherSeed = assertThrows(RunFailure.class, () -> run(spark, sc,
        EstimateJob.Options.of(data.resolve("in").toString(), out.toString(), "d", SEED + 1)
            .withResume(true)));
    assertTrue(otherSeed.getMessage().contains("cannot resume"), otherSeed.getMessage());

    EstimateJob.Result resumed = run(spark, sc, options("d").withResume(true));
    assertNotEquals(EstimateJob.Status.STOPPED, resumed.status());
    assertEquals(16, resumed.sweepsDone());
    assertSameDraws(reference(resumed, sc), resumed.globalDraws());
    assertFalse(Files.exists(out.resolve(".work-d")), "work folder removed after publishing");
  }

  @Test
  void anExtendedRunEqualsALongerUninterruptedOne() throws Exception {
    SamplerConfig eight = small(2, 64, 8);
    SamplerConfig sixteen = small(2, 64, 16);
    SparkSession spark = spark("local[2]");
    EstimateJob.Result first = run(spark, eight, options("g"));
    assertEquals(16, first.sweepsDone());

    // refused: nothing to add, another seed, the run's own folder
    RunFailure nothing = assertThrows(RunFailure.class,
        () -> run(spark, eight, options("g2").withExtend(first.runDir())));
    assertEquals(2, nothing.exitCode());
    assertTrue(nothing.getMessage().contains("above 8"), nothing.getMessage());
    RunFailure otherSeed = assertThrows(RunFailure.class, () -> run(spark, sixteen,
        EstimateJob.Options.of(data.resolve("in").toString(), out.toString(), "g2", SEED + 1)
            .withExtend(first.runDir())));
    assertEquals(2, otherSeed.exitCode());
    assertTrue(otherSeed.getMessage().contains("cannot extend"), otherSeed.getMessage());
    RunFailure own = assertThrows(RunFailure.class, () -> run(spark, sixteen,
        options("g").withReplace(true).withExtend(first.runDir())));
    assertTrue(own.getMessage().contains("new --run-id"), own.getMessage());
    assertFalse(Files.exists(out.resolve("g2")), "a refused extension publishes nothing");

    // 8 more kept sweeps: the same draws as 8 + 16 sweeps in one go (InProcessRunner), the
    // earlier run's 8 kept draws first
    EstimateJob.Result extended = run(spark, sixteen, options("g2").withExtend(first.runDir()));
    assertEquals(24, extended.sweepsDone());
    assertSameDraws(reference(extended, sixteen), extended.globalDraws());
    for (int c = 0; c < 3; c++) {
      for (int d = 0; d < 8; d++) {
        assertArrayEquals(first.globalDraws()[c][d], extended.globalDraws()[c][d]);
      }
    }
    JsonNode manifest = new ObjectMapper().readTree(out.resolve("g2/run.json").toFile());
    assertEquals(first.runDir(), manifest.at("/sampler/extends").asText());
    assertEquals(16, manifest.at("/sampler/sampling_sweeps").asInt());

    // the stores' draws too, against an uninterrupted run of 16 kept sweeps on Spark
    EstimateJob.Result whole = run(spark, sixteen, options("g3"));
    Dataset<Row> a = spark.read().parquet(out.resolve("g2/posterior/store_draws").toString());
    Dataset<Row> b = spark.read().parquet(out.resolve("g3/posterior/store_draws").toString());
    assertEquals((long) STORES * 3 * 16 * whole.problem().dims().kpsi(), a.count());
    assertEquals(a.count(), b.count());
    assertEquals(0, a.except(b).count(), "store draws of the extended run differ");

    // an extension stopped part-way continues with --resume alone, to the same draws
    EstimateJob.Result stopped = run(spark, sixteen,
        options("g4").withExtend(first.runDir()).withStopAtSweep(19));
    assertEquals(EstimateJob.Status.STOPPED, stopped.status());
    EstimateJob.Result resumed = run(spark, sixteen, options("g4").withResume(true));
    assertSameDraws(whole.globalDraws(), resumed.globalDraws());
    JsonNode resumedManifest = new ObjectMapper().readTree(out.resolve("g4/run.json").toFile());
    assertEquals(first.runDir(), resumedManifest.at("/sampler/extends").asText());
  }

  @Test
  void aRunThatMeetsItsLimitsEarlyStopsAndIsTheShorterRun() throws Exception {
    // limits every parameter meets as soon as there are draws to judge (R-hat <= 100, any ESS):
    // progress lines every 5 sweeps after 8 warmup sweeps, so the first judged one is sweep 15
    // (7 kept; at sweep 10 only 2 are kept, fewer than the diagnostics' minimum of 4)
    SamplerConfig early = new SamplerConfig(3, 8, 16, 1, 8, 0.8, 200, 4, 100, 0, 5, 2, 64, true,
        false, SamplerConfig.DEFAULT_MOMENTUM_PERSISTENCE, 1, true);
    SparkSession spark = spark("local[2]");
    EstimateJob.Result r = run(spark, early, options("e1"));
    assertEquals(EstimateJob.Status.CONVERGED, r.status());
    assertEquals(15, r.sweepsDone());
    // exactly the draws of a run made with 7 sampling sweeps
    assertSameDraws(reference(r, small(2, 64, 7)), r.globalDraws());
    JsonNode manifest = new ObjectMapper().readTree(out.resolve("e1/run.json").toFile());
    assertEquals(7, manifest.at("/sampler/sampling_sweeps").asInt());
    assertEquals(16, manifest.at("/sampler/sampling_sweeps_max").asInt());
    assertTrue(manifest.at("/sampler/stop_when_converged").asBoolean());
    Dataset<Row> s = spark.read().parquet(out.resolve("e1/posterior/store_draws").toString());
    assertEquals((long) STORES * 3 * 7 * r.problem().dims().kpsi(), s.count());

    // its final state is that of the 7-sweep run: extending it to 10 gives that run's draws
    SamplerConfig ten = small(2, 64, 10);
    EstimateJob.Result more = run(spark, ten, options("e2").withExtend(r.runDir()));
    assertEquals(18, more.sweepsDone());
    assertSameDraws(reference(more, ten), more.globalDraws());
  }

  @Test
  void aThinnedRunKeepsEveryOtherDrawOfTheSameChains() throws Exception {
    SamplerConfig all = small(2, 64, 8);
    SamplerConfig half = new SamplerConfig(3, 8, 8, 1, 8, 0.8, 200, 4, 1.01, 400, 5, 2, 64,
        true, false, SamplerConfig.DEFAULT_MOMENTUM_PERSISTENCE, 2, false);
    SparkSession spark = spark("local[2]");
    EstimateJob.Result thinned = run(spark, half, options("t2"));
    // the Spark loop against the in-process runner, both thinned
    assertSameDraws(reference(thinned, half), thinned.globalDraws());
    EstimateJob.Result every = run(spark, all, options("t1"));
    for (int c = 0; c < 3; c++) {
      assertEquals(4, thinned.globalDraws()[c].length);
      for (int d = 0; d < 4; d++) {
        assertArrayEquals(every.globalDraws()[c][2 * d + 1], thinned.globalDraws()[c][d]);
      }
    }
    Dataset<Row> s = spark.read().parquet(out.resolve("t2/posterior/store_draws").toString());
    assertEquals((long) STORES * 3 * 4 * thinned.problem().dims().kpsi(), s.count());
    JsonNode manifest = new ObjectMapper().readTree(out.resolve("t2/run.json").toFile());
    assertEquals(2, manifest.at("/sampler/thin").asInt());
    assertEquals(4, manifest.at("/sampler/kept_draws").asInt());
    assertEquals(8, manifest.at("/sampler/sampling_sweeps").asInt());
  }

  @Test
  void sweepsNeededScalesTheSlowestEssToTheLimit() {
    // bulk ESS 30 and 120 after 1,500 kept sweeps, limit 400: the slower one needs
    // 1,500 * 400 / 30 = 20,000 (hand arithmetic); constant draws (sd 0) and parameters already
    // above the limit do not count
    var slow = new aislecast.core.diag.ParameterSummary(0, 1, 0, 0, 0, 1.1, 30, 40, 0.1);
    var faster = new aislecast.core.diag.ParameterSummary(0, 1, 0, 0, 0, 1.02, 120, 90, 0.1);
    var held = new aislecast.core.diag.ParameterSummary(0, 0, 0, 0, 0, Double.NaN, Double.NaN,
        Double.NaN, 0);
    var fine = new aislecast.core.diag.ParameterSummary(0, 1, 0, 0, 0, 1.0, 900, 800, 0.01);
    assertEquals(20000, EstimateJob.sweepsNeeded(
        new aislecast.core.diag.ParameterSummary[] {faster, slow, held, fine}, 400, 1500));
    // 1,000 * 400 / 333 = 1,201.2, rounded up to a multiple of 100
    var near = new aislecast.core.diag.ParameterSummary(0, 1, 0, 0, 0, 1.0, 333, 300, 0.1);
    assertEquals(1300, EstimateJob.sweepsNeeded(
        new aislecast.core.diag.ParameterSummary[] {near}, 400, 1000));
    assertEquals(-1, EstimateJob.sweepsNeeded(
        new aislecast.core.diag.ParameterSummary[] {fine, held}, 400, 1500));
    // as a sampler.sampling value with thin 3: 1,300 rounded up to a multiple of 300
    assertEquals(1500, EstimateJob.samplingSweepsNeeded(
        new aislecast.core.diag.ParameterSummary[] {near}, 400, 1000, 3));
  }

  @Test
  void theSlowestParameterIsTheSmallestFiniteBulkEss() {
    // hand-made summaries: ESS 120, NaN (constant draws), 30, 30: the first 30 is the slowest
    var a = new aislecast.core.diag.ParameterSummary(0, 1, 0, 0, 0, 1.02, 120, 90, 0.1);
    var held = new aislecast.core.diag.ParameterSummary(0, 0, 0, 0, 0, Double.NaN, Double.NaN,
        Double.NaN, 0);
    var b = new aislecast.core.diag.ParameterSummary(0, 1, 0, 0, 0, 1.1, 30, 40, 0.1);
    var c = new aislecast.core.diag.ParameterSummary(0, 1, 0, 0, 0, 1.1, 30, 40, 0.1);
    assertEquals(2, EstimateJob.slowest(
        new aislecast.core.diag.ParameterSummary[] {a, held, b, c}));
    assertEquals(-1, EstimateJob.slowest(new aislecast.core.diag.ParameterSummary[] {held}));
    // configuration values print as written: no exponent, no trailing zeros
    assertEquals("400", EstimateJob.plain(400));
    assertEquals("0.01", EstimateJob.plain(0.01));
    assertEquals("0.0001", EstimateJob.plain(1e-4));
  }

  @Test
  void outputsHaveTheDocumentedColumnsAndOneSummaryRowPerGlobalParameter() throws Exception {
    SamplerConfig sc = small(2, 64);
    SparkSession spark = spark("local[2]");
    EstimateJob.Result r = run(spark, sc, options("e"));
    Path dir = out.resolve("e");
    assertEquals(dir.toAbsolutePath().toString(), r.runDir());

    Dataset<Row> g = spark.read().parquet(dir.resolve("posterior/global_draws").toString());
    assertArrayEquals(new String[] {"chain", "draw", "parameter", "value"}, g.columns());
    Dataset<Row> s = spark.read().parquet(dir.resolve("posterior/store_draws").toString());
    assertArrayEquals(new String[] {"store_id", "chain", "draw", "parameter", "value"},
        s.columns());
    int kpsi = r.problem().dims().kpsi();
    assertEquals((long) STORES * 3 * 8 * kpsi, s.count());
    assertEquals(List.of("L21", "a", "log_L11", "log_L22", "log_sigma"),
        s.select("parameter").distinct().orderBy("parameter").collectAsList().stream()
            .map(x -> x.getString(0)).toList());
    Dataset<Row> sum = spark.read().parquet(dir.resolve("posterior/summary").toString());
    assertArrayEquals(new String[] {"parameter", "mean", "sd", "q05", "q50", "q95", "rhat",
        "ess_bulk", "ess_tail", "mcse_mean"}, sum.columns());
    assertEquals(r.parameterNames().length, sum.count());
    assertEquals(r.parameterNames().length, sum.select("parameter").distinct().count());
    assertTrue(Files.isDirectory(dir.resolve("validation/rejects")));
    assertTrue(Files.isDirectory(dir.resolve(EstimateJob.CHECKPOINT_DIR)));

    JsonNode run = new ObjectMapper().readTree(dir.resolve("run.json").toFile());
    assertEquals(r.status().label, run.get("status").asText());
    assertEquals(SEED, run.get("seed").asLong());
    assertEquals(16, run.get("sampler").get("sweeps_done").asInt());
    assertNotNull(run.get("timings").get("sweeps_seconds"));
    assertEquals(3, run.get("configuration").get("sampler").get("chains").asInt());
    try (Stream<Path> left = Files.list(out)) {
      assertEquals(List.of("e"), left.map(p -> p.getFileName().toString()).toList(),
          "no staging or work folders are left behind");
    }

    // a warm start from this run starts its chains from the run's final state
    EstimateJob.Result warm = run(spark, sc, options("e2").withWarmStart(r.runDir()));
    assertNotEquals(EstimateJob.Status.STOPPED, warm.status());
    // same data, seed and settings as run e: only the starting point differs, so equal draws
    // would mean the warm start was ignored
    assertFalse(Arrays.deepEquals(r.globalDraws(), warm.globalDraws()));
  }

  @Test
  void exitCodeThreeWhenLimitsAreNotMetAndZeroWhenAllowed() throws Exception {
    Path conf = out.resolve("strict.yaml");
    Files.writeString(conf, String.join("\n",
        "sampler:",
        "  chains: 2",
        "  warmup: 4",
        "  sampling: 6",
        "  local_steps: 1",
        "  leapfrog_steps: 4",
        "  partitions: 2",
        "  rhat_max: 1.01",
        "  ess_min: 100000",
        // judged at sweeps 8 (4 kept) and 10, never met: the run goes to the end
        "  stop_when_converged: true",
        "  progress_every: 2",
        ""));
    spark("local[2]");
    String[] base = {"estimate", "--input", data.resolve("in").toString(), "--output",
        out.toString(), "--conf", conf.toString(), "--seed", "5"};
    StringWriter err = new StringWriter();
    StringWriter f1out = new StringWriter();
    int code = Main.commandLine().setErr(new PrintWriter(err, true))
        .setOut(new PrintWriter(f1out, true))
        .execute(concat(base, "--run-id", "f1"));
    assertEquals(3, code, err.toString());
    assertTrue(err.toString().contains("convergence limits not met"), err.toString());
    assertTrue(err.toString().contains("--extend"), err.toString());
    assertTrue(f1out.toString().contains("sampling sweeps per chain (this run made 6"),
        f1out.toString());
    // the check at sweep 8 (4 kept) says how far from the limits it is and goes on
    assertTrue(f1out.toString().contains("after 4 sampling sweeps"), f1out.toString());
    assertTrue(f1out.toString().contains("going on (sampler.stop_when_converged)"),
        f1out.toString());
    // and where its pace so far would meet the ESS limit: far beyond 4 sweeps for 100,000
    java.util.regex.Matcher near = java.util.regex.Pattern
        .compile("reaches the limit near (\\d+) sampling sweeps \\(\\d+:\\d\\d:\\d\\d from here\\)")
        .matcher(f1out.toString());
    assertTrue(near.find(), f1out.toString());
    assertTrue(Integer.parseInt(near.group(1)) > 100, near.group());
    JsonNode strict = new ObjectMapper().readTree(out.resolve("f1/run.json").toFile());
    assertEquals("not_converged", strict.get("status").asText());
    assertTrue(strict.get("convergence").get("failures").size() > 0);
    // no parameter can reach an ESS of 100,000 in 6 draws per chain: the extrapolation says how
    // many kept sweeps would (above 6), and the console says how to continue
    assertTrue(strict.at("/convergence/sampling_sweeps_needed_estimate").asInt() > 6,
        strict.get("convergence").toString());

    // the second run also sets variance prior scales far above any variance these data show,
    // so run.json and the console carry PriorPull's notes for sigma_p2 and the V_psi diagonal
    Path pulled = out.resolve("pulled.yaml");
    Files.writeString(pulled, Files.readString(conf)
        + "priors:\n  variance_scale: 100\n  v_psi_scale: 100\n");
    StringWriter console = new StringWriter();
    String[] withPrior = base.clone();
    withPrior[6] = pulled.toString();
    int allowed = Main.commandLine().setOut(new PrintWriter(console, true))
        .execute(concat(withPrior, "--run-id", "f2", "--allow-unconverged"));
    assertEquals(0, allowed);
    JsonNode loose = new ObjectMapper().readTree(out.resolve("f2/run.json").toFile());
    assertEquals("not_converged_allowed", loose.get("status").asText());
    List<String> notes = new java.util.ArrayList<>();
    loose.get("notes").forEach(n -> notes.add(n.asText()));
    assertTrue(notes.stream().anyMatch(n -> n.startsWith("prior of sigma_p2: its Inv-Gamma(2,"
        + " 100) scale is")), notes.toString());
    assertTrue(console.toString().contains("note: prior of sigma_p2:"), console.toString());
    assertTrue(notes.stream().anyMatch(n -> n.startsWith("prior of V_psi[0,0]: the Inv-Wishart"
        + " prior supplies about")), notes.toString());
    assertTrue(strict.get("notes").isArray(), "run.json always has a notes list");
    assertEquals(100.0, loose.at("/variance_priors/sigma_p2/scale").asDouble(), 0.0);
    assertEquals("variance_scale", loose.at("/variance_priors/sigma_p2_scale_from").asText());

    // the same loose scale, but sigma_p2's taken from the data: the scale is the residual
    // variance of log price on product dummies and log cost (commons-math3 least squares on the
    // simulator's own rows), and the note for sigma_p2 goes away
    Path auto = out.resolve("auto.yaml");
    Files.writeString(auto, Files.readString(conf)
        + "priors:\n  variance_scale: 100\n  price_noise_scale: auto\n");
    StringWriter autoConsole = new StringWriter();
    String[] withAuto = base.clone();
    withAuto[6] = auto.toString();
    assertEquals(0, Main.commandLine().setOut(new PrintWriter(autoConsole, true))
        .execute(concat(withAuto, "--run-id", "f3", "--allow-unconverged")));
    JsonNode fromData = new ObjectMapper().readTree(out.resolve("f3/run.json").toFile());
    double expected = leastSquaresLogPriceVariance(
        DemandSimulator.simulate(SimSettings.demo().withSizes(STORES, 6, 5, 2, 2, 30)));
    assertEquals(expected, fromData.at("/variance_priors/sigma_p2/scale").asDouble(),
        1e-9 * expected);
    assertEquals(100.0, fromData.at("/variance_priors/sigma_xi2/scale").asDouble(), 0.0);
    assertTrue(fromData.at("/variance_priors/sigma_p2_scale_from").asText().startsWith("auto"));
    List<String> autoNotes = new java.util.ArrayList<>();
    fromData.get("notes").forEach(n -> autoNotes.add(n.asText()));
    assertTrue(autoNotes.stream().noneMatch(n -> n.startsWith("prior of sigma_p2")),
        autoNotes.toString());
    assertTrue(autoConsole.toString().contains("prior: sigma_p2 ~ Inv-Gamma(2, "),
        autoConsole.toString());
  }

  /** Residual variance of log price on product dummies and log unit cost (commons-math3). */
  private static double leastSquaresLogPriceVariance(aislecast.core.sim.SimulatedData sim) {
    int nJ = sim.products();
    double[] y = new double[sim.rows];
    double[][] x = new double[sim.rows][nJ + 1];
    for (int i = 0; i < sim.rows; i++) {
      y[i] = Math.log(sim.price[i]);
      x[i][sim.rowProduct[i]] = 1.0;
      x[i][nJ] = Math.log(sim.unitCost[i]);
    }
    var ols = new org.apache.commons.math3.stat.regression.OLSMultipleLinearRegression();
    ols.setNoIntercept(true);
    ols.newSampleData(y, x);
    return ols.estimateErrorVariance();
  }

  private static String[] concat(String[] a, String... b) {
    String[] r = Arrays.copyOf(a, a.length + b.length);
    System.arraycopy(b, 0, r, a.length, b.length);
    return r;
  }
}
