package aislecast.jobs.validate;

import aislecast.core.sim.DemandSimulator;
import aislecast.core.sim.SimSettings;
import aislecast.core.sim.SimWriter;
import aislecast.jobs.config.RunConfig;
import aislecast.jobs.spark.SparkSessions;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Locale;
import java.util.concurrent.atomic.AtomicInteger;
import org.apache.spark.scheduler.SparkListener;
import org.apache.spark.scheduler.SparkListenerJobStart;
import org.apache.spark.scheduler.SparkListenerStageCompleted;
import org.apache.spark.scheduler.SparkListenerTaskEnd;
import org.apache.spark.sql.SparkSession;

/**
 * A benchmark, not a test: wall time of {@link InputValidator#run} on the bundled sample and on a
 * generated 3-store sample, with the Spark jobs, stages and tasks each validation launches
 * (counted with a {@link SparkListener}). Prints a table.
 *
 * <p>Arguments: {@code [repeats] [master] [bundled sample folder] [label]}; defaults 3,
 * {@code local[2]}, {@code data-samples/chilled-drinks}, "this build". One untimed validation of
 * each input runs first (JIT and Spark warm-up; its time is shown as "first"); the table shows the
 * median and the fastest of the timed repeats.
 */
public final class ValidateBenchmark {

  private ValidateBenchmark() {}

  public static void main(String[] args) throws Exception {
    int repeats = args.length > 0 ? Integer.parseInt(args[0]) : 3;
    String master = args.length > 1 ? args[1] : "local[2]";
    Path bundled = Path.of(args.length > 2 ? args[2] : "data-samples/chilled-drinks");
    String label = args.length > 3 ? args[3] : "this build";

    Path work = Files.createTempDirectory("aislecast-validate-bench-");
    Path small = work.resolve("three-stores");
    SimSettings demo = SimSettings.demo();
    SimWriter.write(DemandSimulator.simulate(demo.withSizes(3, demo.weeks(), demo.products(),
        demo.owners(), demo.attributes(), demo.draws())), small, false);

    List<String> rows = new ArrayList<>();
    try (SparkSessions.Handle handle = SparkSessions.open(master, "validate-bench")) {
      SparkSession spark = handle.spark();
      Counts counts = new Counts();
      spark.sparkContext().addSparkListener(counts);
      int run = 0;
      for (Path input : List.of(small, bundled)) {
        long w0 = System.nanoTime();
        validate(spark, input, work.resolve("warm-" + run++));
        double first = (System.nanoTime() - w0) * 1e-9;
        double[] seconds = new double[repeats];
        long inputRows = 0;
        int[] launched = null;
        for (int i = 0; i < repeats; i++) {
          // Listener events arrive asynchronously; wait for the bus to drain before reading.
          spark.sparkContext().listenerBus().waitUntilEmpty();
          counts.reset();
          long t0 = System.nanoTime();
          inputRows = validate(spark, input, work.resolve("run-" + run++));
          seconds[i] = (System.nanoTime() - t0) * 1e-9;
          spark.sparkContext().listenerBus().waitUntilEmpty();
          launched = counts.snapshot();
        }
        Arrays.sort(seconds);
        rows.add(String.format(Locale.ROOT, "| %-16s | %-10s | %6d | %7.2f | %8.2f | %9.2f | %4d | %6d | %5d |",
            input.getFileName(), label, inputRows, first, seconds[repeats / 2], seconds[0], launched[0],
            launched[1], launched[2]));
      }
    }
    System.out.println();
    System.out.println("validate on " + master + ", " + repeats + " timed repeats after one warm-up");
    System.out.println("first: the first validation of that input in this JVM (for the first input"
        + " also Spark's own warm-up, as in one `aislecast validate`); median and fastest of the"
        + " timed repeats; jobs, stages, tasks: launched by one timed validation");
    System.out.println("| input            | build      |   rows | first s | median s | fastest s | jobs | stages | tasks |");
    System.out.println("|------------------|------------|-------:|--------:|---------:|----------:|-----:|-------:|------:|");
    rows.forEach(System.out::println);
  }

  /** One validation into a fresh run folder; returns the input rows of all tables. */
  private static long validate(SparkSession spark, Path input, Path runDir) {
    try (ValidatedInput v = InputValidator.run(spark, RunConfig.defaults(), input.toString(),
        runDir.toString())) {
      return v.summary().inputRows();
    }
  }

  /** Jobs, completed stages and finished tasks since the last reset. */
  private static final class Counts extends SparkListener {
    private final AtomicInteger jobs = new AtomicInteger();
    private final AtomicInteger stages = new AtomicInteger();
    private final AtomicInteger tasks = new AtomicInteger();

    @Override
    public void onJobStart(SparkListenerJobStart e) {
      jobs.incrementAndGet();
    }

    @Override
    public void onStageCompleted(SparkListenerStageCompleted e) {
      stages.incrementAndGet();
    }

    @Override
    public void onTaskEnd(SparkListenerTaskEnd e) {
      tasks.incrementAndGet();
    }

    void reset() {
      jobs.set(0);
      stages.set(0);
      tasks.set(0);
    }

    int[] snapshot() {
      return new int[] {jobs.get(), stages.get(), tasks.get()};
    }
  }
}
