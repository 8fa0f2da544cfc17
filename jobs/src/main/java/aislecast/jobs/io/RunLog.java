package aislecast.jobs.io;

import java.io.PrintWriter;
import java.io.Writer;
import java.math.BigDecimal;
import java.math.MathContext;
import java.time.Clock;
import java.time.Instant;
import java.time.temporal.ChronoUnit;
import java.util.Locale;
import java.util.regex.Pattern;

/**
 * Where a job's status and progress lines go (DESIGN section 8). Two forms:
 *
 * <ul>
 *   <li>text, for people: lines as the job writes them; progress as a bar redrawn in place with
 *       {@code \r} on a terminal, or one line per update when the output is a file or pipe;
 *   <li>kv, for log collectors: every line is one record {@code ts=... level=info job=estimate
 *       event=... key=value ... msg="..."}, values quoted only when they hold spaces, quotes or
 *       '='.
 * </ul>
 *
 * <p>{@code auto} picks text on a terminal ({@link System#console()} present) and kv otherwise.
 * Jobs write free text to {@link #out()} and progress through {@link #progress}; in kv form each
 * text line becomes an {@code event=message} record.
 */
public final class RunLog {

  /** The {@code --log-format} values. */
  public enum Format {
    AUTO,
    TEXT,
    KV;

    /** Case-insensitive name; IllegalArgumentException naming the choices otherwise. */
    public static Format parse(String s) {
      for (Format f : values()) {
        if (f.name().equalsIgnoreCase(s.trim())) {
          return f;
        }
      }
      throw new IllegalArgumentException("expected auto, text or kv, got '" + s + "'");
    }
  }

  /**
   * One progress update: {@code done} of {@code total} units (e.g. sweeps) in {@code phase},
   * seconds elapsed and estimated to go (NaN: unknown), and for estimation the worst R-hat over
   * the global parameters so far and its parameter (NaN and null when there is none yet).
   */
  public record Progress(String unit, int done, int total, String phase, double elapsedSeconds,
      double etaSeconds, double worstRhat, String worstParameter) {}

  private static final Pattern BARE = Pattern.compile("[A-Za-z0-9_.:/@+,*\\[\\]()-]+");
  private static final int BAR_WIDTH = 24;

  private final String job;
  private final boolean kv;
  private final boolean redraw;
  private final PrintWriter sink;
  private final Clock clock;
  private final PrintWriter lines;
  private boolean barOpen;
  private int lastBarLength;

  RunLog(String job, boolean kv, boolean redraw, PrintWriter sink, Clock clock) {
    this.job = job;
    this.kv = kv;
    this.redraw = redraw;
    this.sink = sink;
    this.clock = clock;
    this.lines = new PrintWriter(new LineWriter(), true);
  }

  /** The log of {@code job} in format {@code f} ({@code auto} looks for a terminal). */
  public static RunLog create(String job, Format f, PrintWriter sink) {
    boolean terminal = System.console() != null;
    boolean kv = f == Format.KV || (f == Format.AUTO && !terminal);
    return new RunLog(job, kv, !kv && terminal, sink, Clock.systemUTC());
  }

  /** Text lines, one line per progress update (library callers and tests). */
  public static RunLog plain(String job, PrintWriter sink) {
    return new RunLog(job, false, false, sink, Clock.systemUTC());
  }

  public boolean structured() {
    return kv;
  }

  /** Free text for the user; in kv form each line becomes one {@code event=message} record. */
  public PrintWriter out() {
    return lines;
  }

  /**
   * A status line: {@code message} in text form; in kv form a record with {@code event} and
   * the given key-value pairs (keys and values alternate), then {@code msg}.
   */
  public synchronized void info(String event, String message, Object... keyValues) {
    if (kv) {
      Object[] all = new Object[keyValues.length + 2];
      System.arraycopy(keyValues, 0, all, 0, keyValues.length);
      all[keyValues.length] = "msg";
      all[keyValues.length + 1] = message;
      record("info", event, all);
    } else {
      endBar();
      sink.println(message);
      sink.flush();
    }
  }

  /** A progress update: a record, a redrawn bar or a line (see the class comment). */
  public synchronized void progress(Progress p) {
    if (kv) {
      record("info", p.unit(), p.unit(), p.done(), "of", p.total(), "phase", p.phase(),
          "elapsed_s", round1(p.elapsedSeconds()), "eta_s", round1(p.etaSeconds()),
          "worst_rhat", p.worstRhat(), "worst_parameter", p.worstParameter());
    } else if (redraw) {
      String bar = bar(p);
      // pad with spaces so a shorter redraw leaves nothing of the longer one
      String pad = " ".repeat(Math.max(0, lastBarLength - bar.length()));
      sink.print("\r" + bar + pad);
      lastBarLength = bar.length();
      barOpen = true;
      if (p.done() >= p.total()) {
        endBar();
      }
    } else {
      sink.println(line(p));
    }
    sink.flush();
  }

  /** Ends an open progress bar with a newline so the next line starts clean. */
  public synchronized void endBar() {
    if (barOpen) {
      sink.println();
      barOpen = false;
      lastBarLength = 0;
    }
  }

  /**
   * The bar drawn on a terminal, e.g. {@code "  sweep  12/60 [####--------------------]  20%
   * warmup  elapsed 0:00:04  eta 0:00:16  worst R-hat 1.420 (lambda)"}.
   */
  static String bar(Progress p) {
    int filled = p.total() <= 0 ? 0
        : (int) Math.min(BAR_WIDTH, (long) BAR_WIDTH * p.done() / p.total());
    int pct = p.total() <= 0 ? 0 : (int) (100L * p.done() / p.total());
    int digits = Integer.toString(p.total()).length();
    return String.format(Locale.ROOT, "  %s %" + digits + "d/%d [%s%s] %3d%%  %s  elapsed %s  eta %s%s",
        p.unit(), p.done(), p.total(), "#".repeat(filled), "-".repeat(BAR_WIDTH - filled), pct,
        p.phase(), clock(p.elapsedSeconds()), clock(p.etaSeconds()), rhat(p));
  }

  /** The line written per update when not redrawing. */
  static String line(Progress p) {
    return String.format(Locale.ROOT, "  %s %d of %d (%s)  elapsed %s  eta %s%s", p.unit(),
        p.done(), p.total(), p.phase(), clock(p.elapsedSeconds()), clock(p.etaSeconds()),
        rhat(p));
  }

  private static String rhat(Progress p) {
    if (p.worstParameter() == null && Double.isNaN(p.worstRhat())) {
      return "";
    }
    return Double.isNaN(p.worstRhat()) ? "  worst R-hat - (no kept draws yet)"
        : String.format(Locale.ROOT, "  worst R-hat %.3f (%s)", p.worstRhat(),
            p.worstParameter());
  }

  /** {@code h:mm:ss}, or "-" when unknown. */
  public static String clock(double seconds) {
    if (!Double.isFinite(seconds)) {
      return "-";
    }
    long s = Math.round(seconds);
    return String.format(Locale.ROOT, "%d:%02d:%02d", s / 3600, (s / 60) % 60, s % 60);
  }

  private static double round1(double v) {
    return Double.isFinite(v) ? Math.round(v * 10) / 10.0 : v;
  }

  /** Writes one kv record; null, empty and non-finite values are left out. */
  private void record(String level, String event, Object... keyValues) {
    endBar();
    sink.println(format(Instant.now(clock), level, job, event, keyValues));
    sink.flush();
  }

  /** One record as a line (no line break inside: breaks in values are escaped). */
  static String format(Instant ts, String level, String job, String event,
      Object... keyValues) {
    StringBuilder b = new StringBuilder();
    b.append("ts=").append(ts.truncatedTo(ChronoUnit.MILLIS))
        .append(" level=").append(level)
        .append(" job=").append(value(job))
        .append(" event=").append(value(event));
    for (int i = 0; i + 1 < keyValues.length; i += 2) {
      Object v = keyValues[i + 1];
      if (v == null || "".equals(v) || (v instanceof Double d && !Double.isFinite(d))) {
        continue;
      }
      b.append(' ').append(keyValues[i]).append('=').append(value(v));
    }
    return b.toString();
  }

  private static String value(Object v) {
    String s;
    if (v instanceof Double d) {
      s = BigDecimal.valueOf(d).round(new MathContext(6)).stripTrailingZeros().toPlainString();
    } else {
      s = String.valueOf(v);
    }
    if (BARE.matcher(s).matches()) {
      return s;
    }
    StringBuilder q = new StringBuilder("\"");
    for (char c : s.toCharArray()) {
      switch (c) {
        case '"' -> q.append("\\\"");
        case '\\' -> q.append("\\\\");
        case '\n' -> q.append("\\n");
        case '\r' -> q.append("\\r");
        case '\t' -> q.append("\\t");
        default -> q.append(c);
      }
    }
    return q.append('"').toString();
  }

  /** The writer behind {@link #out()}: passes text through, or turns each line into a record. */
  private final class LineWriter extends Writer {
    private final StringBuilder pending = new StringBuilder();

    @Override
    public void write(char[] cbuf, int off, int len) {
      if (!kv) {
        if (len > 0) {
          endBar();
        }
        sink.write(cbuf, off, len);
        return;
      }
      for (int i = off; i < off + len; i++) {
        char c = cbuf[i];
        if (c == '\n') {
          emit();
        } else if (c != '\r') {
          pending.append(c);
        }
      }
    }

    private void emit() {
      String text = pending.toString().strip();
      pending.setLength(0);
      if (!text.isEmpty()) {
        record("info", "message", "msg", text);
      }
    }

    @Override
    public void flush() {
      sink.flush();
    }

    @Override
    public void close() {
      if (kv && pending.length() > 0) {
        emit();
      }
      sink.flush();
    }
  }
}
