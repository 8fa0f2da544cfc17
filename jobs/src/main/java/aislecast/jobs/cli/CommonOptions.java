package aislecast.jobs.cli;

import aislecast.jobs.io.RunLog;
import java.nio.file.Path;
import java.security.SecureRandom;
import java.time.ZoneOffset;
import java.time.ZonedDateTime;
import java.time.format.DateTimeFormatter;
import java.util.Locale;
import picocli.CommandLine.ITypeConverter;
import picocli.CommandLine.Option;
import picocli.CommandLine.TypeConversionException;

/** Options every job shares (a picocli mixin). */
public final class CommonOptions {

  /** Default seed, so two runs without --seed draw the same numbers. */
  public static final long DEFAULT_SEED = 20240601L;

  @Option(names = "--input", paramLabel = "DIR",
      description = "Input folder, one entry per table: sales.csv, sales.parquet or sales/"
          + " (Parquet dataset); likewise products, stores and the optional traffic and"
          + " shopper_draws.")
  String input;

  @Option(names = "--output", paramLabel = "DIR", defaultValue = "runs",
      description = "Folder that receives the run folder <DIR>/<run id>/ (default: ${DEFAULT-VALUE}).")
  String output;

  @Option(names = "--conf", paramLabel = "FILE",
      description = "Run configuration (YAML; see conf/defaults.yaml). Default: built-in defaults.")
  Path conf;

  @Option(names = "--run-id", paramLabel = "ID",
      description = "Name of the run folder (default: UTC timestamp, e.g. 20260131-093000-4f1c).")
  String runId;

  @Option(names = "--master", paramLabel = "URL",
      description = "Spark master (default: local[*], or the one spark-submit sets).")
  String master;

  @Option(names = "--seed", paramLabel = "N", defaultValue = "" + DEFAULT_SEED,
      description = "Run seed for every random stream (default: ${DEFAULT-VALUE}).")
  long seed;

  @Option(names = "--replace",
      description = "Replace <output>/<run id>/ when it exists with other inputs, configuration"
          + " or seed. The new run is written aside and swapped in only when complete; the old"
          + " folder stays intact if anything fails. Without it such a rerun is refused (exit 2),"
          + " and a rerun with the same inputs, configuration and seed does nothing.")
  boolean replace;

  @Option(names = "--log-format", paramLabel = "auto|text|kv", defaultValue = "auto",
      converter = LogFormatConverter.class,
      description = "Progress and status output: text (lines for people; a progress bar on a"
          + " terminal), kv (one key=value record per line, for log collectors) or auto (text on"
          + " a terminal, kv otherwise; the default).")
  RunLog.Format logFormat = RunLog.Format.AUTO;

  private String generatedRunId;

  public String input() {
    return input;
  }

  public String output() {
    return output;
  }

  public Path conf() {
    return conf;
  }

  public String master() {
    return master;
  }

  public long seed() {
    return seed;
  }

  public boolean replace() {
    return replace;
  }

  public RunLog.Format logFormat() {
    return logFormat;
  }

  /** The --run-id value, or one timestamp id generated once per invocation. */
  public String runId() {
    if (runId != null) {
      return runId;
    }
    if (generatedRunId == null) {
      generatedRunId = timestampRunId(ZonedDateTime.now(ZoneOffset.UTC));
    }
    return generatedRunId;
  }

  /** {@code yyyyMMdd-HHmmss-xxxx}: sorts by time; 4 random hex digits keep same-second runs apart. */
  static String timestampRunId(ZonedDateTime utc) {
    String stamp = utc.format(DateTimeFormatter.ofPattern("yyyyMMdd-HHmmss", Locale.ROOT));
    return stamp + "-" + String.format(Locale.ROOT, "%04x", new SecureRandom().nextInt(1 << 16));
  }

  /** Parses --log-format case-insensitively; picocli turns a failure into a usage error. */
  static final class LogFormatConverter implements ITypeConverter<RunLog.Format> {
    @Override
    public RunLog.Format convert(String value) {
      try {
        return RunLog.Format.parse(value);
      } catch (IllegalArgumentException e) {
        throw new TypeConversionException(e.getMessage());
      }
    }
  }
}
