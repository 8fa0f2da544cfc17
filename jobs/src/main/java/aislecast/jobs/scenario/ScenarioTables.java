package aislecast.jobs.scenario;

import java.util.List;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.types.DataType;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.StructField;
import org.apache.spark.sql.types.StructType;

/**
 * The scenario job's Parquet tables (DESIGN section 7), their schemas and the SQL that derives
 * the summaries from the per-draw detail. Every column is lower_snake_case; tables under
 * {@code scenarios/} are partitioned by {@code scenario}. Quantiles are Spark's exact {@code
 * percentile} (linear interpolation between order statistics), so any SQL engine's continuous
 * quantile over the same rows gives the same numbers.
 */
final class ScenarioTables {
  static final String PRODUCT_DETAIL = "scenarios/product_detail";
  static final String STORE_TOTALS = "scenarios/store_totals";
  static final String STORE_SUMMARY = "scenarios/store_summary";
  static final String REGION_SUMMARY = "scenarios/region_summary";
  static final String STORE_CHECKS = "scenarios/store_checks";
  static final String ELASTICITIES = "elasticities";

  private ScenarioTables() {}

  private static StructField f(String name, DataType type, boolean nullable) {
    return DataTypes.createStructField(name, type, nullable);
  }

  private static final DataType S = DataTypes.StringType;
  private static final DataType I = DataTypes.IntegerType;
  private static final DataType D = DataTypes.DoubleType;
  private static final DataType B = DataTypes.BooleanType;

  /**
   * One row per scenario, store, posterior draw and product of the base or scenario assortment.
   * {@code status}: kept, delisted (scenario price null, share/units/revenue/margin 0) or
   * launched (base price null, base_* 0). {@code converged}: the competitors' equilibrium solve
   * converged (always true under hold); {@code cost_recovered}: the first-order conditions gave
   * marginal costs for this draw; {@code cost_nonpositive}: this product's recovered cost is <= 0
   * (kept as is, never clipped).
   */
  static final StructType PRODUCT_DETAIL_SCHEMA = DataTypes.createStructType(List.of(
      f("scenario", S, false), f("store_id", S, false), f("region", S, true),
      f("chain", I, false), f("draw", I, false), f("product_id", S, false),
      f("owner", S, false), f("in_portfolio", B, false), f("status", S, false),
      f("price", D, true), f("cost", D, true), f("share", D, false), f("units", D, false),
      f("revenue", D, false), f("margin", D, true), f("base_price", D, true),
      f("base_share", D, false), f("base_units", D, false), f("base_revenue", D, false),
      f("base_margin", D, true), f("converged", B, false), f("solve_iterations", I, false),
      f("cost_recovered", B, false), f("cost_nonpositive", B, false)));

  /** Base-period checks per store and draw set, from the elasticity pass. */
  static final StructType BASE_CHECKS_SCHEMA = DataTypes.createStructType(List.of(
      f("store_id", S, false), f("draws", I, false), f("inversion_failures", I, false),
      f("max_inversion_residual", D, true), f("cost_failures", I, false),
      f("nonpositive_cost_draws", I, false), f("nonpositive_costs", I, false)));

  /**
   * Base-period elasticities and diversion ratios per store over the posterior draws: {@code
   * elasticity} = d ln s(product_id) / d ln p(wrt_product_id); {@code diversion} = the share of
   * the sales wrt_product_id loses when its price rises that go to product_id (null on the
   * diagonal, where {@code diversion_to_outside} holds the share that leaves the category).
   */
  static final StructType ELASTICITY_SCHEMA = DataTypes.createStructType(List.of(
      f("store_id", S, false), f("region", S, true), f("product_id", S, false),
      f("wrt_product_id", S, false), f("draws", I, false), f("elasticity", D, true),
      f("elasticity_q05", D, true), f("elasticity_q95", D, true), f("diversion", D, true),
      f("diversion_q05", D, true), f("diversion_q95", D, true),
      f("diversion_to_outside", D, true)));

  /** Per-draw totals: portfolio and per owner, units/revenue/margin, base and scenario. */
  static Dataset<Row> storeTotals(SparkSession spark, Dataset<Row> detail) {
    detail.createOrReplaceTempView("aislecast_detail");
    return spark.sql(String.join("\n",
        "WITH by_owner AS (",
        "  SELECT scenario, store_id, region, chain, draw, owner, in_portfolio,",
        "    bool_and(converged) AS converged, bool_and(cost_recovered) AS cost_recovered,",
        "    sum(base_units) AS bu, sum(units) AS u, sum(base_revenue) AS br,",
        "    sum(revenue) AS r, sum(base_margin) AS bm, sum(margin) AS m",
        "  FROM aislecast_detail",
        "  GROUP BY scenario, store_id, region, chain, draw, owner, in_portfolio),",
        "scoped AS (",
        "  SELECT scenario, store_id, region, chain, draw, 'owner' AS scope, owner,",
        "    converged, cost_recovered, bu, u, br, r, bm, m FROM by_owner",
        "  UNION ALL",
        "  SELECT scenario, store_id, region, chain, draw, 'portfolio' AS scope,",
        "    CAST(NULL AS STRING) AS owner, bool_and(converged), bool_and(cost_recovered),",
        "    sum(bu), sum(u), sum(br), sum(r), sum(bm), sum(m)",
        "  FROM by_owner WHERE in_portfolio",
        "  GROUP BY scenario, store_id, region, chain, draw)",
        "SELECT scenario, store_id, region, chain, draw, scope, owner, metric,",
        "  base_value, value, value - base_value AS change, converged, cost_recovered",
        "FROM scoped LATERAL VIEW stack(3, 'units', bu, u, 'revenue', br, r, 'margin', bm, m)",
        "  s AS metric, base_value, value"));
  }

  /** Change against base per store: mean, sd, quantiles, probability of a gain. */
  static Dataset<Row> storeSummary(SparkSession spark, Dataset<Row> totals) {
    totals.createOrReplaceTempView("aislecast_totals");
    return spark.sql(String.join("\n",
        "SELECT scenario, store_id, region, scope, owner, metric, count(*) AS draws,",
        summaryColumns(),
        "FROM aislecast_totals WHERE converged AND cost_recovered",
        "GROUP BY scenario, store_id, region, scope, owner, metric"));
  }

  /**
   * Regional roll-up: per draw, the sum over the region's stores, then summarised over draws
   * that are valid in every store of the region (a draw with a failed solve or unrecovered costs
   * in any store is left out; {@code draws} says how many remain).
   */
  static Dataset<Row> regionSummary(SparkSession spark, Dataset<Row> totals) {
    totals.createOrReplaceTempView("aislecast_totals");
    return spark.sql(String.join("\n",
        "WITH per_draw AS (",
        "  SELECT scenario, region, scope, owner, metric, chain, draw, count(*) AS stores,",
        "    sum(base_value) AS base_value, sum(value) AS value, sum(change) AS change,",
        "    bool_and(converged AND cost_recovered) AS ok",
        "  FROM aislecast_totals GROUP BY scenario, region, scope, owner, metric, chain, draw)",
        "SELECT scenario, region, scope, owner, metric, max(stores) AS stores,",
        "  count(*) AS draws,",
        summaryColumns(),
        "FROM per_draw WHERE ok GROUP BY scenario, region, scope, owner, metric"));
  }

  private static String summaryColumns() {
    return String.join("\n",
        "  avg(base_value) AS base_mean, avg(value) AS value_mean,",
        "  avg(change) AS mean, stddev_samp(change) AS sd,",
        "  percentile(change, 0.05) AS q05, percentile(change, 0.25) AS q25,",
        "  percentile(change, 0.5) AS q50, percentile(change, 0.75) AS q75,",
        "  percentile(change, 0.95) AS q95,",
        "  avg(CASE WHEN change > 0 THEN CAST(1 AS DOUBLE) ELSE CAST(0 AS DOUBLE) END)"
            + " AS prob_gain");
  }

  /** Per scenario and store: failures and counts, never hidden. */
  static Dataset<Row> storeChecks(SparkSession spark, Dataset<Row> detail,
      Dataset<Row> baseChecks) {
    detail.createOrReplaceTempView("aislecast_detail");
    baseChecks.createOrReplaceTempView("aislecast_base_checks");
    return spark.sql(String.join("\n",
        "WITH solves AS (",
        "  SELECT scenario, store_id, region, chain, draw, bool_and(converged) AS converged,",
        "    max(solve_iterations) AS iterations",
        "  FROM aislecast_detail GROUP BY scenario, store_id, region, chain, draw),",
        "per_store AS (",
        "  SELECT scenario, store_id, region, count(*) AS evaluated_draws,",
        "    CAST(sum(CASE WHEN converged THEN 0 ELSE 1 END) AS INT) AS equilibrium_failures,",
        "    max(iterations) AS max_solve_iterations,",
        "    avg(iterations) AS mean_solve_iterations",
        "  FROM solves GROUP BY scenario, store_id, region)",
        "SELECT p.scenario, p.store_id, p.region, b.draws, p.evaluated_draws,",
        "  b.inversion_failures, b.max_inversion_residual, b.cost_failures,",
        "  b.nonpositive_cost_draws, b.nonpositive_costs, p.equilibrium_failures,",
        "  p.max_solve_iterations, p.mean_solve_iterations",
        "FROM per_store p JOIN aislecast_base_checks b ON p.store_id = b.store_id"));
  }
}
