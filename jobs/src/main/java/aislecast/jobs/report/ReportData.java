package aislecast.jobs.report;

import java.util.List;
import java.util.Map;

/**
 * Everything the report shows, read from the run folders; a missing piece is null or empty and
 * explained in {@link #notes()}.
 *
 * @param runs the run folders with their manifests
 * @param summary per global parameter, in the table's order
 * @param rhatMax R-hat limit of the estimation run (NaN when unknown)
 * @param essMin bulk/tail ESS limit of the estimation run (NaN when unknown)
 * @param draws key parameter -> [chain][kept draw] (NaN where a draw is missing)
 * @param scenarios per scenario, the stores' and regions' revenue change bands
 * @param elasticities the chosen store's elasticity matrix, or null
 * @param recommendations the recommendations table, or null
 * @param notes what is missing or was cut short, in plain words
 */
record ReportData(
    List<RunTables.RunFolder> runs,
    List<ParameterRow> summary,
    double rhatMax,
    double essMin,
    Map<String, double[][]> draws,
    List<ScenarioBands> scenarios,
    ElasticityMatrix elasticities,
    Table recommendations,
    List<String> notes) {

  /** One row of {@code posterior/summary}. */
  record ParameterRow(String parameter, double mean, double sd, double q05, double q50,
      double q95, double rhat, double essBulk, double essTail, double mcseMean) {}

  /** A store's or region's change over posterior draws (store_summary / region_summary). */
  record Band(String storeId, String region, long draws, double mean, double q05, double q25,
      double q50, double q75, double q95, double probGain) {}

  /**
   * One scenario's bands.
   *
   * @param stores ordered by region, then store
   * @param regions ordered by region (store id null)
   */
  record ScenarioBands(String scenario, List<Band> stores, List<Band> regions) {}

  /**
   * Base-period elasticities of one store: {@code mean[r][c]} = d ln share(products[r]) / d ln
   * price(products[c]), posterior mean (NaN where the table has no row).
   */
  record ElasticityMatrix(String storeId, String region, String[] products, double[][] mean,
      long draws, List<String> otherStores) {}

  /** A table shown as is: column names and rows of cell values (null = empty). */
  record Table(List<String> columns, List<Object[]> rows, long totalRows) {}
}
