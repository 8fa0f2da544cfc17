package aislecast.jobs.report;

import aislecast.jobs.scenario.RecommendJob;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.SplittableRandom;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.RowFactory;
import org.apache.spark.sql.SaveMode;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.types.DataType;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.StructField;
import org.apache.spark.sql.types.StructType;

/**
 * Three small run folders in the documented layout (README / DESIGN section 7), filled with
 * seeded synthetic numbers, so the report is tested without running estimation: an estimation
 * run ({@code posterior/global_draws}, {@code posterior/summary}, {@code run.json}), a scenarios
 * run naming it ({@code scenarios/store_summary}, {@code scenarios/region_summary} partitioned
 * by scenario, {@code elasticities}) and a recommend run ({@code recommendations}).
 */
final class SyntheticRuns {
  static final int CHAINS = 4;
  static final int DRAWS = 250;
  static final List<String> GLOBALS = List.of("Gamma[0,0]", "Gamma[0,1]", "Gamma[1,0]",
      "V_psi[0,0]", "kappabar[0]", "kappabar[1]", "kappabar[2]", "kappabar[3]", "tau2",
      "gamma[0]", "sigma_xi2", "pi0[0]", "pi[0]", "lambda", "sigma_p2");
  /** The one parameter given an R-hat beyond the run's limit of 1.01. */
  static final String SLOW_PARAMETER = "kappabar[1]";
  static final double SLOW_RHAT = 1.057;
  static final String[] REGIONS = {"Harbourside", "Millbrook Vale", "Upper Thorn"};
  static final int STORES = 12;
  static final String[] PRODUCTS = {"FZ01", "FZ02", "FZ03", "OK11", "OK12", "PL20"};
  /** A note the estimate run's run.json carries (as PriorPull writes them). */
  static final String RUN_NOTE = "prior of sigma_p2: its Inv-Gamma(2, 0.5) scale is 60 times the"
      + " posterior mean 0.0083, so the prior pushes this variance up";
  static final List<String> SCENARIOS = List.of("cut-fz01-hold", "cut-fz01-nash");
  /** Digests in the estimate run's run.json, shaped as RunIdentity writes them. */
  static final String INPUT_SHA256 =
      "3b1f0c9e7a2d4c6b8e0f1a2b3c4d5e6f7a8b9c0d1e2f3a4b5c6d7e8f9a0b1c2d";
  static final String CONFIGURATION_SHA256 =
      "c0ffee00d15ea5e5feedfacecafebeef0123456789abcdef0123456789abcdef";
  /** Input files fingerprinted: path and size (sum 1,088,367 bytes). */
  static final Map<String, Long> INPUT_FILES =
      Map.of("sales.csv", 1_082_936L, "products.csv", 2_311L, "stores.csv", 3_120L);

  final Path estimate;
  final Path scenarios;
  final Path recommend;
  /** "region/scenario" -> the median change written to region_summary. */
  final Map<String, Double> regionMedian = new LinkedHashMap<>();

  private SyntheticRuns(Path root) {
    estimate = root.resolve("est-1");
    scenarios = root.resolve("scen-1");
    recommend = root.resolve("rec-1");
  }

  static String storeId(int s) {
    return String.format("ST%02d", s + 1);
  }

  static String region(int s) {
    return REGIONS[s % REGIONS.length];
  }

  private static StructField f(String name, DataType t) {
    return DataTypes.createStructField(name, t, true);
  }

  private static final DataType S = DataTypes.StringType;
  private static final DataType I = DataTypes.IntegerType;
  private static final DataType L = DataTypes.LongType;
  private static final DataType D = DataTypes.DoubleType;

  static SyntheticRuns write(SparkSession spark, Path root, long seed) throws IOException {
    SyntheticRuns r = new SyntheticRuns(root);
    SplittableRandom rng = new SplittableRandom(seed);
    r.writeEstimate(spark, rng);
    r.writeScenarios(spark, rng);
    r.writeRecommend(spark, rng);
    return r;
  }

  private void writeEstimate(SparkSession spark, SplittableRandom rng) throws IOException {
    List<Row> draws = new ArrayList<>();
    List<Row> summary = new ArrayList<>();
    for (int p = 0; p < GLOBALS.size(); p++) {
      String name = GLOBALS.get(p);
      double centre = name.startsWith("sigma") || name.equals("tau2") ? 0.3 : -1 + 0.4 * p;
      double[] all = new double[CHAINS * DRAWS];
      for (int c = 0; c < CHAINS; c++) {
        // the slow parameter's chains sit apart, as its R-hat says
        double offset = name.equals(SLOW_PARAMETER) ? 0.15 * c : 0;
        double v = centre;
        for (int d = 0; d < DRAWS; d++) {
          v = centre + offset + 0.6 * (v - centre - offset) + 0.05 * gaussian(rng);
          draws.add(RowFactory.create(c, d, name, v));
          all[c * DRAWS + d] = v;
        }
      }
      double[] sorted = all.clone();
      Arrays.sort(sorted);
      double mean = Arrays.stream(all).average().orElseThrow();
      double sd = Math.sqrt(Arrays.stream(all).map(x -> (x - mean) * (x - mean)).sum()
          / (all.length - 1));
      double rhat = name.equals(SLOW_PARAMETER) ? SLOW_RHAT : 1.0 + 0.004 * rng.nextDouble();
      double ess = name.equals(SLOW_PARAMETER) ? 35 : 420 + 300 * rng.nextDouble();
      summary.add(RowFactory.create(name, mean, sd, sorted[(int) (0.05 * all.length)],
          sorted[all.length / 2], sorted[(int) (0.95 * all.length)], rhat, ess, ess * 0.9,
          sd / Math.sqrt(ess)));
    }
    String dir = estimate.toString();
    spark.createDataFrame(draws, DataTypes.createStructType(List.of(f("chain", I),
        f("draw", I), f("parameter", S), f("value", D)))).coalesce(1).write()
        .mode(SaveMode.ErrorIfExists).parquet(dir + "/" + RunTables.GLOBAL_DRAWS);
    spark.createDataFrame(summary, DataTypes.createStructType(List.of(f("parameter", S),
        f("mean", D), f("sd", D), f("q05", D), f("q50", D), f("q95", D), f("rhat", D),
        f("ess_bulk", D), f("ess_tail", D), f("mcse_mean", D)))).coalesce(1).write()
        .mode(SaveMode.ErrorIfExists).parquet(dir + "/" + RunTables.SUMMARY);
    Map<String, Object> m = new LinkedHashMap<>();
    m.put("command", "estimate");
    m.put("run_id", "est-1");
    m.put("status", "ok");
    m.put("seed", 77);
    m.put("data", Map.of("stores", STORES, "products", PRODUCTS.length, "rows", 1234));
    m.put("sampler", Map.of("chains", CHAINS, "sampling_sweeps", DRAWS));
    m.put("convergence", Map.of("rhat_max_limit", 1.01, "ess_min_limit", 400.0));
    m.put("configuration", Map.of("sampler", Map.of("chains", CHAINS)));
    m.put("timings", Map.of("total_seconds", 12.5));
    m.put("notes", List.of(RUN_NOTE));
    List<Map<String, Object>> files = new ArrayList<>();
    INPUT_FILES.forEach((path, bytes) -> files.add(
        Map.of("path", path, "bytes", bytes, "sha256", INPUT_SHA256.replace('3', 'f'))));
    Map<String, Object> fingerprints = new LinkedHashMap<>();
    fingerprints.put("algorithm", "SHA-256");
    fingerprints.put("configuration_sha256", CONFIGURATION_SHA256);
    fingerprints.put("inputs", Map.of("sha256", INPUT_SHA256, "files", files));
    m.put("fingerprints", fingerprints);
    json(estimate, m);
  }

  private void writeScenarios(SparkSession spark, SplittableRandom rng) throws IOException {
    List<Row> stores = new ArrayList<>();
    List<Row> regions = new ArrayList<>();
    for (String sc : SCENARIOS) {
      for (int s = 0; s < STORES; s++) {
        for (String metric : List.of("units", "revenue", "margin")) {
          double mid = (sc.endsWith("nash") ? 4 : 9) + 6 * gaussian(rng);
          double spread = 3 + 2 * rng.nextDouble();
          stores.add(summaryRow(sc, storeId(s), region(s), "portfolio", null, metric, mid,
              spread));
          stores.add(summaryRow(sc, storeId(s), region(s), "owner", "Rival Co", metric,
              -mid / 2, spread));
        }
      }
      for (String reg : REGIONS) {
        double mid = 20 + 10 * gaussian(rng);
        regionMedian.put(reg + "/" + sc, mid);
        regions.add(RowFactory.create(sc, reg, "portfolio", null, "revenue", 4L, 400L,
            100.0, 110.0, mid, 6.0, mid - 10, mid - 4, mid, mid + 4, mid + 10, 0.8));
      }
    }
    String dir = scenarios.toString();
    StructType storeSchema = DataTypes.createStructType(List.of(f("scenario", S),
        f("store_id", S), f("region", S), f("scope", S), f("owner", S), f("metric", S),
        f("draws", L), f("base_mean", D), f("value_mean", D), f("mean", D), f("sd", D),
        f("q05", D), f("q25", D), f("q50", D), f("q75", D), f("q95", D), f("prob_gain", D)));
    spark.createDataFrame(stores, storeSchema).repartition(1).write()
        .mode(SaveMode.ErrorIfExists).partitionBy("scenario")
        .parquet(dir + "/" + RunTables.STORE_SUMMARY);
    StructType regionSchema = DataTypes.createStructType(List.of(f("scenario", S),
        f("region", S), f("scope", S), f("owner", S), f("metric", S), f("stores", L),
        f("draws", L), f("base_mean", D), f("value_mean", D), f("mean", D), f("sd", D),
        f("q05", D), f("q25", D), f("q50", D), f("q75", D), f("q95", D), f("prob_gain", D)));
    spark.createDataFrame(regions, regionSchema).repartition(1).write()
        .mode(SaveMode.ErrorIfExists).partitionBy("scenario")
        .parquet(dir + "/" + RunTables.REGION_SUMMARY);

    List<Row> el = new ArrayList<>();
    for (int s = 0; s < 3; s++) {
      for (String a : PRODUCTS) {
        for (String b : PRODUCTS) {
          double e = a.equals(b) ? -2.5 - rng.nextDouble() : 0.02 + 0.2 * rng.nextDouble();
          el.add(RowFactory.create(storeId(s), region(s), a, b, 400, e, e - 0.3, e + 0.3,
              a.equals(b) ? null : 0.1, null, null, a.equals(b) ? 0.4 : null));
        }
      }
    }
    spark.createDataFrame(el, DataTypes.createStructType(List.of(f("store_id", S),
        f("region", S), f("product_id", S), f("wrt_product_id", S), f("draws", I),
        f("elasticity", D), f("elasticity_q05", D), f("elasticity_q95", D), f("diversion", D),
        f("diversion_q05", D), f("diversion_q95", D), f("diversion_to_outside", D))))
        .coalesce(1).write().mode(SaveMode.ErrorIfExists)
        .parquet(dir + "/" + RunTables.ELASTICITIES);

    Map<String, Object> m = new LinkedHashMap<>();
    m.put("command", "scenarios");
    m.put("run_id", "scen-1");
    m.put("status", "ok");
    m.put("posterior", estimate.toString());
    m.put("scenarios", SCENARIOS);
    // the first scenario's revenue total disagrees between chains, the second's agrees
    m.put("output_convergence", List.of(
        Map.of("scenario", SCENARIOS.get(0), "metric", "revenue", "chains", CHAINS,
            "draws_per_chain", DRAWS, "rhat", 1.21, "ess_bulk", 14.0),
        Map.of("scenario", SCENARIOS.get(0), "metric", "units", "chains", CHAINS,
            "draws_per_chain", DRAWS, "rhat", 1.002, "ess_bulk", 700.0),
        Map.of("scenario", SCENARIOS.get(1), "metric", "revenue", "chains", CHAINS,
            "draws_per_chain", DRAWS, "rhat", 1.004, "ess_bulk", 650.0)));
    m.put("notes", List.of());
    json(scenarios, m);
  }

  private static Row summaryRow(String sc, String store, String region, String scope,
      String owner, String metric, double mid, double spread) {
    return RowFactory.create(sc, store, region, scope, owner, metric, 400L, 100.0, 100.0 + mid,
        mid, spread, mid - 1.6 * spread, mid - 0.7 * spread, mid, mid + 0.7 * spread,
        mid + 1.6 * spread, 0.7);
  }

  private void writeRecommend(SparkSession spark, SplittableRandom rng) throws IOException {
    List<Row> rows = new ArrayList<>();
    for (int s = 0; s < STORES; s++) {
      for (String p : new String[] {"FZ01", "FZ02", "FZ03"}) {
        double cur = 1.5 + rng.nextDouble();
        double rec = cur * (1 + 0.1 * (2 * rng.nextDouble() - 1));
        rows.add(RowFactory.create(storeId(s), region(s), p, "Fizzwell", cur, rec,
            100 * (rec / cur - 1), cur * 0.9, cur * 1.1, cur * 0.6, "nash", "mean", 400, 0, 0,
            3.2, -1.0, 3.0, 7.5, 0.83, 1.1, -0.4, 321));
      }
    }
    DataType[] types = {S, S, S, S, D, D, D, D, D, D, S, S, I, I, I, D, D, D, D, D, D, D, I};
    String[] names = {"store_id", "region", "product_id", "owner", "current_price",
        "recommended_price", "change_pct", "lower_price", "upper_price", "mean_cost",
        "response", "objective", "draws", "skipped_draws", "failed_solves",
        "margin_change_mean", "margin_change_q05", "margin_change_q50", "margin_change_q95",
        "prob_gain", "revenue_change_mean", "units_change_mean", "evaluations"};
    List<StructField> fields = new ArrayList<>();
    for (int i = 0; i < names.length; i++) {
      fields.add(f(names[i], types[i]));
    }
    spark.createDataFrame(rows, DataTypes.createStructType(fields)).coalesce(1).write()
        .mode(SaveMode.ErrorIfExists).parquet(recommend + "/" + RunTables.RECOMMENDATIONS);
    Map<String, Object> m = new LinkedHashMap<>();
    m.put("command", "recommend");
    m.put("run_id", "rec-1");
    m.put("status", "ok");
    m.put("posterior", estimate.toString());
    // the chains disagree on the recommended prices' margin total
    m.put("output_convergence", List.of(
        Map.of("scenario", RecommendJob.OUTPUT_NAME, "metric", "margin", "chains", CHAINS,
            "draws_per_chain", DRAWS, "draws_left_out", 0, "rhat", 1.31, "ess_bulk", 11.0),
        Map.of("scenario", RecommendJob.OUTPUT_NAME, "metric", "revenue", "chains", CHAINS,
            "draws_per_chain", DRAWS, "draws_left_out", 0, "rhat", 1.003, "ess_bulk", 600.0)));
    json(recommend, m);
  }

  int recommendationRows() {
    return STORES * 3;
  }

  private static void json(Path dir, Map<String, Object> m) throws IOException {
    Files.createDirectories(dir);
    new ObjectMapper().writeValue(dir.resolve(RunTables.RUN_JSON).toFile(), m);
  }

  /** Box-Muller from the seeded stream. */
  private static double gaussian(SplittableRandom rng) {
    double u = 1 - rng.nextDouble();
    return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * rng.nextDouble());
  }
}
