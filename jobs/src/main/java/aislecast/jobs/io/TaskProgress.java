package aislecast.jobs.io;

import java.util.concurrent.atomic.AtomicInteger;
import org.apache.spark.SparkContext;
import org.apache.spark.scheduler.SparkListener;
import org.apache.spark.scheduler.SparkListenerStageSubmitted;
import org.apache.spark.scheduler.SparkListenerTaskEnd;
import org.apache.spark.sql.SparkSession;

/**
 * Progress of a long Spark phase that is one or a few actions (scenario evaluation,
 * recommendations): Spark tasks finished of those submitted so far, drawn through {@link RunLog}
 * (a redrawn bar on a terminal, records otherwise). Counts come from a {@link SparkListener} on
 * Spark's listener thread; updates are throttled to one every {@code minSeconds} plus a last one at
 * {@link #close()}. The total grows when a later stage of the phase is submitted, so the ETA is an
 * estimate for the stages known so far.
 */
public final class TaskProgress implements AutoCloseable {
  private final SparkContext sc;
  private final RunLog log;
  private final String phase;
  private final double minSeconds;
  private final long start = System.nanoTime();
  private final AtomicInteger submitted = new AtomicInteger();
  private final AtomicInteger finished = new AtomicInteger();
  private final SparkListener listener;
  private long lastDraw;

  TaskProgress(SparkSession spark, RunLog log, String phase, double minSeconds) {
    this.sc = spark.sparkContext();
    this.log = log;
    this.phase = phase;
    this.minSeconds = minSeconds;
    this.listener = new SparkListener() {
      @Override
      public void onStageSubmitted(SparkListenerStageSubmitted e) {
        submitted.addAndGet(e.stageInfo().numTasks());
        draw(false);
      }

      @Override
      public void onTaskEnd(SparkListenerTaskEnd e) {
        if (e.taskInfo().successful()) {
          finished.incrementAndGet();
        }
        draw(false);
      }
    };
    sc.addSparkListener(listener);
  }

  /** Starts reporting the tasks of {@code phase} (updates at most every 2 seconds). */
  public static TaskProgress start(SparkSession spark, RunLog log, String phase) {
    return new TaskProgress(spark, log, phase, 2.0);
  }

  private synchronized void draw(boolean force) {
    long now = System.nanoTime();
    if (!force && (now - lastDraw) / 1e9 < minSeconds) {
      return;
    }
    lastDraw = now;
    int total = Math.max(submitted.get(), 1);
    int done = Math.min(finished.get(), total);
    double elapsed = (now - start) / 1e9;
    double eta = done == 0 ? Double.NaN : elapsed * (total - done) / done;
    log.progress(new RunLog.Progress("tasks", done, total, phase, elapsed, eta, Double.NaN,
        null));
  }

  /**
   * Marks the phase's actions as returned: every submitted task has finished, whatever the
   * listener has delivered so far (Spark's listener bus is asynchronous and may trail).
   */
  public void complete() {
    finished.set(submitted.get());
  }

  /** Stops listening and draws the final state (finishing the bar on a terminal). */
  @Override
  public void close() {
    sc.removeSparkListener(listener);
    draw(true);
    log.endBar();
  }
}
