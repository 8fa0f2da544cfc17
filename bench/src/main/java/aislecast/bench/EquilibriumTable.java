package aislecast.bench;

import aislecast.core.equilibrium.SolveInfo;
import java.util.concurrent.TimeUnit;
import org.openjdk.jmh.annotations.Mode;
import org.openjdk.jmh.results.Result;

/**
 * Runs {@link EquilibriumBench} (1 fork, 3 warm-up and 5 measured iterations of 1 s each, single
 * thread, about a minute) and prints solves per core-second next to the naive Newton baseline.
 *
 * <p>{@code java -cp bench/target/benchmarks.jar aislecast.bench.EquilibriumTable}
 */
public final class EquilibriumTable {
  /** Target: nash solves per core-second at R = 200, J = 24. */
  private static final double TARGET = 2000;

  private static final String[][] ROWS = {
      {"naiveNewton", "(a) naive: Newton on the FOC, finite-difference Jacobian"},
      {"nash", "(b) nash: zeta-markup fixed point (EquilibriumSolver)"},
      {"hold", "(c) hold: market at the scenario prices"},
      {"scenarioNash", "(d) ScenarioEvaluator.evaluate, nash (load + solve + outputs)"},
      {"scenarioHold", "(e) ScenarioEvaluator.evaluate, hold"},
      {"scenarioBase", "(f) ScenarioEvaluator.base (load + FOC costs + outputs)"},
  };

  private EquilibriumTable() {}

  public static void main(String[] args) throws Exception {
    EquilibriumBench probe = new EquilibriumBench();
    probe.shoppers = 200;
    probe.products = 24;
    probe.owners = 4;
    probe.attributes = 3;
    probe.setUp();
    SolveInfo info = probe.nashInfo();
    int newtonIterations = probe.newtonIterations();
    System.out.println("Equilibrium benchmark: 1 fork, 3 x 1 s warm-up, 5 x 1 s measured per row,"
        + " one thread (about a minute) ...");
    JmhTable results = JmhTable.run(EquilibriumBench.class, Mode.Throughput, TimeUnit.SECONDS);
    double[] cpuRate = cpuTimeRates(probe);
    System.out.printf("%nR = %s shoppers, J = %s products, %s owners, Kx = %s; scenario: 5%% cut on"
        + " one product, the other %d re-set; %s %s, %d cores%n",
        results.param("shoppers"), results.param("products"),
        results.param("owners"), results.param("attributes"),
        Integer.parseInt(results.param("products")) - 1,
        System.getProperty("java.vm.name"), System.getProperty("java.vm.version"),
        Runtime.getRuntime().availableProcessors());
    System.out.printf("nash: %d zeta iterations, residual max|FOC|/s = %.2e; baseline: %d Newton"
        + " steps (each J FOC evaluations)%n", info.iterations(), info.residual(), newtonIterations);
    System.out.printf("%-62s %16s %10s %10s %14s%n", "solver", "solves/s (JMH)", "us/solve",
        "vs naive", "solves/cpu-s");
    double naive = Double.NaN;
    double nash = Double.NaN;
    for (int i = 0; i < ROWS.length; i++) {
      String[] row = ROWS[i];
      Result<?> res = results.find(row[0]);
      if (res == null) {
        continue;
      }
      double score = res.getScore();
      if (row[0].equals("naiveNewton")) {
        naive = score;
      }
      if (row[0].equals("nash")) {
        nash = score;
      }
      String ratio = Double.isNaN(naive) ? "" : String.format("%.1fx", score / naive);
      System.out.printf("%-62s %9.0f +-%5.0f %10.1f %10s %14.0f%n", row[1], score,
          res.getScoreError(), 1e6 / score, ratio, cpuRate[i]);
    }
    System.out.printf("(+- is JMH's 99.9%% confidence half-width of wall-clock throughput, one"
        + " thread; solves/cpu-s counts the benchmark thread's own CPU time over %.0f s per row,"
        + " after JMH's warm-up, so other load on the machine does not count against it.)%n",
        CPU_SECONDS);
    double nashCpu = cpuRate[1];
    System.out.printf("Target for (b): at least %.0f nash solves per core-second: %s (JMH %.0f,"
        + " per CPU-second %.0f); load average now %.1f%n", TARGET,
        Math.max(nash, nashCpu) >= TARGET ? "met" : "MISSED", nash, nashCpu,
        java.lang.management.ManagementFactory.getOperatingSystemMXBean().getSystemLoadAverage());
  }

  private static final double CPU_SECONDS = 2.0;

  /** Per row of ROWS, calls per second of this thread's CPU time (warm-up first). */
  private static double[] cpuTimeRates(EquilibriumBench b) {
    java.lang.management.ThreadMXBean mx = java.lang.management.ManagementFactory.getThreadMXBean();
    java.util.List<java.util.function.DoubleSupplier> calls = java.util.List.of(
        b::naiveNewton, b::nash, b::hold, () -> b.scenarioNash().solve().residual(),
        () -> b.scenarioHold().scenario().outsideShare(),
        () -> b.scenarioBase().outcome().outsideShare());
    double[] rates = new double[calls.size()];
    double sink = 0;
    for (int i = 0; i < calls.size(); i++) {
      java.util.function.DoubleSupplier call = calls.get(i);
      long warm = mx.getCurrentThreadCpuTime();
      while (mx.getCurrentThreadCpuTime() - warm < 1_000_000_000L) {
        sink += call.getAsDouble();
      }
      long start = mx.getCurrentThreadCpuTime();
      long n = 0;
      long used;
      do {
        for (int k = 0; k < 10; k++) {
          sink += call.getAsDouble();
        }
        n += 10;
        used = mx.getCurrentThreadCpuTime() - start;
      } while (used < CPU_SECONDS * 1e9);
      rates[i] = n / (used / 1e9);
    }
    if (sink == 42.4242) {
      System.out.println(sink); // keeps the calls alive
    }
    return rates;
  }
}
