package aislecast.jobs.io;

import aislecast.jobs.config.RunFailure;
import java.io.IOException;
import java.util.UUID;
import java.util.regex.Pattern;
import org.apache.hadoop.fs.FileSystem;
import org.apache.hadoop.fs.Path;
import org.apache.spark.sql.SparkSession;

/**
 * A run folder {@code <output>/<run_id>} that appears whole or not at all: everything is written
 * under a hidden staging folder {@code <output>/.staging-<run_id>-<nonce>} (Spark and SQL engines
 * skip names starting with '.'), which {@link #commit()} renames into place in one step.
 */
public final class RunDirectory {

  private static final Pattern RUN_ID = Pattern.compile("[A-Za-z0-9][A-Za-z0-9._-]*");

  private final FileSystem fs;
  private final Path staging;
  private final Path target;
  private boolean done;

  private RunDirectory(FileSystem fs, Path staging, Path target) {
    this.fs = fs;
    this.staging = staging;
    this.target = target;
  }

  /**
   * Creates the staging folder for run {@code runId} under {@code outputRoot}.
   *
   * @throws RunFailure exit 2 if the run id is not a plain folder name or the run already exists
   */
  public static RunDirectory create(SparkSession spark, String outputRoot, String runId) {
    if (!RUN_ID.matcher(runId).matches()) {
      throw new RunFailure(
          RunFailure.BAD_INPUT,
          "run id '" + runId + "' must be a plain folder name (letters, digits, '.', '_', '-')");
    }
    Path root = new Path(outputRoot);
    try {
      FileSystem fs = root.getFileSystem(spark.sparkContext().hadoopConfiguration());
      Path target = new Path(root, runId);
      if (fs.exists(target)) {
        throw new RunFailure(
            RunFailure.BAD_INPUT,
            "run folder " + target + " already exists; choose another --run-id");
      }
      Path staging = new Path(root, ".staging-" + runId + "-" + UUID.randomUUID());
      if (!fs.mkdirs(staging)) {
        throw new RunFailure(RunFailure.OTHER, "cannot create staging folder " + staging);
      }
      return new RunDirectory(fs, staging, target);
    } catch (IOException e) {
      throw new RunFailure(
          RunFailure.OTHER, "cannot prepare output folder " + outputRoot + ": " + e.getMessage(), e);
    }
  }

  /** Where to write now (the staging folder), as a path string Spark understands. */
  public String staging() {
    return staging.toString();
  }

  /** Where the run will be visible after {@link #commit()} (absolute path for local files). */
  public String target() {
    Path q = fs.makeQualified(target);
    return "file".equals(q.toUri().getScheme()) ? q.toUri().getPath() : q.toString();
  }

  /** Renames staging into place. */
  public void commit() {
    try {
      if (fs.exists(target)) {
        throw new RunFailure(
            RunFailure.BAD_INPUT, "run folder " + target + " appeared while this run was writing");
      }
      if (!fs.rename(staging, target)) {
        throw new RunFailure(RunFailure.OTHER, "cannot rename " + staging + " to " + target);
      }
      done = true;
    } catch (IOException e) {
      throw new RunFailure(
          RunFailure.OTHER, "cannot publish run folder " + target + ": " + e.getMessage(), e);
    }
  }

  /** Deletes the staging folder unless committed; safe to call more than once. */
  public void abort() {
    if (done) {
      return;
    }
    done = true;
    try {
      fs.delete(staging, true);
    } catch (IOException e) {
      // Leaving a hidden staging folder behind is harmless; the original failure matters more.
    }
  }
}
