package aislecast.jobs.spark;

import org.apache.logging.log4j.Level;
import org.apache.logging.log4j.core.config.Configurator;
import org.apache.spark.sql.SparkSession;

/**
 * The one place a {@link SparkSession} is built: master from the command line (or from
 * spark-submit), UI off, few shuffle partitions for local runs, UTC session time zone, quiet
 * logging.
 */
public final class SparkSessions {

  /** Embedded default when neither {@code --master} nor spark-submit sets one. */
  public static final String DEFAULT_MASTER = "local[*]";

  private SparkSessions() {}

  /**
   * Opens a session. If a session is already active in this JVM (tests, or a caller chaining
   * jobs), that session is reused and closing the handle leaves it running.
   *
   * @param master {@code --master} value, or null to use spark-submit's {@code spark.master} or
   *     else {@link #DEFAULT_MASTER}
   */
  public static Handle open(String master, String appName) {
    SparkSession existing = SparkSession.getActiveSession().getOrElse(() -> null);
    if (existing == null) {
      existing = SparkSession.getDefaultSession().getOrElse(() -> null);
    }
    if (existing != null && !existing.sparkContext().isStopped()) {
      return new Handle(existing, false);
    }
    String resolved = master != null ? master : System.getProperty("spark.master", DEFAULT_MASTER);
    quietLogging();
    SparkSession.Builder builder =
        SparkSession.builder()
            .appName(appName)
            .master(resolved)
            .config("spark.ui.enabled", "false")
            .config("spark.ui.showConsoleProgress", "false")
            .config("spark.sql.session.timeZone", "UTC");
    if (resolved.startsWith("local") && System.getProperty("spark.sql.shuffle.partitions") == null) {
      // Spark's default of 200 shuffle partitions is sized for clusters; on one machine use one
      // per core.
      builder.config("spark.sql.shuffle.partitions", Integer.toString(localCores(resolved)));
    }
    SparkSession spark = builder.getOrCreate();
    spark.sparkContext().setLogLevel("WARN");
    return new Handle(spark, true);
  }

  /** Cores of a local master URL: local -> 1, local[N] or local[N,F] -> N, local[*] -> all. */
  static int localCores(String master) {
    java.util.regex.Matcher m =
        java.util.regex.Pattern.compile("local\\[(\\d+|\\*)(,\\d+)?\\]").matcher(master);
    if (m.matches()) {
      return m.group(1).equals("*")
          ? Runtime.getRuntime().availableProcessors()
          : Math.max(1, Integer.parseInt(m.group(1)));
    }
    return master.equals("local") ? 1 : Runtime.getRuntime().availableProcessors();
  }

  /** Spark's INFO logging drowns the command's own output; keep warnings and errors only. */
  static void quietLogging() {
    Configurator.setRootLevel(Level.WARN);
    Configurator.setLevel("org.apache.hadoop.util.NativeCodeLoader", Level.ERROR);
    Configurator.setLevel("org.apache.spark.util.Utils", Level.ERROR);
    Configurator.setLevel("org.apache.spark.sql.SparkSession", Level.ERROR);
  }

  /** A session plus whether this handle owns it (and so stops it on close). */
  public static final class Handle implements AutoCloseable {
    private final SparkSession spark;
    private final boolean owned;

    Handle(SparkSession spark, boolean owned) {
      this.spark = spark;
      this.owned = owned;
    }

    public SparkSession spark() {
      return spark;
    }

    @Override
    public void close() {
      if (owned) {
        spark.stop();
      }
    }
  }
}
