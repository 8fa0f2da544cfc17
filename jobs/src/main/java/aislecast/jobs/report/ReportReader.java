package aislecast.jobs.report;

import static org.apache.spark.sql.functions.col;
import static org.apache.spark.sql.functions.lit;

import aislecast.jobs.config.RunFailure;
import aislecast.jobs.report.ReportData.Band;
import aislecast.jobs.report.ReportData.ElasticityMatrix;
import aislecast.jobs.report.ReportData.ParameterRow;
import aislecast.jobs.report.ReportData.ScenarioBands;
import aislecast.jobs.report.ReportData.Table;
import com.fasterxml.jackson.databind.JsonNode;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;
import java.util.TreeSet;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;

/**
 * Reads the report's numbers from the run folders with Spark. Only small results come back to the
 * driver: the summary table, the draws of a handful of parameters, one row per store and scenario,
 * one store's elasticities and the recommendations (capped at {@link #MAX_TABLE_ROWS}).
 */
final class ReportReader {
  /** Parameters whose densities and traces are drawn, in this order, when present. */
  static final List<String> KEY_PARAMETERS = List.of("lambda", "Gamma[0,0]", "sigma_xi2",
      "kappabar[0]", "kappabar[1]", "kappabar[2]");

  /** The change the forest plots show: the portfolio's revenue against the base period. */
  static final String BAND_METRIC = "revenue";
  static final String BAND_SCOPE = "portfolio";

  static final int MAX_TABLE_ROWS = 1000;

  static final List<String> RECOMMENDATION_COLUMNS = List.of("store_id", "region", "product_id",
      "owner", "current_price", "recommended_price", "change_pct", "lower_price", "upper_price",
      "mean_cost", "response", "objective", "margin_change_mean", "margin_change_q05",
      "margin_change_q95", "prob_gain", "revenue_change_mean", "units_change_mean", "draws",
      "skipped_draws", "failed_solves");

  private final SparkSession spark;
  private final RunTables tables;
  private final List<String> notes = new ArrayList<>();

  private ReportReader(SparkSession spark, RunTables tables) {
    this.spark = spark;
    this.tables = tables;
  }

  /**
   * Reads everything the report shows.
   *
   * @param store store whose elasticities are drawn, or null for the first store
   * @throws RunFailure exit 2 when {@code store} is given but not in the elasticities table
   */
  static ReportData read(SparkSession spark, RunTables tables, String store) {
    ReportReader r = new ReportReader(spark, tables);
    for (RunTables.RunFolder f : tables.folders()) {
      if (f.problem() != null) {
        r.notes.add("Run folder " + f.dir() + ": " + f.problem() + ".");
      }
    }
    List<ParameterRow> summary = r.summary();
    JsonNode rhat = tables.manifestValue("/convergence/rhat_max_limit");
    JsonNode ess = tables.manifestValue("/convergence/ess_min_limit");
    Map<String, double[][]> draws = r.keyDraws();
    List<ScenarioBands> scenarios = r.bands();
    ElasticityMatrix el = r.elasticities(store);
    Table rec = r.recommendations();
    return new ReportData(tables.folders(), summary,
        rhat.isNumber() ? rhat.asDouble() : Double.NaN,
        ess.isNumber() ? ess.asDouble() : Double.NaN, draws, scenarios, el, rec,
        List.copyOf(r.notes));
  }

  /** The table's Dataset, or null (with a note) when it is missing or lacks a column. */
  private Dataset<Row> open(String table, String why, String... columns) {
    String path = tables.find(table);
    if (path == null) {
      notes.add("No " + table + " table in the run folders given, so the report has no " + why
          + ".");
      return null;
    }
    Dataset<Row> ds = spark.read().parquet(path);
    List<String> have = Arrays.asList(ds.columns());
    List<String> missing = new ArrayList<>();
    for (String c : columns) {
      if (!have.contains(c)) {
        missing.add(c);
      }
    }
    if (!missing.isEmpty()) {
      notes.add("The " + table + " table at " + path + " lacks column(s) " + missing + ", so"
          + " the report has no " + why + ".");
      return null;
    }
    return ds;
  }

  private List<ParameterRow> summary() {
    Dataset<Row> ds = open(RunTables.SUMMARY, "convergence table", "parameter", "mean", "sd",
        "q05", "q50", "q95", "rhat", "ess_bulk", "ess_tail", "mcse_mean");
    List<ParameterRow> out = new ArrayList<>();
    if (ds == null) {
      return out;
    }
    for (Row row : ds.select("parameter", "mean", "sd", "q05", "q50", "q95", "rhat", "ess_bulk",
        "ess_tail", "mcse_mean").collectAsList()) {
      out.add(new ParameterRow(row.getString(0), d(row, 1), d(row, 2), d(row, 3), d(row, 4),
          d(row, 5), d(row, 6), d(row, 7), d(row, 8), d(row, 9)));
    }
    out.sort((a, b) -> compareParameters(a.parameter(), b.parameter()));
    return out;
  }

  /** Name, then numeric indices in order, so kappabar[10] follows kappabar[9]. */
  static int compareParameters(String a, String b) {
    String[] pa = a.split("[\\[\\],]");
    String[] pb = b.split("[\\[\\],]");
    for (int i = 0; i < Math.min(pa.length, pb.length); i++) {
      int c;
      if (pa[i].matches("\\d+") && pb[i].matches("\\d+")) {
        c = Integer.compare(Integer.parseInt(pa[i]), Integer.parseInt(pb[i]));
      } else {
        c = pa[i].compareTo(pb[i]);
      }
      if (c != 0) {
        return c;
      }
    }
    return Integer.compare(pa.length, pb.length);
  }

  private Map<String, double[][]> keyDraws() {
    Dataset<Row> ds = open(RunTables.GLOBAL_DRAWS, "posterior densities and traces", "chain",
        "draw", "parameter", "value");
    Map<String, double[][]> out = new LinkedHashMap<>();
    if (ds == null) {
      return out;
    }
    List<Row> rows = ds.where(col("parameter").isin(KEY_PARAMETERS.toArray()))
        .select("parameter", "chain", "draw", "value").collectAsList();
    Map<String, int[]> size = new HashMap<>();
    for (Row row : rows) {
      int[] s = size.computeIfAbsent(row.getString(0), k -> new int[2]);
      s[0] = Math.max(s[0], row.getInt(1) + 1);
      s[1] = Math.max(s[1], row.getInt(2) + 1);
    }
    for (String p : KEY_PARAMETERS) {
      if (size.containsKey(p)) {
        double[][] v = new double[size.get(p)[0]][size.get(p)[1]];
        for (double[] c : v) {
          Arrays.fill(c, Double.NaN);
        }
        out.put(p, v);
      }
    }
    for (Row row : rows) {
      out.get(row.getString(0))[row.getInt(1)][row.getInt(2)] = d(row, 3);
    }
    out.values().removeIf(v -> !anyFinite(v));
    if (out.isEmpty()) {
      notes.add("The global draws table has none of " + KEY_PARAMETERS
          + " with finite values, so no densities or traces are shown.");
    }
    return out;
  }

  private static boolean anyFinite(double[][] v) {
    for (double[] c : v) {
      for (double x : c) {
        if (Double.isFinite(x)) {
          return true;
        }
      }
    }
    return false;
  }

  private List<ScenarioBands> bands() {
    String[] cols = {"scenario", "store_id", "region", "scope", "metric", "draws", "mean", "q05",
        "q25", "q50", "q75", "q95", "prob_gain"};
    Dataset<Row> stores = open(RunTables.STORE_SUMMARY, "per-store revenue change bands",
        cols);
    List<ScenarioBands> out = new ArrayList<>();
    if (stores == null) {
      return out;
    }
    Map<String, List<Band>> byScenario = new TreeMap<>();
    for (Row row : selectBands(stores, true).collectAsList()) {
      byScenario.computeIfAbsent(row.getString(0), k -> new ArrayList<>()).add(band(row));
    }
    Map<String, List<Band>> regions = new HashMap<>();
    Dataset<Row> reg = open(RunTables.REGION_SUMMARY, "regional revenue change table",
        "scenario", "region", "scope", "metric", "draws", "mean", "q05", "q25", "q50", "q75",
        "q95", "prob_gain");
    if (reg != null) {
      for (Row row : selectBands(reg, false).collectAsList()) {
        regions.computeIfAbsent(row.getString(0), k -> new ArrayList<>()).add(band(row));
      }
    }
    if (byScenario.isEmpty()) {
      notes.add("The store summary table has no rows of the portfolio's revenue change, so no"
          + " forest plots are shown.");
    }
    byScenario.forEach((s, b) -> out.add(new ScenarioBands(s, b, regions.getOrDefault(s,
        List.of()))));
    return out;
  }

  private static Dataset<Row> selectBands(Dataset<Row> ds, boolean perStore) {
    Column store = perStore ? col("store_id") : lit(null).cast("string");
    return ds.where(col("metric").equalTo(BAND_METRIC).and(col("scope").equalTo(BAND_SCOPE)))
        .select(col("scenario"), store, col("region"), col("draws").cast("long"), col("mean"),
            col("q05"), col("q25"), col("q50"), col("q75"), col("q95"), col("prob_gain"))
        .orderBy(col("scenario"), col("region"), store);
  }

  private static Band band(Row row) {
    return new Band(row.isNullAt(1) ? null : row.getString(1),
        row.isNullAt(2) ? "(no region)" : row.getString(2), row.isNullAt(3) ? 0 : row.getLong(3),
        d(row, 4), d(row, 5), d(row, 6), d(row, 7), d(row, 8), d(row, 9), d(row, 10));
  }

  private ElasticityMatrix elasticities(String store) {
    Dataset<Row> ds = open(RunTables.ELASTICITIES, "elasticity heat map", "store_id",
        "region", "product_id", "wrt_product_id", "draws", "elasticity");
    if (ds == null) {
      if (store != null) {
        throw new RunFailure(RunFailure.BAD_INPUT, "--store " + store + ": the run folders have"
            + " no " + RunTables.ELASTICITIES + " table");
      }
      return null;
    }
    List<String> all = new ArrayList<>();
    for (Row row : ds.select("store_id").distinct().orderBy("store_id").collectAsList()) {
      all.add(row.getString(0));
    }
    if (all.isEmpty()) {
      notes.add("The elasticities table is empty, so no heat map is shown.");
      return null;
    }
    String chosen = store == null ? all.get(0) : store;
    if (!all.contains(chosen)) {
      throw new RunFailure(RunFailure.BAD_INPUT, "--store " + store + " is not in the"
          + " elasticities table; its stores are " + preview(all));
    }
    List<Row> rows = ds.where(col("store_id").equalTo(chosen))
        .select("product_id", "wrt_product_id", "elasticity", "draws", "region").collectAsList();
    TreeSet<String> ids = new TreeSet<>();
    for (Row row : rows) {
      ids.add(row.getString(0));
      ids.add(row.getString(1));
    }
    String[] products = ids.toArray(new String[0]);
    Map<String, Integer> index = new HashMap<>();
    for (int i = 0; i < products.length; i++) {
      index.put(products[i], i);
    }
    double[][] m = new double[products.length][products.length];
    for (double[] r : m) {
      Arrays.fill(r, Double.NaN);
    }
    long draws = 0;
    String region = null;
    for (Row row : rows) {
      m[index.get(row.getString(0))][index.get(row.getString(1))] = d(row, 2);
      draws = Math.max(draws, row.isNullAt(3) ? 0 : ((Number) row.get(3)).longValue());
      region = row.isNullAt(4) ? region : row.getString(4);
    }
    List<String> others = new ArrayList<>(all);
    others.remove(chosen);
    return new ElasticityMatrix(chosen, region, products, m, draws, others);
  }

  private static String preview(List<String> all) {
    return all.size() <= 12 ? String.join(", ", all)
        : String.join(", ", all.subList(0, 12)) + ", ... (" + all.size() + " in all)";
  }

  private Table recommendations() {
    Dataset<Row> ds = open(RunTables.RECOMMENDATIONS, "recommendations table", "store_id",
        "product_id", "current_price", "recommended_price");
    if (ds == null) {
      return null;
    }
    List<String> have = Arrays.asList(ds.columns());
    List<String> cols = new ArrayList<>();
    for (String c : RECOMMENDATION_COLUMNS) {
      if (have.contains(c)) {
        cols.add(c);
      }
    }
    Dataset<Row> ordered = ds.select(cols.stream().map(c -> col(c)).toArray(Column[]::new))
        .orderBy("store_id", "product_id");
    long total = ordered.count();
    List<Object[]> rows = new ArrayList<>();
    for (Row row : ordered.limit(MAX_TABLE_ROWS).collectAsList()) {
      Object[] cells = new Object[cols.size()];
      for (int i = 0; i < cells.length; i++) {
        cells[i] = row.isNullAt(i) ? null : row.get(i);
      }
      rows.add(cells);
    }
    if (total > MAX_TABLE_ROWS) {
      notes.add("The recommendations table has " + total + " rows; the first " + MAX_TABLE_ROWS
          + " (by store and product) are shown. Query the Parquet table for the rest.");
    }
    return new Table(cols, rows, total);
  }

  private static double d(Row row, int i) {
    return row.isNullAt(i) ? Double.NaN : ((Number) row.get(i)).doubleValue();
  }
}
