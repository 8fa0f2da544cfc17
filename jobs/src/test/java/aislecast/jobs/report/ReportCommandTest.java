package aislecast.jobs.report;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import aislecast.jobs.cli.Main;
import aislecast.jobs.spark.SparkSessions;
import java.io.ByteArrayInputStream;
import java.io.IOException;
import java.io.PrintWriter;
import java.io.StringWriter;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Base64;
import java.util.List;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import java.util.stream.Stream;
import javax.imageio.ImageIO;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import picocli.CommandLine;

/**
 * {@code aislecast report} on synthetic run folders ({@link SyntheticRuns}): the page is
 * self-contained, every section is there with the numbers of the tables, missing tables become
 * visible notes, bad options exit 2, and an older report is replaced whole. The browser check is
 * {@link ReportBrowserTest}.
 */
class ReportCommandTest {
  @TempDir static Path tmp;
  static SparkSession spark;
  static SyntheticRuns runs;

  @BeforeAll
  static void setUp() throws IOException {
    spark = SparkSessions.open("local[2]", "report-test").spark();
    runs = SyntheticRuns.write(spark, tmp.resolve("runs"), 20260107L);
  }

  @AfterAll
  static void stop() {
    spark.stop();
  }

  record Outcome(int code, String out, String err) {}

  static Outcome run(String... args) {
    StringWriter out = new StringWriter();
    StringWriter err = new StringWriter();
    CommandLine cmd = Main.commandLine();
    cmd.setOut(new PrintWriter(out, true));
    cmd.setErr(new PrintWriter(err, true));
    String[] all = new String[args.length + 1];
    all[0] = "report";
    System.arraycopy(args, 0, all, 1, args.length);
    int code = cmd.execute(all);
    return new Outcome(code, out.toString(), err.toString());
  }

  @Test
  void fullReportHasEverySectionWithTheTablesNumbers() throws IOException {
    Outcome o = run("--run", runs.scenarios.toString(), "--with-run", runs.recommend.toString());
    assertEquals(0, o.code(), o.err());
    Path index = runs.scenarios.resolve("report/index.html");
    assertTrue(o.out().contains("written to " + index.toAbsolutePath()), o.out());
    String html = Files.readString(index);

    // self-contained: no scripts, nothing fetched from anywhere but the page itself
    assertFalse(html.contains("<script"), "the page must not carry scripts");
    Matcher ref = Pattern.compile("(?:src|href)=\"([^\"]*)\"").matcher(html);
    while (ref.find()) {
      assertTrue(ref.group(1).startsWith("data:image/png;base64,") || ref.group(1).startsWith("#"),
          "reference outside the page: " + ref.group(1));
    }
    // 6 key parameters x (density + trace) + 2 scenario forest plots + 1 heat map
    assertEquals(15, HtmlReport.countImages(html));
    assertTrue(o.out().contains("report: 15 charts, 0 notes"), o.out());
    assertEquals(0, countOf(html, "class=\"notes\""), "no table is missing");

    // the PNGs decode and are as large as the page says
    Matcher img = Pattern.compile(
        "width=\"(\\d+)\" height=\"(\\d+)\" src=\"data:image/png;base64,([A-Za-z0-9+/=]+)\"")
        .matcher(html);
    int decoded = 0;
    while (img.find()) {
      var image = ImageIO.read(new ByteArrayInputStream(Base64.getDecoder().decode(img.group(3))));
      assertEquals(Integer.parseInt(img.group(1)), image.getWidth());
      assertEquals(Integer.parseInt(img.group(2)), image.getHeight());
      decoded++;
    }
    assertEquals(15, decoded);

    // facts of all three runs, the estimation run found through the scenarios run's link
    assertTrue(html.contains("scenarios run: " + runs.scenarios));
    assertTrue(html.contains("recommend run: " + runs.recommend));
    assertTrue(html.contains("estimate run: " + runs.estimate));
    assertTrue(html.contains("<td class=\"t\">convergence.rhat_max_limit</td><td class=\"t\">"
        + "1.010</td>"), "limits shown among the run facts");
    // fingerprints as one readable line each: files, total size, digests cut to 12 hex digits
    assertTrue(html.contains("<td class=\"t\">fingerprints.inputs</td><td class=\"t\">3 files,"
        + " 1.1 MB, SHA-256 " + SyntheticRuns.INPUT_SHA256.substring(0, 12) + "\u2026</td>"), html);
    assertTrue(html.contains("<td class=\"t\">fingerprints.configuration</td><td class=\"t\">"
        + "SHA-256 " + SyntheticRuns.CONFIGURATION_SHA256.substring(0, 12) + "\u2026</td>"));
    assertFalse(html.contains(SyntheticRuns.INPUT_SHA256), "no full digests");
    assertFalse(html.contains("sales.csv") || html.contains("&quot;path&quot;"),
        "no raw file lists");

    // the convergence table flags exactly the slow parameter
    assertEquals(1, countOf(html, "<tr class=\"flag\">"));
    assertTrue(html.contains("<tr class=\"flag\"><td class=\"t\">" + SyntheticRuns.SLOW_PARAMETER
        + "</td>"));
    assertTrue(html.contains("<td class=\"flag\">" + HtmlReport.num(SyntheticRuns.SLOW_RHAT)
        + "</td>"));
    assertTrue(html.contains("1 of " + SyntheticRuns.GLOBALS.size() + " parameters are beyond"));
    // the estimation run's own notes sit above the convergence table, once
    int box = html.indexOf("<div class=\"runnotes\" id=\"run-notes\">");
    assertTrue(box > html.indexOf("id=\"convergence\"") && box < html.indexOf("<th>R-hat</th>"),
        "run notes inside the convergence section, before its table");
    assertEquals(1, countOf(html, "<li>" + HtmlReport.esc(SyntheticRuns.RUN_NOTE) + "</li>"));

    // scenarios: one forest plot each, regional medians as written
    for (String sc : SyntheticRuns.SCENARIOS) {
      assertTrue(html.contains("<h3>Scenario " + sc + "</h3>"), sc);
    }
    // each scenario says whether the chains agree on its revenue total (run.json of the run)
    assertEquals(1, countOf(html, "<p class=\"flagline\">Do the chains agree on the portfolio's"
        + " revenue change over all stores? R-hat 1.210, bulk ESS 14 (4 chains x "), html);
    assertEquals(1, countOf(html, "<p class=\"okline\">Do the chains agree on the portfolio's"
        + " revenue change over all stores? R-hat 1.004"));
    // every metric the run checked gets its line, after the revenue line it belongs with
    assertEquals(1, countOf(html, "<p class=\"okline\">Do the chains agree on the portfolio's"
        + " units change over all stores? R-hat 1.002"));
    assertTrue(html.indexOf("units change over all stores? R-hat 1.002")
        > html.indexOf("revenue change over all stores? R-hat 1.210"), "revenue first");
    assertEquals(0, countOf(html, "margin change over all stores? R-hat 1.00"),
        "no line for a metric the scenarios run did not check");
    assertTrue(html.indexOf("R-hat 1.210") > html.indexOf("<h3>Scenario "
        + SyntheticRuns.SCENARIOS.get(0) + "</h3>") && html.indexOf("R-hat 1.210")
        < html.indexOf("<h3>Scenario " + SyntheticRuns.SCENARIOS.get(1) + "</h3>"),
        "the flag sits under its own scenario");
    runs.regionMedian.forEach((k, v) ->
        assertTrue(html.contains("<td>" + HtmlReport.num(v) + "</td>"), k + " median " + v));

    // the heat map is for the first store by default, and says which other stores there are
    assertTrue(html.contains("<p>Store ST01 (" + SyntheticRuns.region(0) + ")"));
    assertTrue(html.contains("with one of 2 more"));

    // the recommended prices say whether the chains agree on their margin total
    assertEquals(1, countOf(html, "<p class=\"flagline\">Do the chains agree on the portfolio's"
        + " margin change over all stores? R-hat 1.310, bulk ESS 11 (4 chains x "), html);
    assertTrue(html.indexOf("margin change over all stores? R-hat 1.310")
        > html.indexOf("<h2 id=\"recommendations\">"), "under the recommended prices");
    assertEquals(1, countOf(html, "<p class=\"okline\">Do the chains agree on the portfolio's"
        + " revenue change over all stores? R-hat 1.003"));
    assertTrue(html.indexOf("revenue change over all stores? R-hat 1.003")
        > html.indexOf("margin change over all stores? R-hat 1.310"), "margin first");
    // every recommendation row, and the cautions
    assertEquals(runs.recommendationRows(), countOf(html, "<td class=\"t\">Fizzwell</td>"));
    assertTrue(html.contains(HtmlReport.CAUTIONS_HEADING));
    assertTrue(html.contains("competition law"));
    assertTrue(html.contains("never coordinates with them"));
    assertNoStaging(runs.scenarios);
  }

  @Test
  void anEstimationRunAloneGetsNotesForWhatIsMissing() throws IOException {
    Path out = tmp.resolve("alone/est-report.html");
    Files.createDirectories(out.getParent());
    Outcome o = run("--run", runs.estimate.toString(), "--output", out.toString());
    assertEquals(0, o.code(), o.err());
    String html = Files.readString(out);
    assertTrue(html.contains("No scenarios/store_summary table in the run folders given"), html);
    assertTrue(html.contains("No elasticities table"));
    assertTrue(html.contains("No recommendations table"));
    assertTrue(html.contains("No scenario results are available."));
    assertEquals(12, HtmlReport.countImages(html), "densities and traces only");
    assertTrue(html.contains("competition law"));
    assertTrue(o.out().contains("report: 12 charts, 3 notes"), o.out());
    assertNoStaging(out.getParent());
  }

  @Test
  void chosenStoreAndReplacedReport() throws IOException {
    Path target = tmp.resolve("rerun/report.html");
    Files.createDirectories(target.getParent());
    Files.writeString(target, "old report");
    Outcome o = run("--run", runs.scenarios.toString(), "--store", "ST03", "--output",
        target.toString());
    assertEquals(0, o.code(), o.err());
    String html = Files.readString(target);
    assertTrue(html.contains("<p>Store ST03 (" + SyntheticRuns.region(2) + ")"));
    assertFalse(html.contains("old report"));
    // no --with-run: the recommendations are missing, and the page says so
    assertTrue(html.contains("No recommendations table"));
    assertNoStaging(target.getParent());
  }

  @Test
  void badOptionsExitTwoWithAMessage() {
    Outcome o = run("--run", runs.scenarios.toString(), "--store", "NOPE");
    assertEquals(2, o.code());
    assertTrue(o.err().contains("--store NOPE is not in the elasticities table; its stores are"
        + " ST01, ST02, ST03"), o.err());
    assertFalse(o.err().contains("\tat "), "no stack trace");

    Outcome missing = run("--run", tmp.resolve("no-such-run").toString());
    assertEquals(2, missing.code());
    assertTrue(missing.err().contains("does not exist"), missing.err());

    Outcome noRun = run();
    assertEquals(2, noRun.code());
    assertTrue(noRun.err().contains("--run"), noRun.err());
  }

  @Test
  void parameterOrderIsByNameThenIndex() {
    List<String> names = new java.util.ArrayList<>(List.of("kappabar[10]", "lambda",
        "kappabar[2]", "Gamma[1,0]", "Gamma[0,1]"));
    names.sort(ReportReader::compareParameters);
    assertEquals(List.of("Gamma[0,1]", "Gamma[1,0]", "kappabar[2]", "kappabar[10]", "lambda"),
        names);
  }

  static int countOf(String s, String what) {
    int n = 0;
    for (int i = s.indexOf(what); i >= 0; i = s.indexOf(what, i + 1)) {
      n++;
    }
    return n;
  }

  static void assertNoStaging(Path dir) throws IOException {
    try (Stream<Path> s = Files.list(dir)) {
      List<String> left = s.map(p -> p.getFileName().toString())
          .filter(n -> n.contains("staging") || n.contains("report-old")).toList();
      assertTrue(left.isEmpty(), "left behind: " + left);
    }
  }
}
