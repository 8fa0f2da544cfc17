package aislecast.jobs.scenario;

import aislecast.core.demand.ShareInversion;
import aislecast.core.equilibrium.EquilibriumSettings;
import aislecast.core.scenario.BaseDraw;
import aislecast.core.scenario.BaseMarket;
import aislecast.core.scenario.BaseUtilities;
import aislecast.core.scenario.MarketOutcome;
import aislecast.core.scenario.ScenarioEvaluator;
import aislecast.core.scenario.ScenarioOutcome;
import aislecast.core.scenario.ScenarioPlan;
import aislecast.jobs.config.RunConfig;
import aislecast.jobs.io.InputFingerprint;
import aislecast.jobs.io.RunDirectory;
import aislecast.jobs.io.RunIdentity;
import aislecast.jobs.io.RunLog;
import aislecast.jobs.io.TaskProgress;
import aislecast.jobs.validate.InputValidator;
import aislecast.jobs.validate.ValidatedInput;
import com.fasterxml.jackson.databind.JsonNode;
import java.io.PrintWriter;
import java.util.ArrayList;
import java.util.Iterator;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import org.apache.commons.math3.stat.descriptive.rank.Percentile;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.RowFactory;
import org.apache.spark.sql.SaveMode;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.storage.StorageLevel;

/**
 * {@code aislecast scenarios} as a recipe: validate the input, build each store's base period,
 * attach the selected posterior draws of its psi, evaluate every scenario per (store, draw) on the
 * executors (one task per group of stores; per draw the base mean utilities come from inverting
 * the base shares at that draw's psi, then costs from the first-order conditions, then each
 * scenario), write the detail, derive the summaries in SQL, and publish the run folder whole.
 * The maths lives in {@code aislecast.core.scenario}.
 */
public final class ScenariosJob {
  private ScenariosJob() {}

  /**
   * @param input input folder
   * @param outputRoot folder that receives {@code <run id>/}
   * @param runId run folder name
   * @param posterior estimation run folder
   * @param scenarios the merged scenario files
   * @param elasticities whether to write {@code elasticities/}
   * @param replace replace an existing run folder of this id that differs (see RunDirectory)
   */
  public record Options(String input, String outputRoot, String runId, String posterior,
      ScenarioFile.Resolved scenarios, boolean elasticities, boolean replace) {
    /** Without --replace. */
    public Options(String input, String outputRoot, String runId, String posterior,
        ScenarioFile.Resolved scenarios, boolean elasticities) {
      this(input, outputRoot, runId, posterior, scenarios, elasticities, false);
    }
  }

  /** What the run did, for the command's report and the benchmark. */
  public record Result(String runDir, int stores, int draws, int scenarios, long detailRows,
      Map<String, Double> seconds, List<String> notes) {}

  public static Result run(SparkSession spark, RunConfig config, Options o, PrintWriter out) {
    return run(spark, config, o, RunLog.plain("scenarios", out));
  }

  /**
   * Runs the job, or does nothing when run {@code o.runId()} exists with the same input files,
   * scenario files, posterior run and configuration (then the result is read from its run.json).
   */
  public static Result run(SparkSession spark, RunConfig config, Options o, RunLog log) {
    PrintWriter out = log.out();
    Map<String, Double> seconds = new LinkedHashMap<>();
    long t0 = System.nanoTime();
    RunIdentity id = RunManifest.identity(spark, "scenarios", config, o.input(), o.posterior())
        .part("scenario_files", "scenario files",
            InputFingerprint.ofLocalFiles(o.scenarios().sources()))
        .option("draws", o.scenarios().draws())
        .option("elasticities", o.elasticities());
    RunDirectory run = RunDirectory.create(spark, o.outputRoot(), o.runId(), id, o.replace());
    run.notes().forEach(n -> log.info("repair", "scenarios: " + n));
    if (run.identicalExists()) {
      JsonNode m = run.existing();
      log.info("run_exists", "scenarios: run " + run.target() + " already exists with the same"
          + " input files, scenario files, posterior run and configuration; nothing to do",
          "run_dir", run.target());
      List<String> notes = new ArrayList<>();
      m.path("notes").forEach(n -> notes.add(n.asText()));
      return new Result(run.target(), m.path("stores").asInt(), m.path("draws").asInt(),
          m.path("scenarios").size(), m.path("product_detail_rows").asLong(), Map.of(), notes);
    }
    try {
      String dir = run.staging();
      PosteriorRun posterior = PosteriorRun.open(spark, o.posterior());
      ScenarioInputs.Prepared prep;
      try (ValidatedInput validated = InputValidator.run(spark, config, o.input(), dir)) {
        validated.requireRejectShareAtMost(config.validation().maxRejectShare(),
            "the rejects table (run 'aislecast validate' on this input to publish it)");
        prep = ScenarioInputs.prepare(spark, config, validated, posterior,
            o.scenarios().baseWeeks(), o.scenarios().portfolio(), null);
      }
      ScenarioResolver.Result resolved = ScenarioResolver.resolve(o.scenarios(), prep.catalog(),
          prep.stores());
      // a selection note repeats once per response of its scenario: keep each once
      List<String> notes = new ArrayList<>(new java.util.LinkedHashSet<>(prep.notes()));
      for (String n : new java.util.LinkedHashSet<>(resolved.notes())) {
        if (!notes.contains(n)) {
          notes.add(n);
        }
      }
      PosteriorRun.Selection sel = posterior.select(spark, o.scenarios().draws());
      seconds.put("prepare", secondsSince(t0));
      out.printf(Locale.ROOT, "scenarios: %d stores x %d draws (of %d) x %d scenarios%n",
          resolved.stores().size(), sel.size(), sel.available(), resolved.scenarioNames().size());
      out.flush();

      long t1 = System.nanoTime();
      JavaRDD<StoreWork> work = ScenarioInputs.withDraws(spark, resolved.stores(), posterior, sel,
          prep.catalog().attributes()).persist(StorageLevel.MEMORY_AND_DISK());
      Dataset<Row> detailRows = spark.createDataFrame(work.flatMap(ScenariosJob::evaluate),
          ScenarioTables.PRODUCT_DETAIL_SCHEMA);
      try (TaskProgress progress = TaskProgress.start(spark, log, "evaluate")) {
        detailRows.write().mode(SaveMode.ErrorIfExists).partitionBy("scenario")
            .parquet(dir + "/" + ScenarioTables.PRODUCT_DETAIL);
        progress.complete();
      }
      seconds.put("evaluate", secondsSince(t1));

      long t2 = System.nanoTime();
      List<Row> baseChecks = new ArrayList<>();
      List<Row> elasticityRows = new ArrayList<>();
      boolean withElasticities = o.elasticities();
      for (StoreSide s : work.map(w -> baseSide(w, withElasticities)).collect()) {
        baseChecks.add(s.checks());
        elasticityRows.addAll(s.elasticities());
      }
      work.unpersist(false);
      if (o.elasticities()) {
        spark.createDataFrame(elasticityRows, ScenarioTables.ELASTICITY_SCHEMA).coalesce(1)
            .write().mode(SaveMode.ErrorIfExists).parquet(dir + "/" + ScenarioTables.ELASTICITIES);
      }
      seconds.put("elasticities", secondsSince(t2));

      long t3 = System.nanoTime();
      Dataset<Row> detail = spark.read().parquet(dir + "/" + ScenarioTables.PRODUCT_DETAIL);
      long detailCount = detail.count();
      ScenarioTables.storeTotals(spark, detail).write().mode(SaveMode.ErrorIfExists)
          .partitionBy("scenario").parquet(dir + "/" + ScenarioTables.STORE_TOTALS);
      Dataset<Row> totals = spark.read().parquet(dir + "/" + ScenarioTables.STORE_TOTALS);
      ScenarioTables.storeSummary(spark, totals).repartition(1).write()
          .mode(SaveMode.ErrorIfExists).partitionBy("scenario")
          .parquet(dir + "/" + ScenarioTables.STORE_SUMMARY);
      ScenarioTables.regionSummary(spark, totals).repartition(1).write()
          .mode(SaveMode.ErrorIfExists).partitionBy("scenario")
          .parquet(dir + "/" + ScenarioTables.REGION_SUMMARY);
      Dataset<Row> checks = spark.createDataFrame(baseChecks, ScenarioTables.BASE_CHECKS_SCHEMA);
      ScenarioTables.storeChecks(spark, detail, checks).repartition(1).write()
          .mode(SaveMode.ErrorIfExists).partitionBy("scenario")
          .parquet(dir + "/" + ScenarioTables.STORE_CHECKS);
      seconds.put("summaries", secondsSince(t3));
      // do the chains agree on what the scenario outputs say? (not only on the parameters)
      long t4 = System.nanoTime();
      List<OutputConvergence.Check> outputChecks = OutputConvergence.of(spark,
          OutputConvergence.scenarioChanges(totals), sel);
      notes.addAll(OutputConvergence.notes(outputChecks, posterior.rhatLimit(), sel.size(),
          OutputConvergence.Outputs.SCENARIOS));
      seconds.put("output_convergence", secondsSince(t4));
      seconds.put("total", secondsSince(t0));

      Map<String, Object> m = RunManifest.header(spark, id, o.runId(), o.input(),
          o.posterior(), posterior);
      m.put("scenario_files", o.scenarios().sources());
      m.put("scenarios", resolved.scenarioNames());
      m.put("base_weeks", o.scenarios().baseWeeks());
      m.put("portfolio", o.scenarios().portfolio());
      m.put("stores", resolved.stores().size());
      m.put("draws", sel.size());
      m.put("draws_available", sel.available());
      m.put("product_detail_rows", detailCount);
      m.put("output_convergence", outputChecks.stream().map(OutputConvergence.Check::toJson)
          .toList());
      m.put("notes", notes);
      m.put("timings_seconds", seconds);
      RunManifest.write(spark, dir, m);
      run.commit();
      log.info("published", "Outputs in " + run.target() + ":", "run_dir", run.target(),
          "replaced", o.replace());
      for (String t : new String[] {ScenarioTables.PRODUCT_DETAIL, ScenarioTables.STORE_TOTALS,
          ScenarioTables.STORE_SUMMARY, ScenarioTables.REGION_SUMMARY, ScenarioTables.STORE_CHECKS,
          o.elasticities() ? ScenarioTables.ELASTICITIES : null, "validation/rejects",
          RunManifest.RUN_JSON}) {
        if (t != null) {
          out.println("  " + t);
        }
      }
      out.println("  convergence of the outputs (posterior run's R-hat limit "
          + String.format(Locale.ROOT, "%.3f", posterior.rhatLimit()) + "):");
      for (OutputConvergence.Check k : outputChecks) {
        out.println("    " + OutputConvergence.line(k));
      }
      for (String n : notes) {
        out.println("  note: " + n);
      }
      out.flush();
      return new Result(run.target(), resolved.stores().size(), sel.size(),
          resolved.scenarioNames().size(), detailCount, seconds, notes);
    } finally {
      run.abort();
    }
  }

  private static double secondsSince(long t0) {
    return (System.nanoTime() - t0) / 1e9;
  }

  /** Every scenario for every draw of one store, as product_detail rows. */
  static Iterator<Row> evaluate(StoreWork w) {
    BaseMarket market = w.market();
    int j = w.products();
    ScenarioEvaluator ev = new ScenarioEvaluator(w.shoppers(), w.maxProducts(),
        EquilibriumSettings.defaults(), false);
    BaseUtilities inverter = new BaseUtilities(w.shoppers(), j);
    double[] observed = BaseUtilities.observedShares(w.units(), w.marketSize());
    List<ScenarioPlan> plans = new ArrayList<>();
    for (StoreScenario s : w.scenarios()) {
      plans.add(ScenarioPlan.of(market, s.toCore()));
    }
    double[] delta = new double[j];
    List<Row> rows = new ArrayList<>();
    for (int d = 0; d < w.draws(); d++) {
      ShareInversion.Result inv = inverter.invert(market, w.psi()[d], observed, delta);
      if (!inv.converged()) {
        continue; // counted in store_checks.inversion_failures
      }
      BaseDraw base = ev.base(market, w.psi()[d], delta);
      for (ScenarioPlan plan : plans) {
        addRows(rows, w, d, base, ev.evaluate(base, plan));
      }
    }
    return rows.iterator();
  }

  private static void addRows(List<Row> rows, StoreWork w, int d, BaseDraw baseDraw,
      ScenarioOutcome o) {
    MarketOutcome b = o.base();
    MarketOutcome s = o.scenario();
    boolean converged = o.solve().converged();
    int iterations = o.solve().iterations();
    boolean costOk = baseDraw.costInfo().solved();
    BaseMarket market = baseDraw.market();
    for (int p = 0; p < b.products(); p++) {
      int q = s.indexOf(b.productIds()[p]);
      boolean kept = q >= 0;
      rows.add(RowFactory.create(o.scenarioName(), w.storeId(), w.region(), w.chain()[d],
          w.draw()[d], b.productIds()[p], b.owners()[p], market.inPortfolio(b.owners()[p]),
          kept ? "kept" : "delisted", kept ? s.price()[q] : null, nan(b.cost()[p]),
          kept ? s.share()[q] : 0.0, kept ? s.units()[q] : 0.0, kept ? s.revenue()[q] : 0.0,
          kept ? nan(s.margin()[q]) : (costOk ? 0.0 : null), b.price()[p], b.share()[p],
          b.units()[p], b.revenue()[p], nan(b.margin()[p]), converged, iterations, costOk,
          costOk && b.cost()[p] <= 0));
    }
    for (int q = 0; q < s.products(); q++) {
      if (b.indexOf(s.productIds()[q]) >= 0) {
        continue;
      }
      rows.add(RowFactory.create(o.scenarioName(), w.storeId(), w.region(), w.chain()[d],
          w.draw()[d], s.productIds()[q], s.owners()[q], market.inPortfolio(s.owners()[q]),
          "launched", s.price()[q], nan(s.cost()[q]), s.share()[q], s.units()[q],
          s.revenue()[q], nan(s.margin()[q]), null, 0.0, 0.0, 0.0, costOk ? 0.0 : null,
          converged, iterations, costOk, costOk && s.cost()[q] <= 0));
    }
  }

  /** NaN (unknown cost) becomes SQL null. */
  private static Double nan(double v) {
    return Double.isNaN(v) ? null : v;
  }

  /** Base-period results of one store: checks and elasticity rows. */
  record StoreSide(Row checks, List<Row> elasticities) implements java.io.Serializable {}

  /** Base checks and (optionally) elasticities/diversion summarised over the draws. */
  static StoreSide baseSide(StoreWork w, boolean elasticities) {
    BaseMarket market = w.market();
    int j = w.products();
    ScenarioEvaluator ev = new ScenarioEvaluator(w.shoppers(), j,
        EquilibriumSettings.defaults(), elasticities);
    BaseUtilities inverter = new BaseUtilities(w.shoppers(), j);
    double[] observed = BaseUtilities.observedShares(w.units(), w.marketSize());
    double[] delta = new double[j];
    List<double[]> el = new ArrayList<>();
    List<double[]> dv = new ArrayList<>();
    int inversionFailures = 0;
    int costFailures = 0;
    int nonPositiveDraws = 0;
    int nonPositive = 0;
    double worstResidual = 0;
    for (int d = 0; d < w.draws(); d++) {
      ShareInversion.Result inv = inverter.invert(market, w.psi()[d], observed, delta);
      worstResidual = Math.max(worstResidual, inv.maxAbsLogResidual());
      if (!inv.converged()) {
        inversionFailures++;
        continue;
      }
      BaseDraw base = ev.base(market, w.psi()[d], delta);
      if (!base.costInfo().solved()) {
        costFailures++;
      }
      int np = base.nonPositiveCosts();
      nonPositive += np;
      nonPositiveDraws += np > 0 ? 1 : 0;
      if (elasticities) {
        el.add(base.outcome().elasticity());
        dv.add(base.outcome().diversion());
      }
    }
    Row checks = RowFactory.create(w.storeId(), w.draws(), inversionFailures,
        Double.isFinite(worstResidual) ? worstResidual : null, costFailures, nonPositiveDraws,
        nonPositive);
    List<Row> rows = new ArrayList<>();
    if (elasticities && !el.isEmpty()) {
      int n = el.size();
      double[] buf = new double[n];
      Percentile pct = new Percentile().withEstimationType(Percentile.EstimationType.R_7);
      for (int a = 0; a < j; a++) {
        for (int b = 0; b < j; b++) {
          for (int i = 0; i < n; i++) {
            buf[i] = el.get(i)[a * j + b];
          }
          double[] e = summary(buf, pct);
          Double[] div = {null, null, null};
          Double outside = null;
          if (a != b) {
            for (int i = 0; i < n; i++) {
              buf[i] = dv.get(i)[b * (j + 1) + a];
            }
            double[] s = summary(buf, pct);
            div = new Double[] {s[0], s[1], s[2]};
          } else {
            for (int i = 0; i < n; i++) {
              buf[i] = dv.get(i)[a * (j + 1) + j];
            }
            outside = summary(buf, pct)[0];
          }
          rows.add(RowFactory.create(w.storeId(), w.region(), w.productIds()[a],
              w.productIds()[b], n, e[0], e[1], e[2], div[0], div[1], div[2], outside));
        }
      }
    }
    return new StoreSide(checks, rows);
  }

  /** Mean, 5% and 95% quantiles (type 7). */
  private static double[] summary(double[] v, Percentile pct) {
    double mean = 0;
    for (double x : v) {
      mean += x;
    }
    pct.setData(v);
    return new double[] {mean / v.length, pct.evaluate(5), pct.evaluate(95)};
  }
}
