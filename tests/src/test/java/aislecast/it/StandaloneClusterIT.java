package aislecast.it;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import java.util.stream.Stream;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.MethodOrderer;
import org.junit.jupiter.api.Order;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.TestInstance;
import org.junit.jupiter.api.TestMethodOrder;
import org.junit.jupiter.api.io.TempDir;

/**
 * The packaged jar on a real Spark standalone cluster: a master and one worker (2 cores) as
 * separate JVMs on 127.0.0.1, applications submitted through spark-submit's main class
 * ({@code org.apache.spark.deploy.SparkSubmit}, client mode, so the driver is its own JVM too),
 * executors started by the worker. Small data simulated by {@code aislecast generate}
 * (4 stores, 6 weeks, 5 products), 2 chains x 60 sweeps.
 *
 * <p>The reference is the same jar under {@code java -jar ... --master local[2]}. Draws are keyed
 * by (seed, chain, store, sweep) and the driver adds store statistics in a fixed order (DESIGN
 * section 5), so every run here must give bit-identical Parquet outputs, compared row by row
 * through DuckDB (an engine independent of Spark).
 *
 * <p>Faults: an executor JVM killed (SIGKILL) mid-estimation, and the driver JVM killed after a
 * checkpoint and the run continued with {@code --resume}.
 */
@TestInstance(TestInstance.Lifecycle.PER_CLASS)
@TestMethodOrder(MethodOrderer.OrderAnnotation.class)
class StandaloneClusterIT {
  private static final String MAIN = "aislecast.jobs.cli.Main";
  private static final String EXECUTOR_MAIN = "org.apache.spark.executor.CoarseGrainedExecutorBackend";
  /** Sweeps between checkpoints; the faults are injected once the first one is complete. */
  private static final int CHECKPOINT_EVERY = 10;
  private static final Duration RUN_TIMEOUT = Duration.ofMinutes(6);
  /**
   * Spark SQL settings for every run, local and cluster alike: on a few hundred rows, generating
   * and compiling code per query and adaptive re-planning cost more than they save (measured
   * on the shared 2-core machine, one local run: validation 34 s to 20 s, whole run 55 s to
   * 32 s). They do not change any value the job computes.
   */
  private static final List<String> SQL_SETTINGS = List.of(
      "spark.sql.codegen.wholeStage=false", "spark.sql.adaptive.enabled=false");

  /**
   * For every JVM here (drivers, executors, master, worker): short-lived, on tiny data, so the
   * C2 compiler and parallel GC threads cost more CPU than they save (measured on the shared
   * 2-core machine, one local estimate: 52 s user CPU with defaults, 24 s with these). Java
   * semantics fix every floating-point result whichever JIT tier runs the code.
   */
  private static final List<String> JIT_FLAGS = List.of("-XX:TieredStopAtLevel=1",
      "-XX:+UseSerialGC");

  private final Path builtJar = Path.of(System.getProperty("aislecast.jar",
      "../jobs/target/aislecast.jar")).toAbsolutePath().normalize();
  /** A private copy, so a rebuild of the jar during the test cannot change what runs. */
  private Path jar;

  @TempDir static Path tmp;
  private Path input;
  private Path out;
  private Path conf;
  private Path scenario;
  private Path workerDir;
  private Jvms jvms;
  private String masterUrl;
  private Process master;
  private Process worker;

  @BeforeAll
  void startClusterAndReference() throws Exception {
    assertTrue(Files.isRegularFile(builtJar), "launcher jar " + builtJar + " is missing; build"
        + " it with 'mvn -B package' (mvn verify does this before the integration tests)");
    jar = Files.copy(builtJar, tmp.resolve("aislecast.jar"));
    // The worker starts executors with $SPARK_HOME/jars/* on the classpath (there is no Spark
    // distribution here): a folder whose jars/ holds the shaded jar, marked as a release so
    // Spark's launcher looks in jars/ rather than in a source build.
    Path sparkHome = Files.createDirectories(tmp.resolve("spark-home"));
    Files.createDirectories(sparkHome.resolve("jars"));
    Files.createSymbolicLink(sparkHome.resolve("jars/aislecast.jar"), jar);
    Files.writeString(sparkHome.resolve("RELEASE"), "aislecast test stand-in for Spark 4.1.1\n");
    Path logs = Files.createDirectories(Path.of("target", "cluster-it-logs").toAbsolutePath());
    jvms = new Jvms(logs, Map.of("SPARK_HOME", sparkHome.toString(),
        "SPARK_SCALA_VERSION", "2.13", "SPARK_LOCAL_IP", "127.0.0.1"));
    input = tmp.resolve("in");
    out = Files.createDirectories(tmp.resolve("out"));
    workerDir = Files.createDirectories(tmp.resolve("worker"));

    int port = Jvms.freePort();
    masterUrl = "spark://127.0.0.1:" + port;
    master = jvms.start("master", jvm(List.of("-Xmx256m", "-Dspark.master.rest.enabled=false",
        "-cp", jar.toString(), "org.apache.spark.deploy.master.Master",
        "--host", "127.0.0.1", "--port", Integer.toString(port),
        "--webui-port", Integer.toString(Jvms.freePort()))));
    worker = jvms.start("worker", jvm(List.of("-Xmx256m", "-cp", jar.toString(),
        "org.apache.spark.deploy.worker.Worker", masterUrl, "--host", "127.0.0.1",
        "--cores", "2", "--memory", "2g", "--work-dir", workerDir.toString(),
        "--webui-port", Integer.toString(Jvms.freePort()))));

    // While the cluster comes up: data, configuration, and the local[2] reference runs.
    int gen = jvms.await(jvms.start("generate", List.of("-jar", jar.toString(), "generate",
        "--output", input.toString(), "--stores", "4", "--weeks", "6", "--products", "5",
        "--owners", "2", "--attributes", "2", "--shoppers-draws", "30")), "generate",
        Duration.ofMinutes(2));
    assertEquals(0, gen, jvms.logText("generate"));
    conf = tmp.resolve("small.yaml");
    Files.writeString(conf, String.join("\n",
        "sampler:",
        "  chains: 2",
        "  warmup: 30",
        "  sampling: 30",
        "  local_steps: 1",
        "  leapfrog_steps: 8",
        "  checkpoint_every: " + CHECKPOINT_EVERY,
        "  progress_every: " + CHECKPOINT_EVERY,
        "  partitions: 2",
        ""));
    // owner name as printed by 'generate' for the demo's own portfolio
    scenario = tmp.resolve("up3.yaml");
    Files.writeString(scenario, String.join("\n",
        "settings:",
        "  base_weeks: 1",
        "  draws: 0",
        "  portfolio: [Brightwater Beverages]",
        "scenarios:",
        "  - name: up3",
        "    responses: [hold, nash]",
        "    price_changes:",
        "      - owners: [portfolio]",
        "        percent: 3",
        ""));
    assertEquals(0, runLocal("local-estimate", estimateArgs("local")));
    assertEquals(0, runLocal("local-scenarios", scenarioArgs("local-scen", "local")));

    Jvms.waitFor(() -> registered() || !master.isAlive() || !worker.isAlive(),
        Duration.ofMinutes(3));
    assertTrue(registered() && master.isAlive() && worker.isAlive(),
        "worker did not register; master log:\n" + Jvms.tail(jvms.logText("master"))
            + "\nworker log:\n" + Jvms.tail(jvms.logText("worker")));
  }

  private boolean registered() {
    return jvms.logText("worker").contains("Successfully registered with master");
  }

  @AfterAll
  void stopEverything() {
    if (jvms != null) {
      jvms.close();
    }
  }

  @Test
  @Order(1)
  void estimateAndScenariosOnTheClusterEqualLocal() throws Exception {
    int before = appDirs().size();
    assertEquals(0, submitAndWait("cluster-estimate", estimateArgs("cluster")));
    assertSameDraws("local", "cluster");
    List<Path> apps = appDirs();
    assertEquals(before + 1, apps.size(), "one application ran on the worker");
    // the sweeps really ran in an executor the worker started, not in the driver
    assertTrue(executorLog(apps.get(apps.size() - 1), 0).contains("Finished task"),
        "executor 0 of " + apps.get(apps.size() - 1) + " ran no task");

    assertEquals(0, submitAndWait("cluster-scenarios", scenarioArgs("cluster-scen", "cluster")));
    List<String> tables = parquetTables(out.resolve("local-scen"));
    assertTrue(tables.contains("scenarios/store_summary"), "tables: " + tables);
    assertTrue(tables.contains("scenarios/product_detail"), "tables: " + tables);
    assertEquals(tables, parquetTables(out.resolve("cluster-scen")));
    for (String t : tables) {
      int rows = ParquetRows.assertSame(out.resolve("local-scen").resolve(t),
          out.resolve("cluster-scen").resolve(t));
      assertTrue(rows > 0 || t.startsWith("validation/"), "no rows in " + t);
    }
  }

  @Test
  @Order(2)
  void executorKilledMidEstimationGivesTheSameDraws() throws Exception {
    String runId = "executor-loss";
    int before = appDirs().size();
    Process driver = submit("executor-loss", estimateArgs(runId));
    try {
      awaitCheckpoint(driver, "executor-loss", runId);
      assertFalse(Files.exists(out.resolve(runId)), "run finished before the fault");
      List<Path> apps = appDirs();
      assertEquals(before + 1, apps.size(), "application folder on the worker");
      Path app = apps.get(apps.size() - 1);
      Optional<ProcessHandle> executor = jvms.descendantWith(EXECUTOR_MAIN);
      assertTrue(executor.isPresent(), "no executor JVM under the worker");
      assertTrue(executor.get().info().commandLine().orElse("").contains(app.getFileName()
          .toString()), "the executor belongs to " + app.getFileName());
      Jvms.kill(executor.get());
      int code = jvms.await(driver, "executor-loss", RUN_TIMEOUT);
      assertEquals(0, code, Jvms.tail(jvms.logText("executor-loss")));
      // the worker saw the executor die and the master had it start another one
      String killed = app.getFileName() + "/0 finished with state";
      assertTrue(jvms.logText("worker").lines()
              .anyMatch(l -> l.contains(killed) && l.contains("exited with code 137")),
          "worker log has no SIGKILLed executor 0:\n" + Jvms.tail(jvms.logText("worker")));
      assertTrue(executorLog(app, 1).contains("Finished task"),
          "the replacement executor ran no task");
    } finally {
      Jvms.kill(driver);
    }
    assertSameDraws("local", runId);
  }

  @Test
  @Order(3)
  void driverKilledAfterACheckpointResumesToTheSameDraws() throws Exception {
    String runId = "driver-loss";
    Process driver = submit("driver-loss", estimateArgs(runId));
    try {
      awaitCheckpoint(driver, "driver-loss", runId);
    } finally {
      Jvms.kill(driver);
    }
    assertNotEquals(0, driver.exitValue(), "the driver was killed");
    assertFalse(Files.exists(out.resolve(runId)), "a killed run must not be published");

    List<String> resume = new ArrayList<>(estimateArgs(runId));
    resume.add("--resume");
    assertEquals(0, submitAndWait("driver-loss-resume", resume));
    String log = jvms.logText("driver-loss-resume");
    Matcher m = Pattern.compile("resuming after sweep (\\d+) of (\\d+)").matcher(log);
    assertTrue(m.find(), Jvms.tail(log));
    int from = Integer.parseInt(m.group(1));
    assertTrue(from >= CHECKPOINT_EVERY && from < Integer.parseInt(m.group(2)),
        "resumed after sweep " + from);
    assertSameDraws("local", runId);
  }

  // ---- helpers ----

  private List<String> estimateArgs(String runId) {
    return List.of("estimate", "--input", input.toString(), "--output", out.toString(),
        "--conf", conf.toString(), "--run-id", runId, "--allow-unconverged");
  }

  private List<String> scenarioArgs(String runId, String posteriorRun) {
    return List.of("scenarios", "--input", input.toString(), "--output", out.toString(),
        "--conf", conf.toString(), "--run-id", runId,
        "--posterior", out.resolve(posteriorRun).toString(), "--scenario", scenario.toString());
  }

  private static List<String> jvm(List<String> args) {
    List<String> all = new ArrayList<>(JIT_FLAGS);
    all.addAll(Jvms.OPENS);
    all.addAll(args);
    return all;
  }

  /** The reference: plain {@code java -jar} with the embedded local[2] master. */
  private int runLocal(String name, List<String> appArgs) throws Exception {
    List<String> args = new ArrayList<>(JIT_FLAGS);
    args.add("-Xmx1g");
    SQL_SETTINGS.forEach(kv -> args.add("-D" + kv));
    args.addAll(List.of("-jar", jar.toString()));
    args.addAll(appArgs);
    args.addAll(List.of("--master", "local[2]"));
    int code = jvms.await(jvms.start(name, args), name, RUN_TIMEOUT);
    if (code != 0) {
      System.err.println(Jvms.tail(jvms.logText(name)));
    }
    return code;
  }

  /**
   * spark-submit in client mode. The jar is given as {@code local:} (already on every node,
   * here through $SPARK_HOME/jars), so executors do not copy its 300 MB from the driver.
   */
  private Process submit(String name, List<String> appArgs) throws IOException {
    List<String> args = jvm(List.of("-Xmx1g", "-cp", jar.toString(),
        "org.apache.spark.deploy.SparkSubmit", "--master", masterUrl, "--deploy-mode", "client",
        "--class", MAIN, "--executor-memory", "1g",
        // local[2] uses one shuffle partition per core: the same here, for the same plans
        "--conf", "spark.sql.shuffle.partitions=2",
        "--conf", "spark.ui.enabled=false",
        // Spark adds its --add-opens flags to executors itself
        "--conf", "spark.executor.extraJavaOptions=" + String.join(" ", JIT_FLAGS)));
    SQL_SETTINGS.forEach(kv -> args.addAll(List.of("--conf", kv)));
    args.add("local://" + jar);
    args.addAll(appArgs);
    return jvms.start(name, args);
  }

  private int submitAndWait(String name, List<String> appArgs) throws Exception {
    int code = jvms.await(submit(name, appArgs), name, RUN_TIMEOUT);
    if (code != 0) {
      System.err.println(Jvms.tail(jvms.logText(name)));
    }
    return code;
  }

  /**
   * Waits until the run has a complete mid-run checkpoint (driver.bin is written last; the
   * final state goes to the staging folder instead, so one here means sweeps remain).
   */
  private void awaitCheckpoint(Process driver, String name, String runId) throws Exception {
    Path dir = out.resolve(".work-" + runId).resolve("_checkpoint");
    boolean reached = Jvms.waitFor(() -> hasCheckpoint(dir) || !driver.isAlive(), RUN_TIMEOUT);
    assertTrue(reached && driver.isAlive() && hasCheckpoint(dir), "no checkpoint in " + dir
        + " while the driver ran; its log:\n" + Jvms.tail(jvms.logText(name)));
  }

  private static boolean hasCheckpoint(Path dir) {
    try (Stream<Path> s = Files.list(dir)) {
      return s.anyMatch(p -> Files.exists(p.resolve("driver.bin")));
    } catch (IOException e) {
      return false; // not created yet, or replaced while listing
    }
  }

  private void assertSameDraws(String expectedRun, String actualRun) {
    for (String t : List.of("posterior/global_draws", "posterior/store_draws")) {
      int rows = ParquetRows.assertSame(out.resolve(expectedRun).resolve(t),
          out.resolve(actualRun).resolve(t));
      assertTrue(rows > 0, "no draws in " + t);
    }
  }

  /** Application folders the worker created, oldest first. */
  private List<Path> appDirs() throws IOException {
    try (Stream<Path> s = Files.list(workerDir)) {
      return s.filter(p -> p.getFileName().toString().startsWith("app-")).sorted().toList();
    }
  }

  private static String executorLog(Path appDir, int executor) throws IOException {
    Path f = appDir.resolve(Integer.toString(executor)).resolve("stderr");
    return Files.exists(f) ? Files.readString(f) : "";
  }

  /** Folders under a run folder that hold Parquet files directly or in partition folders. */
  private static List<String> parquetTables(Path runDir) throws IOException {
    List<String> tables = new ArrayList<>();
    try (Stream<Path> s = Files.walk(runDir)) {
      for (Path f : s.filter(p -> p.toString().endsWith(".parquet")).toList()) {
        Path dir = f.getParent();
        while (dir.getFileName().toString().contains("=")) {
          dir = dir.getParent();
        }
        String rel = runDir.relativize(dir).toString();
        if (!tables.contains(rel)) {
          tables.add(rel);
        }
      }
    }
    tables.sort(null);
    return tables;
  }
}
