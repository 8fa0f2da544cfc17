package aislecast.jobs.io;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import aislecast.jobs.spark.SparkSessions;
import java.io.PrintWriter;
import java.io.StringWriter;
import java.time.Clock;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import org.apache.spark.api.java.JavaSparkContext;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

/** The task progress of a real local Spark action, read back from kv records. */
class TaskProgressTest {
  private static SparkSessions.Handle spark;

  @BeforeAll
  static void start() {
    spark = SparkSessions.open("local[2]", "task-progress-test");
  }

  @AfterAll
  static void stop() {
    spark.close();
  }

  @Test
  void reportsEveryTaskOfTheActionAndEndsComplete() {
    StringWriter s = new StringWriter();
    RunLog log = new RunLog("scenarios", true, false, new PrintWriter(s), Clock.systemUTC());
    JavaSparkContext jsc = JavaSparkContext.fromSparkContext(spark.spark().sparkContext());
    long n;
    try (TaskProgress p = new TaskProgress(spark.spark(), log, "evaluate", 0.0)) {
      n = jsc.parallelize(List.of(1, 2, 3, 4, 5, 6, 7, 8), 8).map(x -> x * x).count();
      p.complete();
    }
    assertEquals(8, n);
    List<Map<String, String>> records = new ArrayList<>();
    for (String line : s.toString().split("\n")) {
      if (!line.isBlank()) {
        records.add(RunLogTest.parse(line));
      }
    }
    assertFalse(records.isEmpty(), "no progress records: " + s);
    Map<String, String> last = records.get(records.size() - 1);
    assertEquals("tasks", last.get("event"));
    assertEquals("evaluate", last.get("phase"));
    assertEquals("8", last.get("of"), "one stage of 8 partitions: " + s);
    assertEquals("8", last.get("tasks"));
    for (Map<String, String> r : records) {
      int done = Integer.parseInt(r.get("tasks"));
      assertTrue(done >= 0 && done <= Integer.parseInt(r.get("of")), "done within total: " + r);
    }
  }
}
