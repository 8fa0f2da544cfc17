package aislecast.jobs.scenario;

import aislecast.core.model.ProductCatalog;
import aislecast.core.model.StoreData;
import aislecast.core.scenario.BaseUtilities;
import aislecast.jobs.config.RunConfig;
import aislecast.jobs.config.RunFailure;
import aislecast.jobs.estimate.EstimationProblem;
import aislecast.jobs.estimate.ProblemBuilder;
import aislecast.jobs.validate.ValidatedInput;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.HashSet;
import java.util.List;
import java.util.Map;
import java.util.Set;
import org.apache.spark.api.java.JavaPairRDD;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.api.java.JavaSparkContext;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import scala.Tuple2;

/**
 * The per-store inputs of the scenario and recommendation jobs, built from the validated input
 * exactly as estimation builds them (same product catalog and attribute standardisation, same
 * shopper draws: the input's table, or generated with the estimation run's seed and R), plus the
 * base period of each store:
 *
 * <ul>
 *   <li>assortment: the products stocked in the store's latest week;
 *   <li>with {@code baseWeeks = n}: each product's price and units are their means over the
 *       weeks among the last n in which it was stocked; the market size is the mean over the last
 *       n weeks (n = 1: the latest week as observed);
 *   <li>known marginal costs (optional): for the portfolio's products, the mean over the same
 *       weeks of a cost-shifter column (e.g. the user's own {@code unit_cost}); every other cost
 *       comes from the first-order conditions.
 * </ul>
 *
 * Stores without posterior draws are left out with a note.
 */
final class ScenarioInputs {
  private ScenarioInputs() {}

  /** Driver-side result: stores without draws yet, the catalog, and notes. */
  record Prepared(ProductCatalog catalog, List<StoreWork> stores, List<String> notes) {}

  /**
   * A note when the posterior run did not meet its convergence limits (its run.json status is
   * not_converged, not_converged_allowed or stopped), else null.
   */
  static String convergenceNote(String status) {
    boolean unconverged = false;
    for (var st : new aislecast.jobs.estimate.EstimateJob.Status[] {
        aislecast.jobs.estimate.EstimateJob.Status.NOT_CONVERGED,
        aislecast.jobs.estimate.EstimateJob.Status.UNCONVERGED_ALLOWED,
        aislecast.jobs.estimate.EstimateJob.Status.STOPPED}) {
      unconverged |= st.label.equals(status);
    }
    if (!unconverged) {
      return null;
    }
    return "the posterior run's status is '" + status + "': it did not meet its convergence"
        + " limits, so treat these results as indicative only (on simulated data, runs like it"
        + " understated price sensitivity; see README, Estimation)";
  }

  static Prepared prepare(SparkSession spark, RunConfig config, ValidatedInput validated,
      PosteriorRun posterior, int baseWeeks, List<String> portfolio, String ownCostColumn) {
    JavaSparkContext jsc = JavaSparkContext.fromSparkContext(spark.sparkContext());
    List<String> notes = new ArrayList<>();
    int generated = posterior.generatedShopperDraws() != null
        ? posterior.generatedShopperDraws() : config.sampler().shopperDraws();
    if (posterior.generatedShopperDraws() == null && validated.shopperDraws().isEmpty()) {
      notes.add("posterior run.json does not record sampler.shopper_draws; generated shopper"
          + " draws use R = " + generated + " from the configuration");
    }
    String unconverged = convergenceNote(posterior.status());
    if (unconverged != null) {
      notes.add(unconverged);
    }
    // what estimation said about its own result (e.g. a variance prior pulling) holds for every
    // result computed from its draws
    posterior.notes().forEach(n -> notes.add("posterior run: " + n));
    EstimationProblem problem = ProblemBuilder.build(jsc, validated, posterior.seed(), generated);
    notes.addAll(problem.notes());
    Map<String, String> region = new HashMap<>();
    for (Row r : validated.stores().select("store_id", "region").collectAsList()) {
      region.put(r.getString(0), r.getString(1));
    }
    Set<String> withDraws = new HashSet<>(posterior.stores(spark));
    ProductCatalog catalog = problem.catalog();
    int costIndex = -1;
    if (ownCostColumn != null) {
      costIndex = problem.costShifters().indexOf(ownCostColumn);
      if (costIndex < 0) {
        throw new RunFailure(RunFailure.BAD_INPUT, "own cost column '" + ownCostColumn
            + "' is not a cost shifter of the sales table (cost shifters: "
            + problem.costShifters() + ")");
      }
    }
    List<StoreWork> stores = new ArrayList<>();
    List<String> missing = new ArrayList<>();
    for (StoreData d : problem.stores()) {
      if (!withDraws.contains(d.storeId)) {
        missing.add(d.storeId);
        continue;
      }
      stores.add(basePeriod(d, catalog, region.get(d.storeId), baseWeeks, portfolio, costIndex));
    }
    if (!missing.isEmpty()) {
      notes.add(missing.size() + " store(s) have no posterior draws and are left out, e.g. "
          + String.join(", ", missing.subList(0, Math.min(5, missing.size()))));
    }
    if (stores.isEmpty()) {
      throw new RunFailure(RunFailure.BAD_INPUT, "no store of the input has posterior draws in "
          + posterior.dir() + "; was it estimated on this input?");
    }
    return new Prepared(catalog, stores, notes);
  }

  /** One store's base period (see the class comment). */
  static StoreWork basePeriod(StoreData d, ProductCatalog catalog, String region, int baseWeeks,
      List<String> portfolio, int costIndex) {
    int t = d.markets();
    int first = Math.max(0, t - baseWeeks);
    int lastStart = d.rowStart[t - 1];
    int lastEnd = d.rowStart[t];
    int j = lastEnd - lastStart;
    int kx = catalog.attributes();
    Map<Integer, Integer> pos = new HashMap<>();
    String[] ids = new String[j];
    String[] owners = new String[j];
    double[] x = new double[j * kx];
    for (int q = 0; q < j; q++) {
      int p = d.product[lastStart + q];
      pos.put(p, q);
      ids[q] = catalog.id(p);
      owners[q] = catalog.owner(p);
      System.arraycopy(catalog.x(), p * kx, x, q * kx, kx);
    }
    double[] price = new double[j];
    double[] units = new double[j];
    double[] cost = new double[j];
    int[] weeks = new int[j];
    double size = 0;
    for (int w = first; w < t; w++) {
      size += d.marketSize[w];
      for (int row = d.rowStart[w]; row < d.rowStart[w + 1]; row++) {
        Integer q = pos.get(d.product[row]);
        if (q != null) {
          price[q] += d.price[row];
          units[q] += d.units[row];
          if (costIndex >= 0) {
            cost[q] += Math.exp(d.c[row * d.kc + costIndex]); // cost shifters are stored as logs
          }
          weeks[q]++;
        }
      }
    }
    size /= t - first;
    for (int q = 0; q < j; q++) {
      price[q] /= weeks[q];
      units[q] /= weeks[q];
      cost[q] = costIndex >= 0 && portfolio.contains(owners[q]) ? cost[q] / weeks[q] : Double.NaN;
    }
    BaseUtilities.observedShares(units, size); // fails early on a market with no outside option
    return new StoreWork(d.storeId, region, ids, owners, kx, x, price, units, size, d.nu,
        d.shoppers, List.copyOf(portfolio), new int[0], new int[0], new double[0][],
        List.of(), costIndex >= 0 ? cost : null);
  }

  /** The stores as an RDD keyed by store, each with its selected psi draws attached. */
  static JavaRDD<StoreWork> withDraws(SparkSession spark, List<StoreWork> stores,
      PosteriorRun posterior, PosteriorRun.Selection sel, int kx) {
    JavaSparkContext jsc = JavaSparkContext.fromSparkContext(spark.sparkContext());
    int partitions = Math.max(1, Math.min(stores.size(), 4 * jsc.defaultParallelism()));
    List<Tuple2<String, StoreWork>> keyed = new ArrayList<>();
    for (StoreWork s : stores) {
      keyed.add(new Tuple2<>(s.storeId(), s));
    }
    JavaPairRDD<String, StoreWork> base = jsc.parallelizePairs(keyed, partitions);
    JavaPairRDD<String, double[][]> psi = posterior.psiByStore(spark, sel, kx, partitions);
    int[] chain = sel.chain();
    int[] draw = sel.draw();
    return base.join(psi, partitions).values()
        .map(t -> t._1().withDraws(chain, draw, t._2()));
  }
}
