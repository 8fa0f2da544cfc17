package aislecast.bench;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Arrays;
import java.util.concurrent.TimeUnit;
import org.openjdk.jmh.annotations.Mode;
import org.openjdk.jmh.results.Result;

/**
 * Runs {@link ShareKernelBench} (1 fork, 3 warm-up and 5 measured iterations of 1 s each, about
 * a minute) and prints ns per shopper-product with the ratio to the naive baseline.
 *
 * <p>{@code java -jar benchmarks.jar} prints the table; {@code java -jar benchmarks.jar -jmh ...}
 * hands the remaining arguments to JMH's own command line instead.
 */
public final class KernelTable {
  /** Target for the factored path when only delta moves. */
  private static final double TARGET_NS = 1.5;

  private static final String[][] ROWS = {
      {"naive", "(a) naive: tastes, utility, Math.exp per element, normalise"},
      {"direct", "(b) ShareKernel.shares (direct, log-sum-exp)"},
      {"factored", "(c) FactoredShares.shares (delta moves)"},
      {"factoredWithProbs", "(c') FactoredShares.shares + shopper probabilities"},
      {"prepare", "(d) FactoredShares.prepare (psi or prices move)"},
      {"tastesAndPrepare", "(e) tastes + utilities + prepare (full psi move)"},
  };

  private KernelTable() {}

  public static void main(String[] args) throws Exception {
    if (args.length > 0 && args[0].equals("-jmh")) {
      org.openjdk.jmh.Main.main(Arrays.copyOfRange(args, 1, args.length));
      return;
    }
    System.out.println("Share kernel benchmark: 1 fork, 3 x 1 s warm-up, 5 x 1 s measured per row"
        + " (about a minute) ...");
    print(JmhTable.run(ShareKernelBench.class, Mode.AverageTime, TimeUnit.NANOSECONDS));
  }

  private static void print(JmhTable results) {
    int r = Integer.parseInt(results.param("shoppers"));
    int j = Integer.parseInt(results.param("products"));
    int kx = Integer.parseInt(results.param("attributes"));
    double elements = (double) r * j;
    System.out.printf("%nR = %d shoppers, J = %d products, Kx = %d; %s %s, %s, %d cores%n", r, j, kx,
        System.getProperty("java.vm.name"), System.getProperty("java.vm.version"), cpuModel(),
        Runtime.getRuntime().availableProcessors());
    System.out.printf("%-56s %12s %16s %10s%n", "kernel", "ns/market", "ns/shopper-prod", "vs naive");
    double naive = Double.NaN;
    double factored = Double.NaN;
    for (String[] row : ROWS) {
      Result<?> res = results.find(row[0]);
      if (res == null) {
        continue;
      }
      double perElement = res.getScore() / elements;
      double err = res.getScoreError() / elements;
      if (row[0].equals("naive")) {
        naive = perElement;
      }
      if (row[0].equals("factored")) {
        factored = perElement;
      }
      String ratio = Double.isNaN(naive) ? "" : String.format("%.2fx", naive / perElement);
      System.out.printf("%-56s %12.0f %9.3f +-%5.3f %10s%n", row[1], res.getScore(), perElement, err,
          ratio);
    }
    System.out.printf("(+- is JMH's 99.9%% confidence half-width; 'vs naive' is the speed-up.)%n");
    System.out.printf("Target for (c): at most %.1f ns per shopper-product: %s (%.3f)%n", TARGET_NS,
        factored <= TARGET_NS ? "met" : "MISSED", factored);
  }

  private static String cpuModel() {
    try {
      for (String line : Files.readAllLines(Path.of("/proc/cpuinfo"))) {
        if (line.startsWith("model name")) {
          return line.substring(line.indexOf(':') + 1).trim();
        }
      }
    } catch (Exception e) {
      // not Linux: the model is only informative
    }
    return "cpu unknown";
  }
}
