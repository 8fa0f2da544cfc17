package aislecast.jobs.report;

import aislecast.jobs.report.ReportData.Band;
import aislecast.jobs.report.ReportData.ElasticityMatrix;
import aislecast.jobs.report.ReportData.ParameterRow;
import aislecast.jobs.report.ReportData.ScenarioBands;
import aislecast.jobs.report.ReportData.Table;
import aislecast.jobs.scenario.RecommendJob;
import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.SerializationFeature;
import java.time.Instant;
import java.util.ArrayList;
import java.util.Base64;
import java.util.Iterator;
import java.util.List;
import java.util.Locale;
import java.util.Map;

/**
 * Writes the report as one HTML page: inline style, charts as PNG data URIs, no scripts and no
 * address outside the page, so it opens the same offline, from a mail attachment or a file share.
 */
final class HtmlReport {
  /** The cautions, shown near the top of every report. */
  static final List<String> CAUTIONS = List.of(
      "Every number here is a model estimate. The bands state its uncertainty: the true effect"
          + " may lie anywhere in them, and outside them if the model's assumptions do not hold"
          + " (for example when shoppers, rivals or costs change in ways the sales history never"
          + " showed).",
      "This report supports decisions; it does not make them. Prices, ranges and promotions stay"
          + " with the people responsible for them, who know what the model does not.",
      "Pricing must follow the competition law of each market. The model predicts how rivals"
          + " may react to a price; it never coordinates with them, and its output must not be"
          + " shared with competitors or used to align prices with them.");

  static final String CAUTIONS_HEADING = "Before you use these numbers";

  private static final ObjectMapper JSON =
      new ObjectMapper().enable(SerializationFeature.INDENT_OUTPUT);

  private static final String STYLE = String.join("\n",
      "body{font-family:'DejaVu Sans','Liberation Sans',Arial,sans-serif;margin:0;color:#1d232b;",
      " background:#f6f7f9;font-size:14px;line-height:1.45}",
      "main{max-width:1100px;margin:0 auto;padding:16px 28px 40px;background:#fff}",
      "h1{font-size:24px;margin:8px 0 2px}h2{font-size:19px;margin:30px 0 8px;",
      " border-bottom:2px solid #d8dde5;padding-bottom:3px}h3{font-size:15px;margin:18px 0 6px}",
      ".sub{color:#5a6470;margin:0 0 14px}",
      ".cautions{border-left:5px solid #b26b00;background:#fff6e5;padding:8px 16px;margin:12px 0}",
      ".cautions li{margin:4px 0}",
      ".notes{border-left:5px solid #6a7786;background:#eef1f5;padding:8px 16px;margin:12px 0}",
      ".flagline{color:#8a1c1c;font-weight:bold}.okline{color:#1d5e2a}",
      ".runnotes{border-left:5px solid #b07a00;background:#fbf4e4;padding:8px 16px;margin:12px 0}",
      "table{border-collapse:collapse;margin:6px 0 12px;font-size:12.5px}",
      "th,td{border:1px solid #d8dde5;padding:3px 7px;text-align:right;vertical-align:top}",
      "td{white-space:nowrap}.facts td{white-space:normal;overflow-wrap:anywhere}",
      "th{background:#eef1f5;position:sticky;top:0}td.t,th.t{text-align:left}",
      "tr.flag td{background:#fde8e8}td.flag{color:#a01010;font-weight:bold}",
      ".scroll{max-height:520px;overflow:auto;border:1px solid #d8dde5;display:inline-block;",
      " max-width:100%}",
      ".scroll table{margin:0}",
      "figure{margin:8px 0 16px}figcaption{color:#5a6470;font-size:12.5px;max-width:900px}",
      ".pair{display:flex;flex-wrap:wrap;gap:8px}",
      "img{max-width:100%;height:auto;border:1px solid #e3e6ea}",
      "details{margin:6px 0}pre{font-size:11.5px;background:#f6f7f9;padding:8px;overflow:auto}",
      "nav a{margin-right:12px}");

  private final StringBuilder h = new StringBuilder(1 << 20);

  private HtmlReport() {}

  /** The whole page for {@code data}. */
  static String render(ReportData data, String runDir) {
    HtmlReport r = new HtmlReport();
    r.page(data, runDir);
    return r.h.toString();
  }

  /** How many chart images the last page held (for the command's summary line). */
  static int countImages(String html) {
    int n = 0;
    int i = 0;
    while ((i = html.indexOf("<img ", i)) >= 0) {
      n++;
      i++;
    }
    return n;
  }

  private void page(ReportData d, String runDir) {
    h.append("<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">\n")
        .append("<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n")
        .append("<title>aislecast report: ").append(esc(runDir)).append("</title>\n")
        // the page loads nothing from anywhere; say so to the browser as well
        .append("<meta http-equiv=\"Content-Security-Policy\" content=\"default-src 'none';")
        .append(" img-src data:; style-src 'unsafe-inline'\">\n")
        .append("<style>\n").append(STYLE).append("\n</style></head><body><main>\n");
    h.append("<h1>aislecast report</h1>\n<p class=\"sub\">Run folder ").append(esc(runDir))
        .append(" &middot; written ").append(esc(Instant.now().toString())).append("</p>\n");
    h.append("<nav><a href=\"#cautions\">Cautions</a><a href=\"#facts\">Run facts</a>")
        .append("<a href=\"#convergence\">Convergence</a><a href=\"#posterior\">Key parameters</a>")
        .append("<a href=\"#scenarios\">Scenarios</a><a href=\"#elasticities\">Elasticities</a>")
        .append("<a href=\"#recommendations\">Recommended prices</a></nav>\n");
    cautions();
    if (!d.notes().isEmpty()) {
      h.append("<div class=\"notes\" id=\"notes\"><strong>What this report could not show")
          .append("</strong><ul>\n");
      for (String n : d.notes()) {
        h.append("<li>").append(esc(n)).append("</li>\n");
      }
      h.append("</ul></div>\n");
    }
    facts(d);
    convergence(d);
    posterior(d);
    scenarios(d);
    elasticities(d);
    recommendations(d);
    h.append("<p class=\"sub\">Made by aislecast report from the Parquet tables of the run")
        .append(" folders listed under Run facts.</p>\n</main></body></html>\n");
  }

  private void cautions() {
    h.append("<section class=\"cautions\" id=\"cautions\"><h2>").append(CAUTIONS_HEADING)
        .append("</h2><ul>\n");
    for (String c : CAUTIONS) {
      h.append("<li>").append(esc(c)).append("</li>\n");
    }
    h.append("</ul></section>\n");
  }

  private void facts(ReportData d) {
    h.append("<h2 id=\"facts\">Run facts</h2>\n");
    for (RunTables.RunFolder f : d.runs()) {
      JsonNode m = f.manifest();
      String command = m == null ? "?" : m.path("command").asText("?");
      h.append("<h3>").append(esc(command)).append(" run: ").append(esc(f.dir())).append("</h3>\n");
      if (m == null) {
        h.append("<p>").append(esc(f.problem())).append("</p>\n");
        continue;
      }
      List<String[]> rows = new ArrayList<>();
      flatten("", m, rows);
      h.append("<table class=\"facts\"><tr><th class=\"t\">item</th><th class=\"t\">value")
          .append("</th></tr>\n");
      for (String[] r : rows) {
        h.append("<tr><td class=\"t\">").append(esc(r[0])).append("</td><td class=\"t\">")
            .append(esc(r[1])).append("</td></tr>\n");
      }
      h.append("</table>\n");
      if (m.has("configuration")) {
        h.append("<details><summary>Configuration used</summary><pre>")
            .append(esc(pretty(m.get("configuration")))).append("</pre></details>\n");
      }
    }
  }

  /** Nested manifest keys as dotted names; the configuration is shown separately. */
  private static void flatten(String prefix, JsonNode n, List<String[]> out) {
    if (n.isObject()) {
      Iterator<Map.Entry<String, JsonNode>> it = n.fields();
      while (it.hasNext()) {
        Map.Entry<String, JsonNode> e = it.next();
        if (prefix.isEmpty() && e.getKey().equals("configuration")) {
          continue;
        }
        if (prefix.isEmpty() && e.getKey().equals("fingerprints") && e.getValue().isObject()) {
          fingerprints(e.getValue(), out);
          continue;
        }
        flatten(prefix.isEmpty() ? e.getKey() : prefix + "." + e.getKey(), e.getValue(), out);
      }
    } else if (n.isArray()) {
      List<String> parts = new ArrayList<>();
      for (JsonNode x : n) {
        parts.add(x.isValueNode() ? x.asText() : x.toString());
      }
      out.add(new String[] {prefix, parts.isEmpty() ? "(none)" : String.join("; ", parts)});
    } else if (n.isNumber() && n.isFloatingPointNumber()) {
      out.add(new String[] {prefix, num(n.asDouble())});
    } else {
      out.add(new String[] {prefix, n.isNull() ? "(not set)" : n.asText()});
    }
  }

  /** Digests shown to a person: how many characters of a hex digest the report prints. */
  static final int DIGEST_CHARS = 12;

  /**
   * run.json's {@code fingerprints}, one line per digest instead of the raw file lists: the
   * configuration digest, and per fingerprinted part (inputs, scenario files, other runs) the
   * number of files, their total size and the combined digest, each digest cut to
   * {@link #DIGEST_CHARS} hex characters (enough to tell runs apart by eye; run.json has them in
   * full). Keys of other shapes are listed as before.
   */
  static void fingerprints(JsonNode fp, List<String[]> out) {
    String algorithm = fp.path("algorithm").asText("digest");
    Iterator<Map.Entry<String, JsonNode>> it = fp.fields();
    while (it.hasNext()) {
      Map.Entry<String, JsonNode> e = it.next();
      String key = e.getKey();
      JsonNode v = e.getValue();
      if (key.equals("algorithm")) {
        continue;
      }
      if (key.equals("configuration_sha256") && v.isTextual()) {
        out.add(new String[] {"fingerprints.configuration", algorithm + " " + shortDigest(v)});
      } else if (v.isObject() && v.path("files").isArray() && v.path("sha256").isTextual()) {
        int files = v.get("files").size();
        long bytes = 0;
        for (JsonNode f : v.get("files")) {
          bytes += f.path("bytes").asLong(0);
        }
        out.add(new String[] {"fingerprints." + key, files + (files == 1 ? " file, " : " files, ")
            + bytes(bytes) + ", " + algorithm + " " + shortDigest(v.get("sha256"))});
      } else {
        flatten("fingerprints." + key, v, out);
      }
    }
  }

  private static String shortDigest(JsonNode hex) {
    String s = hex.asText();
    return s.length() > DIGEST_CHARS ? s.substring(0, DIGEST_CHARS) + "\u2026" : s;
  }

  /** Decimal units (kB = 1000 bytes), one decimal above 1 kB. */
  static String bytes(long n) {
    if (n < 1000) {
      return n + " bytes";
    }
    String[] units = {"kB", "MB", "GB", "TB"};
    double v = n;
    int u = -1;
    while (v >= 1000 && u < units.length - 1) {
      v /= 1000;
      u++;
    }
    return String.format(Locale.ROOT, "%.1f %s", v, units[u]);
  }

  private static String pretty(JsonNode n) {
    try {
      return JSON.writeValueAsString(n);
    } catch (com.fasterxml.jackson.core.JsonProcessingException e) {
      return n.toString();
    }
  }

  /**
   * The estimation run's own notes from its run.json ({@code notes}: priors that pull the
   * posterior and the like), shown next to the convergence table so that nobody reads the
   * numbers without them.
   */
  private void runNotes(ReportData d) {
    List<String> notes = new ArrayList<>();
    for (RunTables.RunFolder f : d.runs()) {
      JsonNode m = f.manifest();
      if (m == null || !"estimate".equals(m.path("command").asText())) {
        continue;
      }
      for (JsonNode n : m.path("notes")) {
        if (n.isTextual() && !notes.contains(n.asText())) {
          notes.add(n.asText());
        }
      }
    }
    if (notes.isEmpty()) {
      return;
    }
    h.append("<div class=\"runnotes\" id=\"run-notes\"><strong>Notes of the estimation run")
        .append("</strong> (read the estimates with these in mind)<ul>\n");
    for (String n : notes) {
      h.append("<li>").append(esc(n)).append("</li>\n");
    }
    h.append("</ul></div>\n");
  }

  private void convergence(ReportData d) {
    h.append("<h2 id=\"convergence\">Convergence of the sampler</h2>\n");
    if (d.summary().isEmpty()) {
      h.append("<p>No posterior summary is available.</p>\n");
      return;
    }
    double rmax = d.rhatMax();
    double emin = d.essMin();
    List<String> flagged = new ArrayList<>();
    for (ParameterRow p : d.summary()) {
      if (beyond(p, rmax, emin)) {
        flagged.add(p.parameter());
      }
    }
    h.append("<p>One row per global parameter. R-hat (rank-normalised, split chains) near 1 means")
        .append(" the chains agree; the effective sample sizes (bulk and tail) say how many")
        .append(" independent draws the chains are worth. Limits of this run: R-hat at most ")
        .append(Double.isNaN(rmax) ? "(unknown)" : num(rmax)).append(", ESS at least ")
        .append(Double.isNaN(emin) ? "(unknown)" : num(emin)).append(". ");
    if (Double.isNaN(rmax) && Double.isNaN(emin)) {
      h.append("The run.json gives no limits, so nothing is flagged.");
    } else if (flagged.isEmpty()) {
      h.append("Every parameter is within the limits.");
    } else {
      h.append("<strong>").append(flagged.size()).append(" of ").append(d.summary().size())
          .append(" parameters are beyond the limits</strong> (shaded): ")
          .append(esc(flagged.size() <= 12 ? String.join(", ", flagged)
              : String.join(", ", flagged.subList(0, 12)) + " and " + (flagged.size() - 12)
                  + " more"))
          .append(". Treat results that depend on them with extra care, or run longer chains.");
    }
    h.append("</p>\n");
    runNotes(d);
    h.append("<div class=\"scroll\"><table>\n<tr><th class=\"t\">parameter</th>")
        .append("<th>mean</th><th>sd</th><th>5%</th><th>median</th><th>95%</th><th>R-hat</th>")
        .append("<th>ESS bulk</th><th>ESS tail</th><th>MC s.e. of mean</th></tr>\n");
    for (ParameterRow p : d.summary()) {
      boolean bad = beyond(p, rmax, emin);
      h.append(bad ? "<tr class=\"flag\">" : "<tr>").append("<td class=\"t\">")
          .append(esc(p.parameter())).append("</td>");
      cell(p.mean(), false).cell(p.sd(), false).cell(p.q05(), false).cell(p.q50(), false)
          .cell(p.q95(), false);
      cell(p.rhat(), !(p.rhat() <= rmax) && !Double.isNaN(rmax));
      cell(p.essBulk(), !(p.essBulk() >= emin) && !Double.isNaN(emin));
      cell(p.essTail(), !(p.essTail() >= emin) && !Double.isNaN(emin));
      cell(p.mcseMean(), false);
      h.append("</tr>\n");
    }
    h.append("</table></div>\n");
  }

  /** A NaN statistic counts as beyond the limit: it could not be computed. */
  private static boolean beyond(ParameterRow p, double rmax, double emin) {
    return (!Double.isNaN(rmax) && !(p.rhat() <= rmax))
        || (!Double.isNaN(emin) && !(p.essBulk() >= emin && p.essTail() >= emin));
  }

  private HtmlReport cell(double v, boolean flag) {
    h.append(flag ? "<td class=\"flag\">" : "<td>").append(num(v)).append("</td>");
    return this;
  }

  private void posterior(ReportData d) {
    h.append("<h2 id=\"posterior\">Key parameters: posterior and traces</h2>\n");
    if (d.draws().isEmpty()) {
      h.append("<p>No posterior draws are available.</p>\n");
      return;
    }
    h.append("<p>Left: the posterior density (grey bars: all chains together; lines: each chain")
        .append(" on its own; lines that disagree mean the chains have not mixed). Right: each")
        .append(" chain's kept draws in order; a healthy trace looks like noise around a level,")
        .append(" with no trend and no chain stuck apart.</p>\n");
    for (Map.Entry<String, double[][]> e : d.draws().entrySet()) {
      String p = e.getKey();
      String meaning = meaning(p);
      h.append("<h3>").append(esc(p)).append(": ").append(esc(meaning)).append("</h3>\n")
          .append("<div class=\"pair\">");
      image(Charts.density(p + ", posterior density", p, e.getValue()),
          "Posterior density of " + p);
      image(Charts.trace(p + ", trace by chain", p, e.getValue()), "Trace of " + p + " by chain");
      h.append("</div>\n");
    }
  }

  static String meaning(String parameter) {
    if (parameter.equals("lambda")) {
      return "how strongly the unseen demand shock moves the price (0 = prices exogenous)";
    }
    if (parameter.equals("Gamma[0,0]")) {
      return "average store's log price sensitivity (hierarchy intercept)";
    }
    if (parameter.equals("sigma_xi2")) {
      return "variance of the unseen weekly demand shocks";
    }
    if (parameter.startsWith("kappabar[")) {
      return "mean appeal of product " + parameter.substring(9, parameter.length() - 1)
          + " across stores (catalogue order)";
    }
    return "global parameter";
  }

  private void scenarios(ReportData d) {
    h.append("<h2 id=\"scenarios\">Scenarios: portfolio revenue change by store</h2>\n");
    if (d.scenarios().isEmpty()) {
      h.append("<p>No scenario results are available.</p>\n");
      return;
    }
    h.append("<p>For each scenario, the change in the portfolio's revenue per base-period week")
        .append(" against the base period, store by store, grouped by region. Thin bar: 90% of")
        .append(" the posterior draws (5% to 95%); thick bar: the middle half (25% to 75%); dot:")
        .append(" the median. A band that crosses zero means the model cannot tell a gain from")
        .append(" a loss in that store.</p>\n");
    for (ScenarioBands s : d.scenarios()) {
      h.append("<h3>Scenario ").append(esc(s.scenario())).append("</h3>\n");
      List<Charts.Band> bands = new ArrayList<>();
      for (Band b : s.stores()) {
        bands.add(new Charts.Band(b.storeId(), b.region(), b.q05(), b.q25(), b.q50(), b.q75(),
            b.q95()));
      }
      image(Charts.forest("Scenario " + s.scenario() + ": portfolio revenue change",
          "revenue change against base (currency per week)", bands),
          "Forest plot of portfolio revenue change by store for scenario " + s.scenario());
      outputConvergence(d, s.scenario(), "revenue", "margin", "units");
      if (!s.regions().isEmpty()) {
        h.append("<table><tr><th class=\"t\">region</th><th>draws</th><th>mean change</th>")
            .append("<th>5%</th><th>25%</th><th>median</th><th>75%</th><th>95%</th>")
            .append("<th>chance of a gain</th></tr>\n");
        for (Band b : s.regions()) {
          h.append("<tr><td class=\"t\">").append(esc(b.region())).append("</td><td>")
              .append(b.draws()).append("</td>");
          cell(b.mean(), false).cell(b.q05(), false).cell(b.q25(), false).cell(b.q50(), false)
              .cell(b.q75(), false).cell(b.q95(), false);
          h.append("<td>").append(pct(b.probGain())).append("</td></tr>\n");
        }
        h.append("</table>\n");
      }
    }
  }

  /**
   * A scenarios or recommend run's check of its own outputs ({@code output_convergence} in its
   * run.json): one line per metric, in the order given, saying whether the chains agree on the
   * portfolio's change in that metric summed over stores for output {@code scenario}. Flagged
   * when R-hat is above the estimation run's limit or unknown; a metric the run did not check
   * gets no line.
   */
  private void outputConvergence(ReportData d, String scenario, String... metrics) {
    for (String metric : metrics) {
      outputConvergenceLine(d, scenario, metric);
    }
  }

  private void outputConvergenceLine(ReportData d, String scenario, String metric) {
    for (RunTables.RunFolder f : d.runs()) {
      JsonNode m = f.manifest();
      if (m == null) {
        continue;
      }
      for (JsonNode c : m.path("output_convergence")) {
        if (!scenario.equals(c.path("scenario").asText()) || !metric.equals(
            c.path("metric").asText())) {
          continue;
        }
        double rhat = c.path("rhat").isNumber() ? c.path("rhat").asDouble() : Double.NaN;
        double ess = c.path("ess_bulk").isNumber() ? c.path("ess_bulk").asDouble() : Double.NaN;
        boolean bad = !(rhat <= d.rhatMax()) && !Double.isNaN(d.rhatMax()) || Double.isNaN(rhat);
        h.append("<p class=\"").append(bad ? "flagline" : "okline").append("\">Do the chains")
            .append(" agree on the portfolio's ").append(esc(metric))
            .append(" change over all stores? R-hat ")
            .append(Double.isNaN(rhat) ? "n/a" : num(rhat)).append(", bulk ESS ")
            .append(Double.isNaN(ess) ? "n/a" : String.format(Locale.ROOT, "%.0f", ess))
            .append(" (")
            .append(c.path("chains").asInt()).append(" chains x ")
            .append(c.path("draws_per_chain").asInt()).append(" draws). ")
            .append(bad ? "Not yet: read these bands as indicative only." : "Yes, within the"
                + " run's limit.").append("</p>\n");
        return;
      }
    }
  }

  private void elasticities(ReportData d) {
    h.append("<h2 id=\"elasticities\">Price elasticities in one store</h2>\n");
    ElasticityMatrix e = d.elasticities();
    if (e == null) {
      h.append("<p>No elasticities are available.</p>\n");
      return;
    }
    h.append("<p>Store ").append(esc(e.storeId()))
        .append(e.region() == null ? "" : " (" + esc(e.region()) + ")")
        .append(", base period, posterior mean over ").append(e.draws()).append(" draws. Row:")
        .append(" the product whose sales respond; column: the product whose price changes.")
        .append(" A cell is the percentage change in the row product's share for a 1% price")
        .append(" rise of the column product. The diagonal (own price) is negative; positive")
        .append(" cells off the diagonal mark substitutes. ");
    if (!e.otherStores().isEmpty()) {
      h.append("Other stores: run <code>aislecast report --store STORE_ID</code> with one of ")
          .append(e.otherStores().size()).append(" more.");
    }
    h.append("</p>\n");
    image(Charts.heatMap("Store " + e.storeId() + ": price elasticities",
        "share of", "price of", e.products(), e.mean()),
        "Elasticity heat map for store " + e.storeId());
  }

  private void recommendations(ReportData d) {
    h.append("<h2 id=\"recommendations\">Recommended prices</h2>\n");
    Table t = d.recommendations();
    if (t == null) {
      h.append("<p>No recommendations are available.</p>\n");
      return;
    }
    h.append("<p>Per store, the portfolio prices within the guard-rails (lower and upper price)")
        .append(" that the model expects to raise the portfolio margin most. The margin,")
        .append(" revenue and units columns are the whole portfolio of the store, against the")
        .append(" base period; the 5% and 95% columns bound 90% of the posterior draws. Showing ")
        .append(t.rows().size()).append(" of ").append(t.totalRows()).append(" rows.</p>\n");
    outputConvergence(d, RecommendJob.OUTPUT_NAME, "margin", "revenue", "units");
    h.append("<div class=\"scroll\"><table>\n<tr>");
    for (String c : t.columns()) {
      h.append("<th class=\"t\">").append(esc(c.replace('_', ' '))).append("</th>");
    }
    h.append("</tr>\n");
    for (Object[] row : t.rows()) {
      h.append("<tr>");
      for (Object v : row) {
        if (v instanceof Number n && !(v instanceof Integer || v instanceof Long)) {
          h.append("<td>").append(num(n.doubleValue())).append("</td>");
        } else if (v instanceof Number) {
          h.append("<td>").append(v).append("</td>");
        } else {
          h.append("<td class=\"t\">").append(v == null ? "" : esc(v.toString())).append("</td>");
        }
      }
      h.append("</tr>\n");
    }
    h.append("</table></div>\n");
  }

  private void image(Charts.Png png, String alt) {
    h.append("<figure><img alt=\"").append(esc(alt)).append("\" width=\"").append(png.width())
        .append("\" height=\"").append(png.height()).append("\" src=\"data:image/png;base64,")
        .append(Base64.getEncoder().encodeToString(png.bytes())).append("\"></figure>\n");
  }

  /** Four significant digits, plain notation for everyday sizes; NaN shows as a dash. */
  static String num(double v) {
    if (Double.isNaN(v)) {
      return "\u2014";
    }
    if (Double.isInfinite(v)) {
      return v > 0 ? "\u221e" : "-\u221e";
    }
    double a = Math.abs(v);
    if (a != 0 && (a < 1e-3 || a >= 1e7)) {
      return String.format(Locale.ROOT, "%.3e", v);
    }
    if (a >= 1000) {
      return String.format(Locale.ROOT, "%.1f", v);
    }
    return String.format(Locale.ROOT, "%.4g", v);
  }

  private static String pct(double p) {
    return Double.isNaN(p) ? "\u2014" : String.format(Locale.ROOT, "%.0f%%", 100 * p);
  }

  /** HTML text escaping for element content and double-quoted attributes. */
  static String esc(String s) {
    if (s == null) {
      return "";
    }
    StringBuilder b = new StringBuilder(s.length() + 16);
    for (int i = 0; i < s.length(); i++) {
      char c = s.charAt(i);
      switch (c) {
        case '<' -> b.append("&lt;");
        case '>' -> b.append("&gt;");
        case '&' -> b.append("&amp;");
        case '"' -> b.append("&quot;");
        case '\'' -> b.append("&#39;");
        default -> b.append(c);
      }
    }
    return b.toString();
  }
}
