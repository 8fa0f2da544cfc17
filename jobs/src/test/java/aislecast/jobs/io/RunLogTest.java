package aislecast.jobs.io;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.PrintWriter;
import java.io.StringWriter;
import java.time.Clock;
import java.time.Instant;
import java.time.ZoneOffset;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;

/** Log records parse back; progress renders as documented in each form. */
class RunLogTest {
  private static final Clock FIXED =
      Clock.fixed(Instant.parse("2026-12-01T10:00:00Z"), ZoneOffset.UTC);

  /**
   * An independent reader of the record format (logfmt-style, common practice): key=value pairs
   * separated by spaces, a value either bare or in double quotes with backslash escapes.
   */
  static Map<String, String> parse(String line) {
    Map<String, String> m = new LinkedHashMap<>();
    int i = 0;
    while (i < line.length()) {
      int eq = line.indexOf('=', i);
      String key = line.substring(i, eq);
      StringBuilder v = new StringBuilder();
      int j = eq + 1;
      if (j < line.length() && line.charAt(j) == '"') {
        j++;
        while (line.charAt(j) != '"') {
          char c = line.charAt(j);
          if (c == '\\') {
            char n = line.charAt(++j);
            v.append(n == 'n' ? '\n' : n == 't' ? '\t' : n == 'r' ? '\r' : n);
          } else {
            v.append(c);
          }
          j++;
        }
        j++;
      } else {
        while (j < line.length() && line.charAt(j) != ' ') {
          v.append(line.charAt(j++));
        }
      }
      m.put(key, v.toString());
      i = j + 1;
    }
    return m;
  }

  @Test
  void kvRecordsParseBack() {
    StringWriter s = new StringWriter();
    RunLog log = new RunLog("estimate", true, false, new PrintWriter(s), FIXED);
    log.progress(new RunLog.Progress("sweep", 12, 60, "warmup", 4.06, 16.34, 1.4213, "lambda"));
    log.info("run_exists", "run /tmp/out/r1 already exists; \"nothing\" to do\\now",
        "run_dir", "/tmp/out/r 1");
    log.out().println("  model: 4 stores, key=value\tinside");
    log.out().println();
    log.out().print("no newline yet");
    log.out().close();
    List<String> lines = s.toString().lines().toList();
    assertEquals(4, lines.size(), s.toString());

    Map<String, String> sweep = parse(lines.get(0));
    assertEquals(Map.of("ts", "2026-12-01T10:00:00Z", "level", "info", "job", "estimate",
        "event", "sweep", "sweep", "12", "of", "60", "phase", "warmup", "elapsed_s", "4.1",
        "eta_s", "16.3"), without(sweep, "worst_rhat", "worst_parameter"));
    assertEquals(1.4213, Double.parseDouble(sweep.get("worst_rhat")), 0.0);
    assertEquals("lambda", sweep.get("worst_parameter"));

    Map<String, String> exists = parse(lines.get(1));
    assertEquals("run_exists", exists.get("event"));
    assertEquals("/tmp/out/r 1", exists.get("run_dir"));
    assertEquals("run /tmp/out/r1 already exists; \"nothing\" to do\\now", exists.get("msg"));

    Map<String, String> text = parse(lines.get(2));
    assertEquals("message", text.get("event"));
    assertEquals("model: 4 stores, key=value\tinside", text.get("msg"));
    assertEquals("no newline yet", parse(lines.get(3)).get("msg"));
  }

  @Test
  void unknownValuesAreLeftOut() {
    StringWriter s = new StringWriter();
    RunLog log = new RunLog("estimate", true, false, new PrintWriter(s), FIXED);
    log.progress(new RunLog.Progress("sweep", 1, 60, "warmup", 0.5, Double.NaN, Double.NaN, ""));
    Map<String, String> r = parse(s.toString().strip());
    assertFalse(r.containsKey("eta_s") || r.containsKey("worst_rhat")
        || r.containsKey("worst_parameter"), r.toString());
    assertEquals("1", r.get("sweep"));
  }

  private static Map<String, String> without(Map<String, String> m, String... keys) {
    Map<String, String> c = new LinkedHashMap<>(m);
    for (String k : keys) {
      c.remove(k);
    }
    return c;
  }

  @Test
  void theBarRendersSweepElapsedEtaAndWorstRhat() {
    assertEquals("  sweep 12/60 [####--------------------]  20%  warmup  elapsed 0:00:04"
        + "  eta 0:00:16  worst R-hat 1.421 (lambda)",
        RunLog.bar(new RunLog.Progress("sweep", 12, 60, "warmup", 4.06, 16.34, 1.4213,
            "lambda")));
    assertEquals("  sweep  5/60 [##----------------------]   8%  warmup  elapsed 0:00:01"
        + "  eta -  worst R-hat - (no kept draws yet)",
        RunLog.bar(new RunLog.Progress("sweep", 5, 60, "warmup", 1.2, Double.NaN, Double.NaN,
            "")));
    assertEquals("  sweep 60/60 [########################] 100%  sampling  elapsed 1:01:05"
        + "  eta 0:00:00  worst R-hat 1.004 (tau2)",
        RunLog.bar(new RunLog.Progress("sweep", 60, 60, "sampling", 3665, 0, 1.0042, "tau2")));
  }

  @Test
  void onATerminalTheBarIsRedrawnInPlaceAndEndedBeforeOtherText() {
    StringWriter s = new StringWriter();
    RunLog log = new RunLog("estimate", false, true, new PrintWriter(s), FIXED);
    log.progress(new RunLog.Progress("sweep", 10, 20, "warmup", 100, 100, Double.NaN, ""));
    log.progress(new RunLog.Progress("sweep", 11, 20, "warmup", 9, 9, Double.NaN, null));
    log.out().println("note");
    String first = RunLog.bar(new RunLog.Progress("sweep", 10, 20, "warmup", 100, 100,
        Double.NaN, ""));
    String second = RunLog.bar(new RunLog.Progress("sweep", 11, 20, "warmup", 9, 9,
        Double.NaN, null));
    // the second, shorter bar is padded so nothing of the first remains visible
    assertTrue(second.length() < first.length());
    assertEquals("\r" + first + "\r" + second + " ".repeat(first.length() - second.length())
        + System.lineSeparator() + "note" + System.lineSeparator(), s.toString());
  }

  @Test
  void offATerminalTextProgressIsOneLinePerUpdate() {
    StringWriter s = new StringWriter();
    RunLog log = RunLog.plain("estimate", new PrintWriter(s));
    log.progress(new RunLog.Progress("sweep", 8, 16, "warmup", 61, 61, Double.NaN, ""));
    assertEquals("  sweep 8 of 16 (warmup)  elapsed 0:01:01  eta 0:01:01  worst R-hat -"
        + " (no kept draws yet)" + System.lineSeparator(), s.toString());
  }

  @Test
  void formatNamesParseCaseInsensitively() {
    assertEquals(RunLog.Format.KV, RunLog.Format.parse("KV"));
    assertEquals(RunLog.Format.TEXT, RunLog.Format.parse("text"));
  }
}
