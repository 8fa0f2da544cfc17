package aislecast.jobs.report;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import aislecast.jobs.spark.SparkSessions;
import java.io.File;
import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.time.Duration;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.logging.Level;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.openqa.selenium.By;
import org.openqa.selenium.Dimension;
import org.openqa.selenium.JavascriptExecutor;
import org.openqa.selenium.OutputType;
import org.openqa.selenium.WebElement;
import org.openqa.selenium.chrome.ChromeDriver;
import org.openqa.selenium.chrome.ChromeDriverService;
import org.openqa.selenium.chrome.ChromeOptions;
import org.openqa.selenium.logging.LogEntry;
import org.openqa.selenium.logging.LogType;
import org.openqa.selenium.logging.LoggingPreferences;

/**
 * Opens the report in headless Chromium (Debian's {@code chromium} and {@code chromium-driver},
 * which {@code .ci/run} installs) through Selenium: the page loads with no console errors,
 * every image decodes with a non-zero size equal to its declared size, and the cautions are on
 * the page. A screenshot of the whole page is kept at {@code target/report-artifacts/report.png}.
 *
 * <p>Without the browser this test fails (it does not skip): the report's promise is that it
 * opens in a browser, and CI must check that.
 */
class ReportBrowserTest {
  static final String CHROMIUM = "/usr/bin/chromium";
  static final String CHROMEDRIVER = "/usr/bin/chromedriver";
  static final Path ARTIFACTS = Path.of("target", "report-artifacts");

  @TempDir static Path tmp;
  static SparkSession spark;
  static Path index;

  @BeforeAll
  static void writeReport() throws IOException {
    spark = SparkSessions.open("local[2]", "report-browser-test").spark();
    SyntheticRuns runs = SyntheticRuns.write(spark, tmp.resolve("runs"), 991L);
    ReportCommandTest.Outcome o = ReportCommandTest.run("--run", runs.scenarios.toString(),
        "--with-run", runs.recommend.toString());
    assertEquals(0, o.code(), o.err());
    index = runs.scenarios.resolve("report/index.html");
  }

  @AfterAll
  static void stop() {
    spark.stop();
  }

  /** Headless Chromium with a fresh profile and the console log kept; fails if it is absent. */
  static ChromeDriver startBrowser() throws IOException {
    assertTrue(Files.isExecutable(Path.of(CHROMIUM)) && Files.isExecutable(Path.of(CHROMEDRIVER)),
        "this test needs Debian's Chromium and its driver at " + CHROMIUM + " and " + CHROMEDRIVER
            + "; install them with 'apt-get install -y chromium chromium-driver' (.ci/run does)");
    Path profile = Files.createTempDirectory(tmp, "chromium-profile");
    ChromeOptions options = new ChromeOptions();
    options.setBinary(CHROMIUM);
    options.addArguments("--headless=new", "--no-sandbox", "--disable-gpu",
        "--disable-dev-shm-usage", "--disable-background-networking",
        "--disable-component-update", "--disable-sync", "--no-first-run",
        "--user-data-dir=" + profile, "--window-size=1280,900", "--hide-scrollbars");
    LoggingPreferences logs = new LoggingPreferences();
    logs.enable(LogType.BROWSER, Level.ALL);
    options.setCapability("goog:loggingPrefs", logs);
    ChromeDriverService service = new ChromeDriverService.Builder()
        .usingDriverExecutable(new File(CHROMEDRIVER)).usingAnyFreePort().build();
    ChromeDriver driver = new ChromeDriver(service, options);
    driver.manage().timeouts().pageLoadTimeout(Duration.ofSeconds(60));
    return driver;
  }

  /** Opens {@code page} and waits for the load to finish. */
  static void open(ChromeDriver driver, Path page) {
    driver.get(page.toUri().toString());
    assertEquals("complete", driver.executeScript("return document.readyState"));
  }

  /** Per image: alt text -> {natural width, natural height, declared width, declared height}. */
  static Map<String, long[]> imageSizes(ChromeDriver driver) {
    Map<String, long[]> out = new java.util.LinkedHashMap<>();
    for (WebElement img : driver.findElements(By.tagName("img"))) {
      @SuppressWarnings("unchecked")
      Map<String, Object> size = (Map<String, Object>) driver.executeScript(
          "const i = arguments[0]; return {done: i.complete, w: i.naturalWidth,"
              + " h: i.naturalHeight, dw: i.getAttribute('width'),"
              + " dh: i.getAttribute('height')};", img);
      assertEquals(Boolean.TRUE, size.get("done"), "image still loading");
      out.put(img.getAttribute("alt"), new long[] {((Number) size.get("w")).longValue(),
          ((Number) size.get("h")).longValue(), Long.parseLong((String) size.get("dw")),
          Long.parseLong((String) size.get("dh"))});
    }
    return out;
  }

  /** Console messages at SEVERE or above since the last call. */
  static List<String> severeLogs(ChromeDriver driver) {
    List<String> severe = new ArrayList<>();
    for (LogEntry e : driver.manage().logs().get(LogType.BROWSER)) {
      if (e.getLevel().intValue() >= Level.SEVERE.intValue()) {
        severe.add(e.getMessage());
      }
    }
    return severe;
  }

  @Test
  void opensInHeadlessChromiumWithoutErrors() throws IOException {
    ChromeDriver driver = startBrowser();
    try {
      open(driver, index);
      JavascriptExecutor js = driver;
      Map<String, long[]> images = imageSizes(driver);
      assertEquals(15, images.size(), "charts on the page");
      images.forEach((alt, s) -> {
        assertTrue(s[0] > 0 && s[1] > 0, alt + ": image did not render (" + s[0] + "x" + s[1]
            + ")");
        assertEquals(s[2], s[0], alt + ": natural width");
        assertEquals(s[3], s[1], alt + ": natural height");
      });

      String cautions = driver.findElement(By.id("cautions")).getText();
      assertTrue(cautions.contains(HtmlReport.CAUTIONS_HEADING), cautions);
      assertTrue(cautions.contains("model estimate"), cautions);
      assertTrue(cautions.contains("stay with the people responsible"), cautions);
      assertTrue(cautions.contains("competition law"), cautions);
      assertTrue(driver.findElement(By.id("convergence")).isDisplayed());

      List<String> severe = severeLogs(driver);
      assertTrue(severe.isEmpty(), "browser console errors: " + severe);

      // the whole page in one screenshot: make the window as tall as the document
      long height = ((Number) js.executeScript(
          "return document.documentElement.scrollHeight")).longValue();
      driver.manage().window().setSize(new Dimension(1280, (int) Math.min(16000, height + 20)));
      File shot = driver.getScreenshotAs(OutputType.FILE);
      Files.createDirectories(ARTIFACTS);
      Path kept = ARTIFACTS.resolve("report.png");
      Files.copy(shot.toPath(), kept, StandardCopyOption.REPLACE_EXISTING);
      Files.copy(index, ARTIFACTS.resolve("index.html"), StandardCopyOption.REPLACE_EXISTING);
      assertTrue(Files.size(kept) > 10_000, "screenshot " + kept + " is suspiciously small");
    } finally {
      driver.quit();
    }
  }

  /**
   * Control: on a page with a broken image and a script error, the same checks do fail, so
   * their silence on the report means something.
   */
  @Test
  void theChecksCatchABrokenPage() throws IOException {
    Path bad = tmp.resolve("broken.html");
    Files.writeString(bad, "<!DOCTYPE html><html><head><meta charset=\"utf-8\"></head><body>"
        + "<img alt=\"broken\" width=\"10\" height=\"10\" src=\"data:image/png;base64,AAAA\">"
        + "<script>console.error('deliberate failure');</script></body></html>");
    ChromeDriver driver = startBrowser();
    try {
      open(driver, bad);
      long[] s = imageSizes(driver).get("broken");
      assertEquals(0, s[0], "a broken image has natural width 0");
      assertEquals(0, s[1], "a broken image has natural height 0");
      List<String> severe = severeLogs(driver);
      assertTrue(severe.stream().anyMatch(m -> m.contains("deliberate failure")),
          "console.error must show as SEVERE: " + severe);
    } finally {
      driver.quit();
    }
  }
}
