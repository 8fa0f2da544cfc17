package aislecast.jobs.scenario;

import aislecast.core.demand.ShareInversion;
import aislecast.core.equilibrium.EquilibriumSettings;
import aislecast.core.scenario.Bands;
import aislecast.core.scenario.BaseDraw;
import aislecast.core.scenario.BaseMarket;
import aislecast.core.scenario.BaseUtilities;
import aislecast.core.scenario.PriceRecommender;
import aislecast.core.scenario.RecommendSettings;
import aislecast.core.scenario.Recommendation;
import aislecast.core.scenario.Response;
import aislecast.core.scenario.ScenarioEvaluator;
import aislecast.jobs.config.RunConfig;
import aislecast.jobs.config.RunFailure;
import aislecast.jobs.io.RunDirectory;
import aislecast.jobs.io.RunIdentity;
import aislecast.jobs.io.RunLog;
import aislecast.jobs.io.TaskProgress;
import aislecast.jobs.validate.InputValidator;
import aislecast.jobs.validate.ValidatedInput;
import com.fasterxml.jackson.databind.JsonNode;
import java.io.PrintWriter;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.RowFactory;
import org.apache.spark.sql.SaveMode;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.types.DataType;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.StructField;
import org.apache.spark.sql.types.StructType;
import org.apache.spark.storage.StorageLevel;

/**
 * {@code aislecast recommend}: per store, the portfolio prices within guard-rails that maximise
 * the posterior mean (or a quantile) of the portfolio margin change, with the competitors'
 * response ({@link PriceRecommender}); one Spark task per group of stores. Writes {@code
 * recommendations/}, the per-draw changes behind them ({@code recommendation_draws/}) and {@code
 * run.json} (with the convergence of those changes over the chains, {@link OutputConvergence}) in
 * a run folder published whole.
 */
public final class RecommendJob {
  static final String RECOMMENDATIONS = "recommendations";
  static final String RECOMMENDATION_DRAWS = "recommendation_draws";

  /** The name recommend's output convergence checks carry in the {@code scenario} field. */
  public static final String OUTPUT_NAME = "recommended prices";

  private RecommendJob() {}

  /**
   * @param quantile NaN to maximise the mean margin change, else the quantile level
   * @param draws posterior draws to use (0 = all)
   * @param replace replace an existing run folder of this id that differs (see RunDirectory)
   */
  public record Options(String input, String outputRoot, String runId, String posterior,
      int baseWeeks, int draws, List<String> portfolio, double maxMove, double quantile,
      Response response, String ownCostColumn, boolean replace) {
    /** Without --replace. */
    public Options(String input, String outputRoot, String runId, String posterior,
        int baseWeeks, int draws, List<String> portfolio, double maxMove, double quantile,
        Response response, String ownCostColumn) {
      this(input, outputRoot, runId, posterior, baseWeeks, draws, portfolio, maxMove, quantile,
          response, ownCostColumn, false);
    }
  }

  private static StructField f(String name, DataType type, boolean nullable) {
    return DataTypes.createStructField(name, type, nullable);
  }

  /**
   * One row per store and portfolio product. The margin, revenue and units figures are the
   * store's whole portfolio at the recommended prices against the base (the same on every
   * product row of a store): posterior mean and 5/50/95% quantiles of the margin change, the
   * probability that it is positive. {@code lower_price} is the guard-rail raised to the cost
   * floor (the largest marginal cost over draws); {@code skipped_draws} counts draws whose shares
   * could not be inverted or costs recovered; {@code failed_solves} counts candidate prices the
   * search rejected because a competitors' equilibrium failed in some draw.
   */
  static final StructType SCHEMA = DataTypes.createStructType(List.of(
      f("store_id", DataTypes.StringType, false), f("region", DataTypes.StringType, true),
      f("product_id", DataTypes.StringType, false), f("owner", DataTypes.StringType, false),
      f("current_price", DataTypes.DoubleType, false),
      f("recommended_price", DataTypes.DoubleType, false),
      f("change_pct", DataTypes.DoubleType, false),
      f("lower_price", DataTypes.DoubleType, false),
      f("upper_price", DataTypes.DoubleType, false),
      f("mean_cost", DataTypes.DoubleType, false),
      f("response", DataTypes.StringType, false), f("objective", DataTypes.StringType, false),
      f("draws", DataTypes.IntegerType, false), f("skipped_draws", DataTypes.IntegerType, false),
      f("failed_solves", DataTypes.IntegerType, false),
      f("margin_change_mean", DataTypes.DoubleType, false),
      f("margin_change_q05", DataTypes.DoubleType, false),
      f("margin_change_q50", DataTypes.DoubleType, false),
      f("margin_change_q95", DataTypes.DoubleType, false),
      f("prob_gain", DataTypes.DoubleType, false),
      f("revenue_change_mean", DataTypes.DoubleType, false),
      f("units_change_mean", DataTypes.DoubleType, false),
      f("evaluations", DataTypes.IntegerType, false)));

  /**
   * One row per store with a portfolio product and selected posterior draw: the portfolio's
   * margin, revenue and units change at the recommended prices against current prices in that
   * draw (what {@code recommendations/} summarises), or nulls with {@code used} false when the
   * draw was left out of the store's recommendation (its shares could not be inverted, its costs
   * not recovered, or an equilibrium at current prices failed).
   */
  static final StructType DRAWS_SCHEMA = DataTypes.createStructType(List.of(
      f("store_id", DataTypes.StringType, false), f("region", DataTypes.StringType, true),
      f("chain", DataTypes.IntegerType, false), f("draw", DataTypes.IntegerType, false),
      f("used", DataTypes.BooleanType, false),
      f("margin_change", DataTypes.DoubleType, true),
      f("revenue_change", DataTypes.DoubleType, true),
      f("units_change", DataTypes.DoubleType, true)));

  public record Result(String runDir, int stores, int draws, long rows,
      Map<String, Double> seconds) {}

  /**
   * One store's recommendation rows and per-draw rows.
   *
   * @param unrecommended whether the store stocks portfolio products but no posterior draw's
   *     base shares could be inverted, so it has no recommendation rows
   */
  record StoreResult(List<Row> rows, List<Row> draws, boolean unrecommended)
      implements java.io.Serializable {}

  public static Result run(SparkSession spark, RunConfig config, Options o, PrintWriter out) {
    return run(spark, config, o, RunLog.plain("recommend", out));
  }

  /**
   * Runs the job, or does nothing when run {@code o.runId()} exists with the same input files,
   * posterior run, options and configuration (then the result is read from its run.json).
   */
  public static Result run(SparkSession spark, RunConfig config, Options o, RunLog log) {
    PrintWriter out = log.out();
    Map<String, Double> seconds = new LinkedHashMap<>();
    long t0 = System.nanoTime();
    try {
      settings(o.maxMove(), o.response(), o.quantile()); // options checked before any work
    } catch (IllegalArgumentException e) {
      throw new RunFailure(RunFailure.BAD_INPUT, "recommend options: " + e.getMessage());
    }
    String objective = Double.isNaN(o.quantile()) ? "mean"
        : String.format(Locale.ROOT, "q%02d", Math.round(100 * o.quantile()));
    RunIdentity id = RunManifest.identity(spark, "recommend", config, o.input(), o.posterior())
        .option("portfolio", o.portfolio())
        .option("base_weeks", o.baseWeeks())
        .option("draws", o.draws())
        .option("max_move", o.maxMove())
        .option("objective", objective)
        .option("response", o.response().name().toLowerCase(Locale.ROOT))
        .option("own_cost_column", o.ownCostColumn());
    RunDirectory run = RunDirectory.create(spark, o.outputRoot(), o.runId(), id, o.replace());
    run.notes().forEach(n -> log.info("repair", "recommend: " + n));
    if (run.identicalExists()) {
      JsonNode m = run.existing();
      log.info("run_exists", "recommend: run " + run.target() + " already exists with the same"
          + " input files, posterior run, options and configuration; nothing to do",
          "run_dir", run.target());
      return new Result(run.target(), m.path("stores").asInt(), m.path("draws").asInt(),
          m.path("rows").asLong(), Map.of());
    }
    try {
      String dir = run.staging();
      PosteriorRun posterior = PosteriorRun.open(spark, o.posterior());
      ScenarioInputs.Prepared prep;
      try (ValidatedInput validated = InputValidator.run(spark, config, o.input(), dir)) {
        validated.requireRejectShareAtMost(config.validation().maxRejectShare(),
            "the rejects table (run 'aislecast validate' on this input to publish it)");
        prep = ScenarioInputs.prepare(spark, config, validated, posterior, o.baseWeeks(),
            o.portfolio(), o.ownCostColumn());
      }
      for (String owner : o.portfolio()) {
        boolean found = false;
        for (int p = 0; p < prep.catalog().size(); p++) {
          found |= prep.catalog().owner(p).equals(owner);
        }
        if (!found) {
          throw new RunFailure(RunFailure.BAD_INPUT, "--portfolio: owner '" + owner
              + "' owns no product in the input");
        }
      }
      PosteriorRun.Selection sel = posterior.select(spark, o.draws());
      out.printf(Locale.ROOT, "recommend: %d stores x %d draws (of %d), max move %.1f%%,"
          + " objective %s, response %s%n", prep.stores().size(), sel.size(), sel.available(),
          100 * o.maxMove(), objective, o.response().name().toLowerCase(Locale.ROOT));
      out.flush();
      seconds.put("prepare", secondsSince(t0));
      long t1 = System.nanoTime();
      // core settings records are not serialisable: ship the primitives, build them per task
      double maxMove = o.maxMove();
      double quantile = o.quantile();
      Response response = o.response();
      JavaRDD<StoreWork> work = ScenarioInputs.withDraws(spark, prep.stores(), posterior, sel,
          prep.catalog().attributes());
      // kept: the optimisation runs once and feeds both tables
      JavaRDD<StoreResult> results = work.map(w -> recommend(w,
          settings(maxMove, response, quantile), objective))
          .persist(StorageLevel.MEMORY_AND_DISK());
      // repartition, not coalesce: the optimisation stays one task per store partition and only
      // the finished rows meet in one file, sorted so the file does not depend on task timing
      try (TaskProgress progress = TaskProgress.start(spark, log, "optimise")) {
        spark.createDataFrame(results.flatMap(r -> r.rows().iterator()), SCHEMA).repartition(1)
            .sortWithinPartitions("store_id", "product_id").write().mode(SaveMode.ErrorIfExists)
            .parquet(dir + "/" + RECOMMENDATIONS);
        progress.complete();
      }
      spark.createDataFrame(results.flatMap(r -> r.draws().iterator()), DRAWS_SCHEMA)
          .repartition(1).sortWithinPartitions("store_id", "chain", "draw").write()
          .mode(SaveMode.ErrorIfExists).parquet(dir + "/" + RECOMMENDATION_DRAWS);
      long count = spark.read().parquet(dir + "/" + RECOMMENDATIONS).count();
      seconds.put("optimise", secondsSince(t1));
      // do the chains agree on what the recommendation says? (not only on the parameters)
      long t2 = System.nanoTime();
      List<OutputConvergence.Check> outputChecks = OutputConvergence.of(spark,
          OutputConvergence.recommendationChanges(spark,
              spark.read().parquet(dir + "/" + RECOMMENDATION_DRAWS), OUTPUT_NAME), sel);
      List<String> notes = new ArrayList<>(prep.notes());
      String missing = unrecommendedNote(results.filter(StoreResult::unrecommended)
          .map(r -> r.draws().get(0).getString(0)).collect());
      if (missing != null) {
        notes.add(missing);
      }
      notes.addAll(OutputConvergence.notes(outputChecks, posterior.rhatLimit(), sel.size(),
          OutputConvergence.Outputs.RECOMMEND));
      results.unpersist(false);
      seconds.put("output_convergence", secondsSince(t2));
      seconds.put("total", secondsSince(t0));
      Map<String, Object> m = RunManifest.header(spark, id, o.runId(), o.input(),
          o.posterior(), posterior);
      m.put("portfolio", o.portfolio());
      m.put("base_weeks", o.baseWeeks());
      m.put("max_move", o.maxMove());
      m.put("objective", objective);
      m.put("own_cost_column", o.ownCostColumn());
      m.put("response", o.response().name().toLowerCase(Locale.ROOT));
      m.put("stores", prep.stores().size());
      m.put("draws", sel.size());
      m.put("draws_available", sel.available());
      m.put("rows", count);
      m.put("output_convergence", outputChecks.stream().map(OutputConvergence.Check::toJson)
          .toList());
      m.put("notes", notes);
      m.put("timings_seconds", seconds);
      RunManifest.write(spark, dir, m);
      run.commit();
      log.info("published", "Outputs in " + run.target() + ":", "run_dir", run.target(),
          "replaced", o.replace());
      out.println("  " + RECOMMENDATIONS);
      out.println("  " + RECOMMENDATION_DRAWS);
      out.println("  validation/rejects");
      out.println("  " + RunManifest.RUN_JSON);
      out.println("  convergence of the outputs (posterior run's R-hat limit "
          + String.format(Locale.ROOT, "%.3f", posterior.rhatLimit()) + "):");
      for (OutputConvergence.Check k : outputChecks) {
        out.println("    " + OutputConvergence.line(k));
      }
      for (String n : notes) {
        out.println("  note: " + n);
      }
      out.flush();
      return new Result(run.target(), prep.stores().size(), sel.size(), count, seconds);
    } finally {
      run.abort();
    }
  }

  /** The search settings: {@code maxMove} is a fraction here, a percent in the settings. */
  static RecommendSettings settings(double maxMove, Response response, double quantile) {
    return RecommendSettings.defaults().with(100 * maxMove, response, quantile);
  }

  private static double secondsSince(long t0) {
    return (System.nanoTime() - t0) / 1e9;
  }

  /**
   * One store's recommendation rows and per-draw rows (none when the store stocks no portfolio
   * product; per-draw rows with {@code used} false for every draw when no draw could be used).
   */
  static StoreResult recommend(StoreWork w, RecommendSettings settings, String objective) {
    BaseMarket market = w.market();
    int j = w.products();
    List<Row> rows = new ArrayList<>();
    boolean any = false;
    for (String owner : w.owners()) {
      any |= market.inPortfolio(owner);
    }
    if (!any) {
      return new StoreResult(rows, List.of(), false);
    }
    ScenarioEvaluator ev = new ScenarioEvaluator(w.shoppers(), j, EquilibriumSettings.defaults(),
        false);
    BaseUtilities inverter = new BaseUtilities(w.shoppers(), j);
    double[] observed = BaseUtilities.observedShares(w.units(), w.marketSize());
    List<BaseDraw> draws = new ArrayList<>();
    List<Integer> inverted = new ArrayList<>(); // the StoreWork draw of each entry of draws
    int skipped = 0;
    for (int d = 0; d < w.draws(); d++) {
      double[] delta = new double[j];
      ShareInversion.Result inv = inverter.invert(market, w.psi()[d], observed, delta);
      if (!inv.converged()) {
        skipped++;
        continue;
      }
      draws.add(ev.base(market, w.psi()[d], delta));
      inverted.add(d);
    }
    if (draws.isEmpty()) {
      return new StoreResult(rows, drawRows(w, null, inverted), w.draws() > 0);
    }
    Recommendation r = new PriceRecommender(w.shoppers(), j).recommend(draws, settings);
    Bands mc = r.marginChange();
    double units = 0; // the whole portfolio's units: the sum of its products' mean changes
    for (Bands u : r.unitsChange()) {
      units += u.mean();
    }
    double[] change = r.priceChangePercent();
    String response = settings.response().name().toLowerCase(Locale.ROOT);
    for (int q = 0; q < r.productIds().length; q++) {
      int p = market.indexOf(r.productIds()[q]);
      rows.add(RowFactory.create(w.storeId(), w.region(), r.productIds()[q], market.owner(p),
          r.currentPrice()[q], r.recommendedPrice()[q], change[q], r.lower()[q], r.upper()[q],
          r.meanCost()[q], response, objective, r.drawsUsed(), r.drawsDropped() + skipped,
          r.rejectedCandidates(), mc.mean(), mc.q05(), mc.q50(), mc.q95(), mc.probPositive(),
          r.revenueChange().mean(), units, r.evaluations()));
    }
    return new StoreResult(rows, drawRows(w, r.perDraw(), inverted), false);
  }

  /**
   * The note for stores that stock portfolio products but got no recommendation because no
   * posterior draw reproduced their base-period shares; {@code null} when there are none.
   */
  static String unrecommendedNote(List<String> storeIds) {
    if (storeIds.isEmpty()) {
      return null;
    }
    List<String> sorted = storeIds.stream().sorted().toList();
    int shown = Math.min(10, sorted.size());
    return String.format(Locale.ROOT, "%d store%s stock%s portfolio products but got no"
        + " recommendation: at none of the selected posterior draws could the base-period shares"
        + " be reproduced (share inversion did not converge): %s%s. Their draws are in %s with"
        + " used = false", sorted.size(), sorted.size() == 1 ? "" : "s",
        sorted.size() == 1 ? "s" : "", String.join(", ", sorted.subList(0, shown)),
        shown < sorted.size() ? " and " + (sorted.size() - shown) + " more" : "",
        RECOMMENDATION_DRAWS + "/");
  }

  /**
   * One row per selected draw of the store: the recommendation's per-draw changes where it used
   * the draw, nulls elsewhere.
   *
   * @param perDraw null when no draw reached the recommender
   * @param inverted the StoreWork draw of each draw given to the recommender
   */
  private static List<Row> drawRows(StoreWork w, Recommendation.PerDraw perDraw,
      List<Integer> inverted) {
    Row[] byDraw = new Row[w.draws()];
    for (int u = 0; perDraw != null && u < perDraw.size(); u++) {
      int d = inverted.get(perDraw.draw()[u]);
      byDraw[d] = RowFactory.create(w.storeId(), w.region(), w.chain()[d], w.draw()[d], true,
          perDraw.marginChange()[u], perDraw.revenueChange()[u], perDraw.unitsChange()[u]);
    }
    List<Row> out = new ArrayList<>(w.draws());
    for (int d = 0; d < w.draws(); d++) {
      out.add(byDraw[d] != null ? byDraw[d] : RowFactory.create(w.storeId(), w.region(),
          w.chain()[d], w.draw()[d], false, null, null, null));
    }
    return out;
  }
}
