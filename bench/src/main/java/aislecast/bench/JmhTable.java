package aislecast.bench;

import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.TimeUnit;
import org.openjdk.jmh.annotations.Mode;
import org.openjdk.jmh.results.Result;
import org.openjdk.jmh.results.RunResult;
import org.openjdk.jmh.runner.Runner;
import org.openjdk.jmh.runner.RunnerException;
import org.openjdk.jmh.runner.options.Options;
import org.openjdk.jmh.runner.options.OptionsBuilder;
import org.openjdk.jmh.runner.options.TimeValue;
import org.openjdk.jmh.runner.options.VerboseMode;

/**
 * The JMH run behind each printed benchmark table ({@link KernelTable}, {@link EquilibriumTable}):
 * every method of one benchmark class, 1 fork, 3 warm-up and 5 measured iterations of 1 s each,
 * one thread; and the lookups the tables make in its results.
 */
final class JmhTable {
  private final List<RunResult> results;

  private JmhTable(List<RunResult> results) {
    this.results = results;
  }

  /** Runs every benchmark method of {@code bench}; fails when JMH returns nothing. */
  static JmhTable run(Class<?> bench, Mode mode, TimeUnit unit) throws RunnerException {
    Options options = new OptionsBuilder()
        .include(bench.getName() + "\\.")
        .mode(mode)
        .timeUnit(unit)
        .forks(1)
        .warmupIterations(3)
        .warmupTime(TimeValue.seconds(1))
        .measurementIterations(5)
        .measurementTime(TimeValue.seconds(1))
        .threads(1)
        .verbosity(VerboseMode.SILENT)
        .build();
    List<RunResult> list = new ArrayList<>(new Runner(options).run());
    if (list.isEmpty()) {
      throw new RunnerException("JMH returned no results");
    }
    return new JmhTable(list);
  }

  /** A {@code @Param} value of the run (every row shares it). */
  String param(String name) {
    return results.get(0).getParams().getParam(name);
  }

  /** The primary result of benchmark method {@code method}, or null when it did not run. */
  Result<?> find(String method) {
    for (RunResult rr : results) {
      if (rr.getParams().getBenchmark().endsWith("." + method)) {
        return rr.getPrimaryResult();
      }
    }
    return null;
  }
}
