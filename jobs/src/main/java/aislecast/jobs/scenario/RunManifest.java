package aislecast.jobs.scenario;

import aislecast.jobs.config.RunFailure;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.SerializationFeature;
import java.io.IOException;
import java.io.OutputStream;
import java.time.Instant;
import java.util.LinkedHashMap;
import java.util.Map;
import org.apache.hadoop.fs.FileSystem;
import org.apache.hadoop.fs.Path;
import org.apache.spark.sql.SparkSession;

/** {@code run.json} of a scenarios or recommend run (keys lower_snake_case). */
final class RunManifest {
  static final String RUN_JSON = "run.json";
  private static final ObjectMapper JSON =
      new ObjectMapper().enable(SerializationFeature.INDENT_OUTPUT);

  private RunManifest() {}

  static Map<String, Object> header(SparkSession spark, String command, String runId,
      String input, String posteriorDir, PosteriorRun posterior) {
    Map<String, Object> m = new LinkedHashMap<>();
    m.put("command", command);
    m.put("run_id", runId);
    m.put("status", "ok");
    m.put("written_at", Instant.now().toString());
    m.put("input", input);
    m.put("posterior", posteriorDir);
    m.put("posterior_seed", posterior.seed());
    m.put("posterior_status", posterior.status());
    Map<String, Object> v = new LinkedHashMap<>();
    v.put("spark", spark.version());
    v.put("java", System.getProperty("java.version"));
    v.put("spark_master", spark.sparkContext().master());
    m.put("versions", v);
    return m;
  }

  static void write(SparkSession spark, String runDir, Map<String, Object> m) {
    Path p = new Path(runDir, RUN_JSON);
    try {
      FileSystem fs = p.getFileSystem(spark.sparkContext().hadoopConfiguration());
      try (OutputStream os = fs.create(p, false)) {
        JSON.writeValue(os, m);
      }
    } catch (IOException e) {
      throw new RunFailure(RunFailure.OTHER, "cannot write " + p + ": " + e.getMessage(), e);
    }
  }
}
