package aislecast.jobs.scenario;

import aislecast.core.diag.Diagnostics;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.TreeMap;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;

/**
 * Convergence of what a pricing lead reads, not of the model's parameters: per output (a scenario,
 * or recommend's recommended prices) and metric, the portfolio's change summed over every store,
 * one value per posterior draw, with the draws grouped by chain in draw order; its
 * rank-normalised split R-hat and bulk ESS (Vehtari et al. 2021, {@link Diagnostics}). An
 * estimation run whose hierarchy has not converged can still give totals whose chains agree, or
 * not; this says which. Used by {@code scenarios} and {@code recommend} alike.
 *
 * <p>A draw counts only when every store of the output has a valid value for it (a draw whose
 * share inversion, cost recovery or equilibrium failed in one store would otherwise give a total
 * over fewer stores); the others are left out and counted. A chain with fewer than {@link
 * Diagnostics#MIN_DRAWS} such draws is left out too (and counted, and named in a note), as long
 * as two chains with enough draws remain: otherwise one chain stuck where the figures fail would
 * make the whole check impossible. Chains are then cut to the shortest, as R-hat needs chains of
 * equal length.
 */
final class OutputConvergence {
  private OutputConvergence() {}

  /** Whose outputs are checked: how notes name them. */
  enum Outputs {
    SCENARIOS("scenario ", "scenario outputs"),
    RECOMMEND("", "recommendation outputs");

    private final String prefix;
    private final String plural;

    Outputs(String prefix, String plural) {
      this.prefix = prefix;
      this.plural = plural;
    }
  }

  /**
   * One output's portfolio change in one metric over the posterior draws used.
   *
   * @param drawsLeftOut selected draws without a valid value in every store (not counting those
   *     cut to give every chain the same length)
   * @param chainsLeftOut chains left out for having too few valid draws ({@code chains} counts
   *     the others)
   */
  record Check(String scenario, String metric, int chains, int drawsPerChain, int drawsLeftOut,
      double rhat, double essBulk, int chainsLeftOut) {

    Check(String scenario, String metric, int chains, int drawsPerChain, int drawsLeftOut,
        double rhat, double essBulk) {
      this(scenario, metric, chains, drawsPerChain, drawsLeftOut, rhat, essBulk, 0);
    }

    Map<String, Object> toJson() {
      Map<String, Object> m = new LinkedHashMap<>();
      m.put("scenario", scenario);
      m.put("metric", metric);
      m.put("chains", chains);
      m.put("draws_per_chain", drawsPerChain);
      m.put("draws_left_out", drawsLeftOut);
      m.put("chains_left_out", chainsLeftOut);
      m.put("rhat", Double.isFinite(rhat) ? rhat : null);
      m.put("ess_bulk", Double.isFinite(essBulk) ? essBulk : null);
      return m;
    }
  }

  /**
   * The checks, in output and metric order.
   *
   * @param perStore one row per output, metric, store and posterior draw with columns {@code
   *     scenario} (the output's name), {@code metric}, {@code store_id}, {@code chain}, {@code
   *     draw}, {@code change} (the store's portfolio change, null when unknown) and {@code ok}
   *     (the draw's figures in that store are valid); a draw a store has no row for counts as not
   *     valid there
   * @param sel the posterior draws the run used
   */
  static List<Check> of(SparkSession spark, Dataset<Row> perStore, PosteriorRun.Selection sel) {
    perStore.createOrReplaceTempView("aislecast_output_check");
    List<Row> rows = spark.sql(String.join("\n",
        "WITH stores AS (",
        "  SELECT scenario, metric, count(DISTINCT store_id) AS n",
        "  FROM aislecast_output_check GROUP BY scenario, metric)",
        "SELECT v.scenario, v.metric, v.chain, v.draw, sum(v.change) AS change,",
        "  count(DISTINCT v.store_id) = max(s.n) AND bool_and(v.ok AND v.change IS NOT NULL)",
        "    AS complete",
        "FROM aislecast_output_check v",
        "JOIN stores s ON v.scenario = s.scenario AND v.metric = s.metric",
        "GROUP BY v.scenario, v.metric, v.chain, v.draw")).collectAsList();
    // scenario|metric -> "chain/draw" -> total over stores, complete draws only
    Map<String, Map<String, Double>> by = new TreeMap<>();
    for (Row r : rows) {
      Map<String, Double> m = by.computeIfAbsent(r.getString(0) + "\u0000" + r.getString(1),
          k -> new HashMap<>());
      if (r.getBoolean(5)) {
        m.put(r.getInt(2) + "/" + r.getInt(3), r.getDouble(4));
      }
    }
    List<Check> out = new ArrayList<>();
    for (var e : by.entrySet()) {
      String[] key = e.getKey().split("\u0000", 2);
      // the selection is in chain and draw order: walk it, keeping the complete draws
      TreeMap<Integer, List<Double>> chains = new TreeMap<>();
      int leftOut = 0;
      for (int i = 0; i < sel.size(); i++) {
        List<Double> chain = chains.computeIfAbsent(sel.chain()[i], c -> new ArrayList<>());
        Double v = e.getValue().get(sel.chain()[i] + "/" + sel.draw()[i]);
        if (v == null) {
          leftOut++;
        } else {
          chain.add(v);
        }
      }
      int enough = 0;
      for (List<Double> ch : chains.values()) {
        enough += ch.size() >= Diagnostics.MIN_DRAWS ? 1 : 0;
      }
      int chainsLeftOut = 0;
      if (enough >= 2 && enough < chains.size()) {
        chainsLeftOut = chains.size() - enough;
        chains.values().removeIf(ch -> ch.size() < Diagnostics.MIN_DRAWS);
      }
      int n = Integer.MAX_VALUE;
      for (List<Double> ch : chains.values()) {
        n = Math.min(n, ch.size());
      }
      double rhat = Double.NaN;
      double ess = Double.NaN;
      if (n > 0) {
        double[][] x = new double[chains.size()][n];
        int c = 0;
        for (List<Double> ch : chains.values()) {
          for (int i = 0; i < n; i++) {
            x[c][i] = ch.get(i);
          }
          c++;
        }
        rhat = Diagnostics.rankRhat(x);
        ess = Diagnostics.essBulk(x);
      }
      out.add(new Check(key[0], key[1], chains.size(), n, leftOut, rhat, ess, chainsLeftOut));
    }
    return out;
  }

  /**
   * scenarios' {@code store_totals} in the shape {@link #of} reads: the portfolio rows, valid
   * where the equilibrium converged and the costs were recovered (as in the regional summary).
   */
  static Dataset<Row> scenarioChanges(Dataset<Row> storeTotals) {
    return storeTotals.filter("scope = 'portfolio'").selectExpr("scenario", "metric",
        "store_id", "chain", "draw", "change", "converged AND cost_recovered AS ok");
  }

  /**
   * recommend's {@code recommendation_draws} in the shape {@link #of} reads, under the output
   * name {@code name}: per store, draw and metric the portfolio change, valid where the draw was
   * used.
   */
  static Dataset<Row> recommendationChanges(SparkSession spark, Dataset<Row> draws,
      String name) {
    draws.createOrReplaceTempView("aislecast_recommendation_draws");
    return spark.sql(String.join("\n",
        "SELECT '" + name.replace("'", "''") + "' AS scenario, metric, store_id, chain, draw,",
        "  change, used AS ok",
        "FROM aislecast_recommendation_draws LATERAL VIEW stack(3, 'units', units_change,",
        "  'revenue', revenue_change, 'margin', margin_change) s AS metric, change"));
  }

  /** One console line per check. */
  static String line(Check k) {
    return String.format(Locale.ROOT, "%s, portfolio %s change over all stores: R-hat %s, bulk"
        + " ESS %s (%d chains x %d draws%s)", k.scenario(), k.metric(), fmt(k.rhat(), "%.3f"),
        fmt(k.essBulk(), "%.0f"), k.chains(), k.drawsPerChain(), (k.drawsLeftOut() == 0 ? ""
            : "; " + k.drawsLeftOut() + " draws left out, not valid in every store")
            + (k.chainsLeftOut() == 0 ? "" : "; " + k.chainsLeftOut() + " chain(s) left out"));
  }

  /**
   * One note per output naming its metrics whose R-hat is above {@code limit} (checks come in
   * output order), one per output with draws left out, and one note when some checks cannot be
   * computed (fewer than two chains or too few draws per chain).
   */
  static List<String> notes(List<Check> checks, double limit, int selected, Outputs kind) {
    List<String> notes = new ArrayList<>();
    Map<String, List<String>> above = new LinkedHashMap<>();
    Map<String, Integer> leftOut = new LinkedHashMap<>();
    Map<String, Integer> chainsOut = new LinkedHashMap<>();
    int unknown = 0;
    for (Check k : checks) {
      if (k.drawsLeftOut() > 0) {
        leftOut.merge(k.scenario(), k.drawsLeftOut(), Math::max);
      }
      if (k.chainsLeftOut() > 0) {
        chainsOut.merge(k.scenario(), k.chainsLeftOut(), Math::max);
      }
      if (Double.isNaN(k.rhat())) {
        unknown++;
      } else if (!(k.rhat() <= limit)) {
        above.computeIfAbsent(k.scenario(), x -> new ArrayList<>())
            .add(k.metric() + " (R-hat " + fmt(k.rhat(), "%.3f") + ")");
      }
    }
    leftOut.forEach((name, n) -> notes.add(String.format(Locale.ROOT, "%s%s: %d of %d posterior"
        + " draws left out of the output convergence check because they are not valid in every"
        + " store (a share inversion, cost recovery or equilibrium failed)", kind.prefix, name, n,
        selected)));
    chainsOut.forEach((name, n) -> notes.add(String.format(Locale.ROOT, "%s%s: %d chain(s) left"
        + " out of the output convergence check because fewer than %d of their draws are valid"
        + " in every store; such a chain sits where the model's figures fail, so the chains"
        + " cannot be said to agree", kind.prefix, name, n, Diagnostics.MIN_DRAWS)));
    above.forEach((name, metrics) -> notes.add(String.format(Locale.ROOT,
        "%s%s: the chains disagree about the portfolio's %s change over the posterior"
            + " draws used (R-hat limit %.3f), so those bands are not reliable yet", kind.prefix,
        name, String.join(", ", metrics), limit)));
    if (unknown > 0) {
      notes.add(String.format(Locale.ROOT, "the convergence of %d of %d %s cannot be"
          + " checked: R-hat needs at least 2 chains with %d draws each among the posterior draws"
          + " used (--draws)", unknown, checks.size(), kind.plural, Diagnostics.MIN_DRAWS));
    }
    return notes;
  }

  private static String fmt(double v, String f) {
    return Double.isFinite(v) ? String.format(Locale.ROOT, f, v) : "n/a";
  }
}
