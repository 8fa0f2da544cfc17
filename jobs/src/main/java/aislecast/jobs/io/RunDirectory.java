package aislecast.jobs.io;

import aislecast.jobs.config.RunFailure;
import com.fasterxml.jackson.databind.JsonNode;
import java.io.IOException;
import java.util.ArrayList;
import java.util.List;
import java.util.UUID;
import java.util.regex.Pattern;
import org.apache.hadoop.fs.FileSystem;
import org.apache.hadoop.fs.Path;
import org.apache.spark.sql.SparkSession;

/**
 * A run folder {@code <output>/<run_id>} that appears whole or not at all: everything is written
 * under a hidden staging folder {@code <output>/.staging-<run_id>-<nonce>} (Spark and SQL engines
 * skip names starting with '.'), which {@link #commit()} renames into place in one step.
 *
 * <p>Reruns (DESIGN section 8): when the run folder exists already, its {@code run.json} is
 * compared with this run's {@link RunIdentity}. The same inputs, configuration and seed mean
 * there is nothing to do ({@link #identicalExists()}); anything else is refused (exit 2) unless
 * {@code replace} is set. A replacement is written to staging like any run; {@link #commit()}
 * then moves the old folder aside to {@code <output>/.replaced-<run_id>}, renames staging into
 * place and deletes the old folder. If the second rename fails the old folder is moved back; if
 * the process dies between the two renames, the next run of that id moves it back before doing
 * anything else. Readers see the old folder, briefly none, or the new one; never a mix. Two
 * processes writing the same run id at once are not supported.
 */
public final class RunDirectory {

  private static final Pattern RUN_ID = Pattern.compile("[A-Za-z0-9][A-Za-z0-9._-]*");

  /** Test hook: runs between moving the old folder aside and renaming staging into place. */
  static volatile Runnable betweenMoves = () -> { };

  private final FileSystem fs;
  private final Path staging;
  private final Path target;
  private final Path aside;
  private final boolean replace;
  private final JsonNode existing;
  private final List<String> notes;
  private boolean done;

  private RunDirectory(FileSystem fs, Path staging, Path target, Path aside, boolean replace,
      JsonNode existing, List<String> notes) {
    this.fs = fs;
    this.staging = staging;
    this.target = target;
    this.aside = aside;
    this.replace = replace;
    this.existing = existing;
    this.notes = notes;
    this.done = staging == null;
  }

  /**
   * Opens run {@code runId} under {@code outputRoot}: an identical existing run (nothing to do),
   * or a new staging folder.
   *
   * @param replace replace an existing run folder that differs from {@code identity}
   * @throws RunFailure exit 2 if the run id is not a plain folder name, or the run exists with
   *     other inputs, configuration or seed and {@code replace} is not set
   */
  public static RunDirectory create(SparkSession spark, String outputRoot, String runId,
      RunIdentity identity, boolean replace) {
    Path root = new Path(outputRoot);
    try {
      FileSystem fs = root.getFileSystem(spark.sparkContext().hadoopConfiguration());
      return create(fs, root, runId, identity, replace);
    } catch (IOException e) {
      throw new RunFailure(
          RunFailure.OTHER, "cannot prepare output folder " + outputRoot + ": " + e.getMessage(), e);
    }
  }

  static RunDirectory create(FileSystem fs, Path root, String runId, RunIdentity identity,
      boolean replace) throws IOException {
    if (!RUN_ID.matcher(runId).matches()) {
      throw new RunFailure(
          RunFailure.BAD_INPUT,
          "run id '" + runId + "' must be a plain folder name (letters, digits, '.', '_', '-')");
    }
    Path target = new Path(root, runId);
    Path aside = new Path(root, ".replaced-" + runId);
    List<String> notes = new ArrayList<>();
    recoverInterruptedReplace(fs, target, aside, notes);
    if (fs.exists(target) && !replace) {
      JsonNode stored;
      try {
        stored = RunJson.read(fs, new Path(target, RunJson.FILE));
      } catch (IOException e) {
        stored = null;
      }
      List<String> diffs = stored == null
          ? List.of("it has no readable " + RunJson.FILE)
          : identity.differences(stored);
      if (diffs.isEmpty()) {
        return new RunDirectory(fs, null, target, aside, false, stored, notes);
      }
      throw new RunFailure(RunFailure.BAD_INPUT, "run folder " + target + " already exists and"
          + " is not this run: " + String.join("; ", diffs) + ". Pass --replace to replace it"
          + " (the old folder stays until the new run is complete), or choose another --run-id");
    }
    Path staging = new Path(root, ".staging-" + runId + "-" + UUID.randomUUID());
    if (!fs.mkdirs(staging)) {
      throw new RunFailure(RunFailure.OTHER, "cannot create staging folder " + staging);
    }
    return new RunDirectory(fs, staging, target, aside, replace, null, notes);
  }

  /**
   * Finishes a replacement a dead process left between its two renames: the old folder moved
   * aside and no new one in place means the old one goes back; both present means the new one
   * was published and the old copy is stale.
   */
  private static void recoverInterruptedReplace(FileSystem fs, Path target, Path aside,
      List<String> notes) throws IOException {
    if (!fs.exists(aside)) {
      return;
    }
    if (fs.exists(target)) {
      fs.delete(aside, true);
      notes.add("removed " + aside + ", left over from a finished replacement");
    } else if (fs.rename(aside, target)) {
      notes.add("restored " + target + " from " + aside + " (an earlier --replace was"
          + " interrupted)");
    } else {
      throw new RunFailure(RunFailure.OTHER, "an earlier --replace of " + target + " was"
          + " interrupted and the old run folder is at " + aside + "; move it back by hand");
    }
  }

  /** True when the run folder exists with the same identity: the caller has nothing to do. */
  public boolean identicalExists() {
    return existing != null;
  }

  /** The existing run's run.json (only when {@link #identicalExists()}). */
  public JsonNode existing() {
    return existing;
  }

  /** What opening the folder repaired, for the log (usually empty). */
  public List<String> notes() {
    return notes;
  }

  /** Where to write now (the staging folder), as a path string Spark understands. */
  public String staging() {
    if (staging == null) {
      throw new IllegalStateException("an identical run exists; there is nothing to write");
    }
    return staging.toString();
  }

  /** Where the run will be visible after {@link #commit()} (absolute path for local files). */
  public String target() {
    Path q = fs.makeQualified(target);
    return "file".equals(q.toUri().getScheme()) ? q.toUri().getPath() : q.toString();
  }

  /** Renames staging into place, replacing the old folder when this run was opened to. */
  public void commit() {
    if (staging == null) {
      throw new IllegalStateException("an identical run exists; there is nothing to commit");
    }
    try {
      boolean hadOld = fs.exists(target);
      if (hadOld && !replace) {
        throw new RunFailure(
            RunFailure.BAD_INPUT, "run folder " + target + " appeared while this run was writing");
      }
      if (hadOld) {
        if (fs.exists(aside)) {
          throw new RunFailure(RunFailure.OTHER, aside + " exists: is another --replace of this"
              + " run id running?");
        }
        if (!fs.rename(target, aside)) {
          throw new RunFailure(RunFailure.OTHER, "cannot move " + target + " aside to " + aside);
        }
      }
      try {
        betweenMoves.run();
        if (!fs.rename(staging, target)) {
          throw new RunFailure(RunFailure.OTHER, "cannot rename " + staging + " to " + target);
        }
      } catch (IOException | RuntimeException e) {
        if (hadOld && !fs.exists(target) && !fs.rename(aside, target)) {
          e.addSuppressed(new IOException("the old run folder is at " + aside
              + "; the next run of this id moves it back"));
        }
        throw e;
      }
      done = true;
      if (hadOld) {
        try {
          fs.delete(aside, true);
        } catch (IOException e) {
          // a hidden stale copy is harmless; the next run of this id removes it
        }
      }
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
