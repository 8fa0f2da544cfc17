package aislecast.jobs.scenario;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import aislecast.core.diag.Diagnostics;
import aislecast.core.scenario.Response;
import aislecast.core.sim.DemandSimulator;
import aislecast.core.sim.SimSettings;
import aislecast.core.sim.SimWriter;
import aislecast.core.sim.SimulatedData;
import aislecast.jobs.cli.Main;
import aislecast.jobs.config.RunConfig;
import aislecast.jobs.io.FolderSnapshot;
import aislecast.jobs.io.Sha256Sum;
import aislecast.jobs.spark.SparkSessions;
import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.io.PrintWriter;
import java.io.StringWriter;
import java.nio.file.Files;
import java.nio.file.Path;
import java.sql.Connection;
import java.sql.DriverManager;
import java.sql.ResultSet;
import java.sql.Statement;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import picocli.CommandLine;

/**
 * End-to-end runs of {@code aislecast scenarios} and {@code aislecast recommend} on a small data
 * set simulated from the model (6 stores, 4 weeks, 8 products, 3 owners, 2 attributes, 40
 * shopper draws) with a 2 x 3-draw posterior built from the simulator's truth
 * ({@link TruthPosterior}). Outputs are read back with DuckDB, an SQL engine independent of Spark.
 */
class ScenariosJobTest {
  private static final long SEED = 4242L;

  @TempDir static Path tmp;
  static SparkSession spark;
  static SimulatedData sim;
  static Path input;
  static Path posterior;
  static Path scenarioFile;
  static String runDir;
  static String portfolio;

  @BeforeAll
  static void runScenarios() throws Exception {
    spark = SparkSessions.open("local[2]", "scenarios-test").spark();
    sim = DemandSimulator.simulate(SimSettings.demo().withSizes(6, 4, 8, 3, 2, 40));
    input = tmp.resolve("in");
    SimWriter.write(sim, input, false);
    posterior = tmp.resolve("post");
    TruthPosterior.write(spark, sim, posterior, 2, 3, SEED);
    portfolio = sim.ownerNames[0];
    String own = firstProductOf(0);
    String rival = firstProductOf(1);
    String region = sim.regionNames[sim.storeRegion[0]];
    scenarioFile = tmp.resolve("test.yaml");
    Files.writeString(scenarioFile, String.join("\n",
        "settings:",
        "  base_weeks: 1",
        "  draws: 0",
        "  portfolio: [" + portfolio + "]",
        "scenarios:",
        "  - name: none",
        "    responses: [hold, nash]",
        "  - name: up3",
        "    responses: [hold, nash]",
        "    price_changes:",
        "      - owners: [portfolio]",
        "        percent: 3",
        "  - name: top-cut",
        "    responses: [nash]",
        "    price_changes:",
        "      - owners: [portfolio]",
        "        top_seller: true",
        "        regions: [" + region + "]",
        "        percent: -5",
        "  - name: launch",
        "    responses: [hold]",
        "    launches:",
        "      - product_id: NEW1",
        "        owner: " + portfolio,
        "        like: " + own,
        "        attributes: {" + sim.attributeNames[0] + ": 1}",
        "        price: 2.5",
        "  - name: delist",
        "    responses: [hold]",
        "    delist:",
        "      - products: [" + rival + "]",
        ""));
    StringWriter text = new StringWriter();
    int code = Main.commandLine().setOut(new PrintWriter(text)).setErr(new PrintWriter(text))
        .execute("scenarios", "--posterior", posterior.toString(), "--scenario",
            scenarioFile.toString(), "--input", input.toString(), "--output",
            tmp.resolve("out").toString(), "--run-id", "s1", "--master", "local[2]");
    assertEquals(0, code, text.toString());
    runDir = tmp.resolve("out/s1").toString();
  }

  @AfterAll
  static void stop() {
    spark.stop();
  }

  private static String firstProductOf(int owner) {
    for (int p = 0; p < sim.products(); p++) {
      if (sim.productOwner[p] == owner) {
        return sim.productIds[p];
      }
    }
    throw new IllegalStateException("owner without products");
  }

  private static Dataset<Row> table(String t) {
    return spark.read().parquet(runDir + "/" + t);
  }

  @Test
  void everyTableHasItsDocumentedColumns() throws java.io.IOException {
    assertEquals(Arrays.asList(ScenarioTables.PRODUCT_DETAIL_SCHEMA.fieldNames()).subList(1, 24),
        Arrays.asList(table(ScenarioTables.PRODUCT_DETAIL).columns()).subList(0, 23));
    assertEquals(List.of("store_id", "region", "chain", "draw", "scope", "owner", "metric",
        "base_value", "value", "change", "converged", "cost_recovered", "scenario"),
        Arrays.asList(table(ScenarioTables.STORE_TOTALS).columns()));
    assertEquals(List.of("store_id", "region", "scope", "owner", "metric", "draws", "base_mean",
        "value_mean", "mean", "sd", "q05", "q25", "q50", "q75", "q95", "prob_gain", "scenario"),
        Arrays.asList(table(ScenarioTables.STORE_SUMMARY).columns()));
    assertEquals(List.of("region", "scope", "owner", "metric", "stores", "draws", "base_mean",
        "value_mean", "mean", "sd", "q05", "q25", "q50", "q75", "q95", "prob_gain", "scenario"),
        Arrays.asList(table(ScenarioTables.REGION_SUMMARY).columns()));
    assertEquals(Arrays.asList(ScenarioTables.ELASTICITY_SCHEMA.fieldNames()),
        Arrays.asList(table(ScenarioTables.ELASTICITIES).columns()));
    assertTrue(Files.exists(Path.of(runDir, "run.json")));
    JsonNode notes = new ObjectMapper().readTree(Path.of(runDir, "run.json").toFile())
        .get("notes");
    List<String> texts = new ArrayList<>();
    notes.forEach(n -> texts.add(n.asText()));
    assertTrue(texts.contains("posterior run: " + TruthPosterior.NOTE), texts.toString());
    // the outputs' own convergence: one check per scenario and metric; with 3 draws per chain
    // R-hat cannot be computed, and a note says so
    JsonNode outputChecks = new ObjectMapper().readTree(Path.of(runDir, "run.json").toFile())
        .get("output_convergence");
    assertEquals(7 * 3, outputChecks.size());
    assertEquals(2, outputChecks.get(0).get("chains").asInt());
    assertEquals(3, outputChecks.get(0).get("draws_per_chain").asInt());
    assertEquals(0, outputChecks.get(0).get("draws_left_out").asInt(), "no failure here");
    assertTrue(texts.stream().anyMatch(t -> t.startsWith("the convergence of 21 of 21 scenario"
        + " outputs cannot be checked")), texts.toString());
    assertTrue(Files.isDirectory(Path.of(runDir, "validation/rejects")));
    // 6 stores x 6 draws x 7 scenarios, no failure: every (scenario, store, draw) has rows
    assertEquals(6L * 6 * 7, table(ScenarioTables.PRODUCT_DETAIL)
        .select("scenario", "store_id", "chain", "draw").distinct().count());
  }

  /** hold with no change is the base itself, bit for bit. */
  @Test
  void holdWithoutChangeReproducesBaseExactly() {
    Dataset<Row> d = table(ScenarioTables.PRODUCT_DETAIL).filter("scenario = 'none-hold'");
    assertTrue(d.count() > 0);
    assertEquals(0, d.filter("price <> base_price OR share <> base_share OR units <> base_units"
        + " OR revenue <> base_revenue OR margin <> base_margin OR status <> 'kept'").count());
    List<Row> summary = table(ScenarioTables.STORE_SUMMARY).filter("scenario = 'none-hold'")
        .collectAsList();
    assertFalse(summary.isEmpty());
    for (Row r : summary) {
      assertEquals(0.0, r.getDouble(r.fieldIndex("mean")));
      assertEquals(0.0, r.getDouble(r.fieldIndex("prob_gain")));
    }
  }

  /**
   * The base reproduces the observed latest week at every draw: base_share equals units /
   * shoppers of the input (half a unit for a zero), since the mean utilities are the inversion of
   * exactly these shares (Berry 1994).
   */
  @Test
  void baseSharesAreTheObservedShares() {
    int last = sim.weekDates.length - 1;
    Map<String, Double> observed = new HashMap<>();
    for (int i = 0; i < sim.rows; i++) {
      if (sim.rowWeek[i] == last) {
        int s = sim.rowStore[i];
        double u = sim.units[i] > 0 ? sim.units[i] : 0.5;
        observed.put(sim.storeIds[s] + "/" + sim.productIds[sim.rowProduct[i]],
            u / sim.shoppers[s]);
      }
    }
    List<Row> rows = table(ScenarioTables.PRODUCT_DETAIL).filter("scenario = 'none-hold'")
        .select("store_id", "product_id", "base_share").collectAsList();
    for (Row r : rows) {
      double want = observed.get(r.getString(0) + "/" + r.getString(1));
      assertEquals(want, r.getDouble(2), 1e-9 * want, r.toString());
    }
  }

  /**
   * nash with no change: costs come from the first-order conditions at base prices, so the base
   * prices are the equilibrium and the solver returns them (Bertrand-Nash FOC, DESIGN section 6).
   */
  @Test
  void nashWithoutChangeStaysAtBase() {
    Dataset<Row> d = table(ScenarioTables.PRODUCT_DETAIL).filter("scenario = 'none-nash'");
    assertEquals(0, d.filter("NOT converged").count());
    assertEquals(0, d.filter("abs(price / base_price - 1) > 1e-8").count());
  }

  @Test
  void changesLaunchesAndDelistingsLandWhereTheFileSaysAndChecksAreReported() {
    Dataset<Row> d = table(ScenarioTables.PRODUCT_DETAIL);
    Dataset<Row> up = d.filter("scenario = 'up3-hold'");
    assertEquals(0, up.filter("in_portfolio AND abs(price - 1.03 * base_price) > 1e-12").count());
    assertEquals(0, up.filter("NOT in_portfolio AND price <> base_price").count());
    assertTrue(up.filter("in_portfolio").count() > 0);
    Dataset<Row> launch = d.filter("scenario = 'launch-hold' AND status = 'launched'");
    assertTrue(launch.count() > 0);
    assertEquals(0, launch.filter("product_id <> 'NEW1' OR base_units <> 0 OR units <= 0"
        + " OR price <> 2.5 OR NOT in_portfolio").count());
    Dataset<Row> delisted = d.filter("scenario = 'delist-hold' AND status = 'delisted'");
    assertTrue(delisted.count() > 0);
    assertEquals(0, delisted.filter("units <> 0 OR share <> 0 OR base_units <= 0").count());
    // the top-seller cut touches one product, only in the chosen region
    List<Row> cut = d.filter("scenario = 'top-cut-nash' AND in_portfolio"
        + " AND abs(price / base_price - 0.95) < 1e-12").select("product_id", "region")
        .distinct().collectAsList();
    assertFalse(cut.isEmpty());
    for (Row r : cut) {
      assertEquals(sim.regionNames[sim.storeRegion[0]], r.getString(1));
      assertEquals(cut.get(0).getString(0), r.getString(0));
    }
    List<Row> checks = table(ScenarioTables.STORE_CHECKS).collectAsList();
    assertEquals(6 * 7, checks.size());
    for (Row r : checks) {
      assertEquals(6, r.getInt(r.fieldIndex("draws")));
      assertEquals(0, r.getInt(r.fieldIndex("inversion_failures")));
      assertEquals(0, r.getInt(r.fieldIndex("equilibrium_failures")));
      assertTrue(r.getInt(r.fieldIndex("nonpositive_costs")) >= 0);
    }
  }

  /**
   * Diversion ratios of one price rise sum to one over the other products and the outside
   * option (a definition, e.g. Conlon and Mortimer 2021, "Empirical properties of diversion
   * ratios"); own-price elasticities are negative. Checked per draw in core; here on the
   * posterior means the table carries (a mean of sums that are all one is one).
   */
  @Test
  void elasticityTableIsConsistent() {
    Dataset<Row> e = table(ScenarioTables.ELASTICITIES);
    assertEquals(0, e.filter("product_id = wrt_product_id AND elasticity >= 0").count());
    List<Row> sums = e.groupBy("store_id", "wrt_product_id")
        .agg(org.apache.spark.sql.functions.expr("sum(coalesce(diversion, 0))"
            + " + sum(coalesce(diversion_to_outside, 0))")).collectAsList();
    assertFalse(sums.isEmpty());
    for (Row r : sums) {
      assertEquals(1.0, r.getDouble(2), 1e-9, r.toString());
    }
  }

  /**
   * DuckDB (an SQL engine independent of Spark) reads product_detail and recomputes the store
   * summary of the portfolio margin and the regional units roll-up from the raw rows: the same
   * numbers as Spark's tables (sums, means, sd, continuous quantiles, probability of a gain).
   */
  @Test
  void duckDbReadsTheSameNumbers() throws Exception {
    String detail = runDir + "/" + ScenarioTables.PRODUCT_DETAIL + "/**/*.parquet";
    String per = "WITH per AS (SELECT scenario, store_id, chain, draw,"
        + " sum(margin) - sum(base_margin) AS change FROM read_parquet('" + detail
        + "', hive_partitioning = true) WHERE in_portfolio"
        + " GROUP BY scenario, store_id, chain, draw) ";
    String sql = per + "SELECT scenario, store_id, count(*), avg(change), stddev_samp(change),"
        + " quantile_cont(change, 0.05), quantile_cont(change, 0.5), quantile_cont(change, 0.95),"
        + " avg(CASE WHEN change > 0 THEN 1.0 ELSE 0.0 END)"
        + " FROM per GROUP BY scenario, store_id ORDER BY scenario, store_id";
    List<double[]> duck = new ArrayList<>();
    List<String> keys = new ArrayList<>();
    try (Connection c = DriverManager.getConnection("jdbc:duckdb:");
        Statement st = c.createStatement();
        ResultSet rs = st.executeQuery(sql)) {
      while (rs.next()) {
        keys.add(rs.getString(1) + "/" + rs.getString(2));
        duck.add(new double[] {rs.getLong(3), rs.getDouble(4), rs.getDouble(5), rs.getDouble(6),
            rs.getDouble(7), rs.getDouble(8), rs.getDouble(9)});
      }
    }
    List<Row> sparkRows = table(ScenarioTables.STORE_SUMMARY)
        .filter("scope = 'portfolio' AND metric = 'margin'")
        .selectExpr("scenario", "store_id", "draws", "mean", "sd", "q05", "q50", "q95",
            "prob_gain").orderBy("scenario", "store_id").collectAsList();
    assertEquals(keys.size(), sparkRows.size());
    assertEquals(6 * 7, keys.size());
    for (int i = 0; i < keys.size(); i++) {
      Row r = sparkRows.get(i);
      assertEquals(keys.get(i), r.getString(0) + "/" + r.getString(1));
      double[] want = duck.get(i);
      assertEquals(want[0], r.getLong(2));
      for (int k = 1; k < 7; k++) {
        double got = ((Number) r.get(2 + k)).doubleValue();
        double scale = Math.max(1.0, Math.abs(want[k]));
        assertEquals(want[k], got, 1e-9 * scale, keys.get(i) + " column " + k);
      }
    }
    // regional units roll-up of the portfolio: per draw the sum over the region's stores
    String region = "WITH per AS (SELECT scenario, region, chain, draw,"
        + " sum(units) - sum(base_units) AS change FROM read_parquet('" + detail
        + "', hive_partitioning = true) WHERE in_portfolio GROUP BY scenario, region, chain,"
        + " draw) SELECT scenario, region, avg(change), quantile_cont(change, 0.25)"
        + " FROM per GROUP BY scenario, region ORDER BY scenario, region";
    List<Row> sparkRegion = table(ScenarioTables.REGION_SUMMARY)
        .filter("scope = 'portfolio' AND metric = 'units'")
        .selectExpr("scenario", "region", "mean", "q25").orderBy("scenario", "region")
        .collectAsList();
    int n = 0;
    try (Connection c = DriverManager.getConnection("jdbc:duckdb:");
        Statement st = c.createStatement();
        ResultSet rs = st.executeQuery(region)) {
      while (rs.next()) {
        Row r = sparkRegion.get(n++);
        assertEquals(rs.getString(1) + "/" + rs.getString(2), r.getString(0) + "/" + r.getString(1));
        assertEquals(rs.getDouble(3), r.getDouble(2), 1e-9 * Math.max(1, Math.abs(rs.getDouble(3))));
        assertEquals(rs.getDouble(4), r.getDouble(3), 1e-9 * Math.max(1, Math.abs(rs.getDouble(4))));
      }
    }
    assertEquals(sparkRegion.size(), n);
  }

  @Test
  void recommendStaysWithinGuardRailsAndNeverLosesOnAverage() throws Exception {
    RecommendJob.Options o = new RecommendJob.Options(input.toString(),
        tmp.resolve("rec").toString(), "r1", posterior.toString(), 1, 3, List.of(portfolio),
        0.05, Double.NaN, Response.HOLD, null);
    RecommendJob.Result res = RecommendJob.run(spark, RunConfig.defaults(), o,
        new PrintWriter(new StringWriter()));
    Dataset<Row> rec = spark.read().parquet(res.runDir() + "/" + RecommendJob.RECOMMENDATIONS);
    assertEquals(Arrays.asList(RecommendJob.SCHEMA.fieldNames()), Arrays.asList(rec.columns()));
    long own = table(ScenarioTables.PRODUCT_DETAIL).filter("scenario = 'none-hold'"
        + " AND in_portfolio").select("store_id", "product_id").distinct().count();
    assertEquals(own, rec.count());
    assertEquals(0, rec.filter("recommended_price > current_price * 1.05 + 1e-12"
        + " OR recommended_price < current_price * 0.95 - 1e-12"
        + " OR recommended_price < mean_cost").count());
    // the current prices are feasible, so the best found cannot be worse on average
    assertEquals(0, rec.filter("margin_change_mean < -1e-9").count());
    assertEquals(0, rec.filter("margin_change_q05 > margin_change_q50"
        + " OR margin_change_q50 > margin_change_q95 OR prob_gain < 0 OR prob_gain > 1").count());
    try (Connection c = DriverManager.getConnection("jdbc:duckdb:");
        Statement st = c.createStatement();
        ResultSet rs = st.executeQuery("SELECT count(*), sum(recommended_price) FROM read_parquet('"
            + res.runDir() + "/" + RecommendJob.RECOMMENDATIONS + "/*.parquet')")) {
      rs.next();
      assertEquals(rec.count(), rs.getLong(1));
      assertEquals(rec.agg(org.apache.spark.sql.functions.sum("recommended_price")).first()
          .getDouble(0), rs.getDouble(2), 1e-9);
    }
    // 3 draws spread over 2 chains (2 and 1): the outputs' convergence cannot be checked
    JsonNode m = new ObjectMapper().readTree(Path.of(res.runDir(), "run.json").toFile());
    assertEquals(3, m.get("output_convergence").size());
    for (JsonNode k : m.get("output_convergence")) {
      assertEquals(RecommendJob.OUTPUT_NAME, k.get("scenario").asText());
      assertEquals(1, k.get("draws_per_chain").asInt());
      assertTrue(k.get("rhat").isNull());
    }
    assertTrue(texts(m.get("notes")).contains("the convergence of 3 of 3 recommendation outputs"
        + " cannot be checked: R-hat needs at least 2 chains with 4 draws each among the"
        + " posterior draws used (--draws)"), m.get("notes").toString());
  }

  private static List<String> texts(JsonNode array) {
    List<String> out = new ArrayList<>();
    array.forEach(n -> out.add(n.asText()));
    return out;
  }

  /**
   * recommend checks the convergence of its own outputs: on a 2 x 6-draw posterior with known
   * own costs (so prices move), run.json's output_convergence holds, per metric, R-hat and bulk
   * ESS equal to those computed here from the written recommendation_draws (read with DuckDB,
   * summed over stores per chain and draw, handed to Diagnostics, which DiagnosticsTest checks
   * against ArviZ); recommendation_draws is what recommendations/ summarises. The posterior
   * run's R-hat limit is set to 0.5, which no finite R-hat can meet (split R-hat is at least
   * sqrt((n - 1) / n) for n draws per split chain, as the between-chain variance is >= 0;
   * Gelman et al., Bayesian Data Analysis 3rd ed. section 11.4, from memory), so the note must
   * appear.
   */
  @Test
  void recommendChecksTheConvergenceOfItsOwnOutputs() throws Exception {
    Path post = tmp.resolve("post-2x6");
    TruthPosterior.write(spark, sim, post, 2, 6, SEED + 1, 0.5);
    RecommendJob.Options o = new RecommendJob.Options(input.toString(),
        tmp.resolve("rec").toString(), "r2", post.toString(), 1, 0, List.of(portfolio), 0.05,
        Double.NaN, Response.HOLD, "unit_cost");
    StringWriter console = new StringWriter();
    RecommendJob.Result res = RecommendJob.run(spark, RunConfig.defaults(), o,
        new PrintWriter(console));
    JsonNode m = new ObjectMapper().readTree(Path.of(res.runDir(), "run.json").toFile());
    JsonNode checks = m.get("output_convergence");
    assertEquals(3, checks.size(), checks.toString());
    String draws = res.runDir() + "/" + RecommendJob.RECOMMENDATION_DRAWS + "/*.parquet";
    List<String> above = new ArrayList<>();
    try (Connection c = DriverManager.getConnection("jdbc:duckdb:");
        Statement st = c.createStatement()) {
      try (ResultSet rs = st.executeQuery("SELECT count(*), count(DISTINCT store_id),"
          + " sum(CASE WHEN used THEN 0 ELSE 1 END) FROM read_parquet('" + draws + "')")) {
        rs.next();
        long stores = rs.getLong(2);
        assertEquals(stores * 12, rs.getLong(1), "one row per store and draw");
        assertEquals(0, rs.getLong(3), "every draw used in this data");
      }
      for (JsonNode k : checks) {
        String metric = k.get("metric").asText();
        double[][] x = new double[2][6];
        try (ResultSet rs = st.executeQuery("SELECT chain, draw, sum(" + metric + "_change)"
            + " FROM read_parquet('" + draws + "') GROUP BY chain, draw ORDER BY chain, draw")) {
          int n = 0;
          while (rs.next()) {
            x[rs.getInt(1)][rs.getInt(2)] = rs.getDouble(3);
            n++;
          }
          assertEquals(12, n);
        }
        assertEquals(RecommendJob.OUTPUT_NAME, k.get("scenario").asText());
        assertEquals(2, k.get("chains").asInt());
        assertEquals(6, k.get("draws_per_chain").asInt());
        assertEquals(0, k.get("draws_left_out").asInt());
        double rhat = Diagnostics.rankRhat(x);
        assertTrue(Double.isFinite(rhat), metric + ": the changes vary over draws");
        assertEquals(rhat, k.get("rhat").asDouble(), 1e-12 * rhat, metric);
        assertEquals(Diagnostics.essBulk(x), k.get("ess_bulk").asDouble(),
            1e-9 * Diagnostics.essBulk(x), metric);
        above.add(String.format(Locale.ROOT, "%s (R-hat %.3f)", metric, rhat));
        assertTrue(console.toString().contains(RecommendJob.OUTPUT_NAME + ", portfolio " + metric
            + " change over all stores: R-hat " + String.format(Locale.ROOT, "%.3f", rhat)),
            console.toString());
      }
      // the per-draw table is what recommendations/ summarises
      try (ResultSet rs = st.executeQuery("SELECT d.store_id, avg(d.margin_change),"
          + " max(r.margin_change_mean) FROM read_parquet('" + draws + "') d JOIN read_parquet('"
          + res.runDir() + "/" + RecommendJob.RECOMMENDATIONS + "/*.parquet') r"
          + " ON d.store_id = r.store_id GROUP BY d.store_id")) {
        int n = 0;
        while (rs.next()) {
          assertEquals(rs.getDouble(3), rs.getDouble(2), 1e-9 * Math.max(1,
              Math.abs(rs.getDouble(3))), rs.getString(1));
          n++;
        }
        assertTrue(n > 0);
      }
    }
    assertEquals("recommended prices: the chains disagree about the portfolio's "
        + String.join(", ", above) + " change over the posterior draws used (R-hat limit 0.500),"
        + " so those bands are not reliable yet", texts(m.get("notes")).get(
            texts(m.get("notes")).size() - 1), m.get("notes").toString());
  }

  /**
   * A rerun of s1 with the same inputs does nothing; run.json fingerprints every file read
   * (input tables, scenario file, the posterior's run.json) as sha256sum computes it; a changed
   * scenario file is refused, naming it, and leaves the folder untouched.
   */
  @Test
  void rerunsOfTheSameRunDoNothingAndChangedScenarioFilesAreRefused() throws Exception {
    Path s1 = tmp.resolve("out/s1");
    Map<String, String> before = FolderSnapshot.of(s1);
    JsonNode fp = new ObjectMapper().readTree(s1.resolve("run.json").toFile())
        .path("fingerprints");
    JsonNode scen = fp.path("scenario_files").path("files").get(0);
    assertEquals("test.yaml", scen.path("path").asText());
    assertEquals(Sha256Sum.of(scenarioFile), scen.path("sha256").asText());
    assertEquals(Sha256Sum.of(posterior.resolve("run.json")),
        fp.path("posterior_run").path("files").get(0).path("sha256").asText());
    int inputs = 0;
    for (JsonNode f : fp.path("inputs").path("files")) {
      assertEquals(Sha256Sum.of(input.resolve(f.path("path").asText())),
          f.path("sha256").asText());
      inputs++;
    }
    assertEquals(4, inputs, "sales, products, stores, shopper_draws");

    StringWriter text = new StringWriter();
    StringWriter err = new StringWriter();
    String[] same = {"scenarios", "--posterior", posterior.toString(), "--scenario",
        scenarioFile.toString(), "--input", input.toString(), "--output",
        tmp.resolve("out").toString(), "--run-id", "s1", "--master", "local[2]",
        "--log-format", "text"};
    assertEquals(0, Main.commandLine().setOut(new PrintWriter(text)).setErr(
        new PrintWriter(err)).execute(same), err.toString());
    assertTrue(text.toString().contains("already exists with the same input files, scenario"
        + " files, posterior run and configuration; nothing to do"), text.toString());
    assertEquals(before, FolderSnapshot.of(s1));

    Path other = tmp.resolve("other/test.yaml");
    Files.createDirectories(other.getParent());
    Files.writeString(other, Files.readString(scenarioFile).replace("percent: 3", "percent: 4"));
    String[] changed = same.clone();
    changed[4] = other.toString();
    assertEquals(2, Main.commandLine().setOut(new PrintWriter(text)).setErr(
        new PrintWriter(err)).execute(changed));
    assertTrue(err.toString().contains("scenario files differ (changed test.yaml)"),
        err.toString());
    assertEquals(before, FolderSnapshot.of(s1));
  }

  /** A file error stops the run before Spark work; the resolver's checks are unit-tested. */
  @Test
  void badScenarioFilesAreConfigurationErrors() throws Exception {
    Path bad = tmp.resolve("bad.yaml");
    StringWriter err = new StringWriter();
    CommandLine cli = Main.commandLine().setOut(new PrintWriter(new StringWriter()))
        .setErr(new PrintWriter(err));
    Files.writeString(bad, "settings: {portfolio: [x]}\nscenarios:\n  - name: x\n    colour: red\n");
    int code = cli.execute("scenarios", "--posterior", posterior.toString(), "--scenario",
        bad.toString(), "--input", input.toString(), "--output", tmp.resolve("bad").toString(),
        "--run-id", "b2");
    assertEquals(2, code, err.toString());
    assertTrue(err.toString().contains("unknown key 'colour'"), err.toString());
    assertFalse(Files.exists(tmp.resolve("bad/b2")), "a failed run leaves no run folder");
  }
}
