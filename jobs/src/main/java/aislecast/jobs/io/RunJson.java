package aislecast.jobs.io;

import aislecast.jobs.config.RunFailure;
import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.SerializationFeature;
import java.io.IOException;
import java.io.InputStream;
import java.io.OutputStream;
import java.time.Instant;
import java.util.LinkedHashMap;
import java.util.Map;
import org.apache.hadoop.fs.FileSystem;
import org.apache.hadoop.fs.Path;
import org.apache.spark.sql.SparkSession;

/**
 * The one writer of {@code run.json}, every command's manifest: the shared head (command, run
 * id, status, time, seed, versions, configuration, options, fingerprints) from {@link #header},
 * then each job's own keys. Keys are lower_snake_case.
 */
public final class RunJson {
  public static final String FILE = "run.json";
  public static final String AISLECAST_VERSION = "0.1.0";
  private static final ObjectMapper JSON =
      new ObjectMapper().enable(SerializationFeature.INDENT_OUTPUT);

  private RunJson() {}

  /** The shared head of a run's manifest; the job adds its own keys after it. */
  public static Map<String, Object> header(SparkSession spark, String runId, String status,
      RunIdentity id) {
    Map<String, Object> m = new LinkedHashMap<>();
    m.put("command", id.command());
    m.put("run_id", runId);
    m.put("status", status);
    m.put("written_at", Instant.now().toString());
    if (id.seed() != null) {
      m.put("seed", id.seed());
    }
    Map<String, Object> v = new LinkedHashMap<>();
    v.put("aislecast", AISLECAST_VERSION);
    v.put("spark", spark.version());
    v.put("java", System.getProperty("java.version"));
    v.put("spark_master", spark.sparkContext().master());
    m.put("versions", v);
    m.put("configuration", id.configuration());
    if (!id.options().isEmpty()) {
      m.put("options", id.options());
    }
    m.put("fingerprints", id.fingerprints());
    return m;
  }

  /** Writes {@code m} as {@code <runDir>/run.json} (never over an existing file). */
  public static void write(SparkSession spark, String runDir, Map<String, Object> m) {
    Path p = new Path(runDir, FILE);
    try {
      FileSystem fs = p.getFileSystem(spark.sparkContext().hadoopConfiguration());
      try (OutputStream os = fs.create(p, false)) {
        JSON.writeValue(os, m);
      }
    } catch (IOException e) {
      throw new RunFailure(RunFailure.OTHER, "cannot write " + p + ": " + e.getMessage(), e);
    }
  }

  /** Reads a run.json; null when the file does not exist. */
  public static JsonNode read(FileSystem fs, Path file) throws IOException {
    if (!fs.exists(file)) {
      return null;
    }
    try (InputStream in = fs.open(file)) {
      return JSON.readTree(in);
    }
  }
}
