package aislecast.jobs.estimate;

import aislecast.core.globals.Dims;
import aislecast.core.globals.Globals;
import aislecast.core.sim.DemandSimulator;
import aislecast.core.sim.SimSettings;
import aislecast.core.sim.SimulatedData;
import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.nio.file.Path;
import java.util.HashMap;
import java.util.Map;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;

/**
 * Manual probe (not a test): how many of an {@code estimate} run's 90% intervals cover the true
 * globals of data made by {@code generate}. The truth is rebuilt from the settings recorded in
 * the data folder's {@code truth.json} (the simulator is deterministic given them), the intervals
 * are read from the run's {@code posterior/summary}.
 *
 * <p>Usage: {@code CoverageProbe <data dir> <run dir>}, on the jobs test class path.
 */
public final class CoverageProbe {
  private CoverageProbe() {}

  public static void main(String[] args) throws Exception {
    JsonNode s = new ObjectMapper().readTree(Path.of(args[0], "truth.json").toFile())
        .get("settings");
    SimSettings settings = SimSettings.demo().withSeed(s.get("seed").asLong())
        .withSizes(s.get("stores").asInt(), s.get("weeks").asInt(), s.get("products").asInt(),
            s.get("owners").asInt(), s.get("attributes").asInt(), s.get("draws").asInt())
        .withShoppers(s.get("shoppersMin").asInt(), s.get("shoppersMax").asInt());
    SimulatedData sim = DemandSimulator.simulate(settings);
    Dims dims = new Dims(2, settings.psiDim(), sim.products(), 1, 1);
    Globals truth = new Globals(dims, sim.gamma, sim.vPsi, sim.kappabar,
        settings.tau() * settings.tau(), new double[] {settings.displayEffect()},
        settings.sigmaXi() * settings.sigmaXi(), sim.pi0,
        new double[] {settings.costPassThrough()}, settings.lambda(),
        settings.sigmaP() * settings.sigmaP());
    String[] names = Globals.parameterNames(dims);
    double[] flat = truth.toFlat();
    SparkSession spark = SparkSession.builder().master("local[1]").appName("coverage")
        .config("spark.ui.enabled", "false").getOrCreate();
    Map<String, Row> rows = new HashMap<>();
    for (Row r : spark.read().parquet(Path.of(args[1], "posterior", "summary").toString())
        .collectAsList()) {
      rows.put(r.getAs("parameter"), r);
    }
    spark.stop();
    Map<String, int[]> groups = new java.util.TreeMap<>();
    int covered = 0;
    for (int p = 0; p < names.length; p++) {
      Row r = rows.get(names[p]);
      if (r == null) {
        throw new IllegalStateException("no summary row for " + names[p]);
      }
      double q05 = r.getAs("q05");
      double q95 = r.getAs("q95");
      boolean in = flat[p] >= q05 && flat[p] <= q95;
      covered += in ? 1 : 0;
      int[] g = groups.computeIfAbsent(names[p].replaceAll("\\[.*", ""), k -> new int[2]);
      g[0] += in ? 1 : 0;
      g[1]++;
      if (!in) {
        System.out.printf("  outside: %-14s truth %9.4f  90%% [%9.4f, %9.4f]  rhat %.3f%n",
            names[p], flat[p], q05, q95, (double) r.getAs("rhat"));
      }
    }
    groups.forEach((k, v) -> System.out.printf("%-10s %d of %d covered%n", k, v[0], v[1]));
    System.out.printf("covered %d of %d (%.0f%%)%n", covered, names.length,
        100.0 * covered / names.length);
  }
}
