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

  @Test
  void opensInHeadlessChromiumWithoutErrors() throws IOException {
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
    try {
      driver.manage().timeouts().pageLoadTimeout(Duration.ofSeconds(60));
      driver.get(index.toUri().toString());
      JavascriptExecutor js = driver;
      Object ready = js.executeScript("return document.readyState");
      assertEquals("complete", ready);

      List<WebElement> images = driver.findElements(By.tagName("img"));
      assertEquals(15, images.size(), "charts on the page");
      for (WebElement img : images) {
        @SuppressWarnings("unchecked")
        Map<String, Object> size = (Map<String, Object>) js.executeScript(
            "const i = arguments[0]; return {done: i.complete, w: i.naturalWidth,"
                + " h: i.naturalHeight, dw: i.getAttribute('width'),"
                + " dh: i.getAttribute('height')};", img);
        String alt = img.getAttribute("alt");
        assertEquals(Boolean.TRUE, size.get("done"), alt);
        long w = ((Number) size.get("w")).longValue();
        long h = ((Number) size.get("h")).longValue();
        assertTrue(w > 0 && h > 0, alt + ": image did not render (" + w + "x" + h + ")");
        assertEquals(Long.parseLong((String) size.get("dw")), w, alt);
        assertEquals(Long.parseLong((String) size.get("dh")), h, alt);
      }

      String cautions = driver.findElement(By.id("cautions")).getText();
      assertTrue(cautions.contains(HtmlReport.CAUTIONS_HEADING), cautions);
      assertTrue(cautions.contains("model estimate"), cautions);
      assertTrue(cautions.contains("stay with the people responsible"), cautions);
      assertTrue(cautions.contains("competition law"), cautions);
      assertTrue(driver.findElement(By.id("convergence")).isDisplayed());

      List<String> severe = new ArrayList<>();
      for (LogEntry e : driver.manage().logs().get(LogType.BROWSER)) {
        if (e.getLevel().intValue() >= Level.SEVERE.intValue()) {
          severe.add(e.getMessage());
        }
      }
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
}
