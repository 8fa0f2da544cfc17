package aislecast.jobs.scenario;

import aislecast.core.diag.Diagnostics;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.TreeMap;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;

/**
 * Convergence of what a pricing lead reads, not of the model's parameters: per scenario and
 * metric, the portfolio's change summed over every store, one value per posterior draw, with the
 * draws grouped by chain in draw order; its rank-normalised split R-hat and bulk ESS (Vehtari et
 * al. 2021, {@link Diagnostics}). An estimation run whose hierarchy has not converged can still
 * give scenario totals whose chains agree, or not; this says which.
 */
final class OutputConvergence {
  private OutputConvergence() {}

  /** One scenario's portfolio change in one metric over the posterior draws used. */
  record Check(String scenario, String metric, int chains, int drawsPerChain, double rhat,
      double essBulk) {

    Map<String, Object> toJson() {
      Map<String, Object> m = new java.util.LinkedHashMap<>();
      m.put("scenario", scenario);
      m.put("metric", metric);
      m.put("chains", chains);
      m.put("draws_per_chain", drawsPerChain);
      m.put("rhat", Double.isFinite(rhat) ? rhat : null);
      m.put("ess_bulk", Double.isFinite(essBulk) ? essBulk : null);
      return m;
    }
  }

  /**
   * The checks from the {@code store_totals} table (portfolio scope), in scenario and metric
   * order. Chains of unequal length (an uneven draw selection) are cut to the shortest.
   */
  static List<Check> of(SparkSession spark, Dataset<Row> totals) {
    totals.createOrReplaceTempView("aislecast_totals_check");
    List<Row> rows = spark.sql(String.join("\n",
        "SELECT scenario, metric, chain, draw, sum(change) AS change",
        "FROM aislecast_totals_check WHERE scope = 'portfolio'",
        "GROUP BY scenario, metric, chain, draw")).collectAsList();
    // scenario|metric -> chain -> draw -> change
    Map<String, TreeMap<Integer, TreeMap<Integer, Double>>> by = new TreeMap<>();
    for (Row r : rows) {
      by.computeIfAbsent(r.getString(0) + "\u0000" + r.getString(1), k -> new TreeMap<>())
          .computeIfAbsent(r.getInt(2), k -> new TreeMap<>()).put(r.getInt(3), r.getDouble(4));
    }
    List<Check> out = new ArrayList<>();
    for (var e : by.entrySet()) {
      String[] key = e.getKey().split("\u0000", 2);
      int n = Integer.MAX_VALUE;
      for (TreeMap<Integer, Double> ch : e.getValue().values()) {
        n = Math.min(n, ch.size());
      }
      double[][] chains = new double[e.getValue().size()][n];
      int c = 0;
      for (TreeMap<Integer, Double> ch : e.getValue().values()) {
        int i = 0;
        for (double v : ch.values()) {
          if (i == n) {
            break;
          }
          chains[c][i++] = v;
        }
        c++;
      }
      out.add(new Check(key[0], key[1], chains.length, n, Diagnostics.rankRhat(chains),
          Diagnostics.essBulk(chains)));
    }
    return out;
  }

  /** One console line per check. */
  static String line(Check k) {
    return String.format(Locale.ROOT, "%s, portfolio %s change over all stores: R-hat %s, bulk"
        + " ESS %s (%d chains x %d draws)", k.scenario(), k.metric(), fmt(k.rhat(), "%.3f"),
        fmt(k.essBulk(), "%.0f"), k.chains(), k.drawsPerChain());
  }

  /**
   * One note per scenario naming its outputs whose R-hat is above {@code limit} (checks come in
   * scenario order), and one note when some cannot be computed (fewer than two chains or too few
   * draws per chain).
   */
  static List<String> notes(List<Check> checks, double limit) {
    List<String> notes = new ArrayList<>();
    Map<String, List<String>> above = new java.util.LinkedHashMap<>();
    int unknown = 0;
    for (Check k : checks) {
      if (Double.isNaN(k.rhat())) {
        unknown++;
      } else if (!(k.rhat() <= limit)) {
        above.computeIfAbsent(k.scenario(), x -> new ArrayList<>())
            .add(k.metric() + " (R-hat " + fmt(k.rhat(), "%.3f") + ")");
      }
    }
    above.forEach((scenario, metrics) -> notes.add(String.format(Locale.ROOT,
        "scenario %s: the chains disagree about the portfolio's %s change over the posterior"
            + " draws used (R-hat limit %.3f), so those bands are not reliable yet", scenario,
        String.join(", ", metrics), limit)));
    if (unknown > 0) {
      notes.add(String.format(Locale.ROOT, "the convergence of %d of %d scenario outputs cannot be"
          + " checked: R-hat needs at least 2 chains with %d draws each among the posterior draws"
          + " used (--draws)", unknown, checks.size(), Diagnostics.MIN_DRAWS));
    }
    return notes;
  }

  private static String fmt(double v, String f) {
    return Double.isFinite(v) ? String.format(Locale.ROOT, f, v) : "n/a";
  }
}
