package aislecast.jobs.scenario;

import aislecast.jobs.config.RunConfig;
import aislecast.jobs.config.RunFailure;
import aislecast.jobs.io.InputFingerprint;
import aislecast.jobs.io.RunIdentity;
import aislecast.jobs.io.RunJson;
import java.io.IOException;
import java.util.List;
import java.util.Map;
import org.apache.hadoop.fs.FileSystem;
import org.apache.hadoop.fs.Path;
import org.apache.spark.sql.SparkSession;

/**
 * {@code run.json} of a scenarios or recommend run: the shared head ({@link RunJson#header}),
 * then the input folder and the estimation run read, with its seed and status.
 */
final class RunManifest {
  static final String RUN_JSON = RunJson.FILE;

  private RunManifest() {}

  /**
   * The identity of a run that reads {@code input} and the estimation run {@code posteriorDir}:
   * the input tables' files and the posterior's run.json (which itself fingerprints that run's
   * inputs, configuration and seed, and changes with every new estimation).
   */
  static RunIdentity identity(SparkSession spark, String command, RunConfig config,
      String input, String posteriorDir) {
    RunIdentity id = RunIdentity.of(command, config);
    id.part("inputs", "input files", InputFingerprint.ofInput(spark, config, input));
    Path json = new Path(posteriorDir, RUN_JSON);
    try {
      FileSystem fs = json.getFileSystem(spark.sparkContext().hadoopConfiguration());
      if (!fs.exists(json)) {
        throw new RunFailure(RunFailure.BAD_INPUT, "posterior " + posteriorDir + " has no "
            + RUN_JSON + "; pass the run folder of a finished 'aislecast estimate'");
      }
      id.part("posterior_run", "posterior run",
          List.of(InputFingerprint.ofFile(fs, json, RUN_JSON)));
    } catch (IOException e) {
      throw new RunFailure(RunFailure.BAD_INPUT, "cannot read posterior " + posteriorDir + ": "
          + e.getMessage(), e);
    }
    return id;
  }

  static Map<String, Object> header(SparkSession spark, RunIdentity id, String runId,
      String input, String posteriorDir, PosteriorRun posterior) {
    Map<String, Object> m = RunJson.header(spark, runId, "ok", id);
    m.put("input", input);
    m.put("posterior", posteriorDir);
    m.put("posterior_seed", posterior.seed());
    m.put("posterior_status", posterior.status());
    return m;
  }

  static void write(SparkSession spark, String runDir, Map<String, Object> m) {
    RunJson.write(spark, runDir, m);
  }
}
