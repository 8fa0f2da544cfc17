package aislecast.jobs.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import aislecast.jobs.spark.SparkSessions;
import aislecast.jobs.validate.SampleInput;
import java.io.IOException;
import java.io.PrintWriter;
import java.io.StringWriter;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.stream.Stream;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import picocli.CommandLine;

/** The CLI run in-process: exit codes, messages, and the published run folder. */
class ValidateCommandTest {

  private static SparkSessions.Handle handle;
  private static SparkSession spark;

  @TempDir Path tmp;

  private final StringWriter out = new StringWriter();
  private final StringWriter err = new StringWriter();

  @BeforeAll
  static void startSpark() {
    handle = SparkSessions.open("local[2]", "ValidateCommandTest");
    spark = handle.spark();
  }

  @AfterAll
  static void stopSpark() {
    handle.close();
  }

  private int run(String... args) {
    CommandLine cli = new CommandLine(new Main());
    cli.setOut(new PrintWriter(out, true));
    cli.setErr(new PrintWriter(err, true));
    return cli.execute(args);
  }

  private static List<String> entries(Path dir) throws IOException {
    try (Stream<Path> s = Files.list(dir)) {
      return s.map(p -> p.getFileName().toString()).sorted().toList();
    }
  }

  @Test
  void validInputExitsZeroAndPublishesTheRunFolder() throws IOException {
    Path input = new SampleInput().writeCsv(tmp.resolve("in"));
    Path output = tmp.resolve("out");
    int code = run("validate", "--input", input.toString(), "--output", output.toString(),
        "--run-id", "r1");
    assertEquals(0, code, err.toString());
    assertEquals(List.of("r1"), entries(output), "no staging folder left behind");
    assertEquals(0, spark.read().parquet(output + "/r1/validation/rejects").count());
    assertTrue(out.toString().contains("rejected 0 of 24 rows"), out.toString());
    assertTrue(out.toString().contains(output.resolve("r1/validation/rejects").toString()),
        "prints where the rejects are");

    assertTrue(Files.isRegularFile(output.resolve("r1/run.json")));

    // The same run id and input again does nothing; other input is refused without --replace:
    // a published run is never overwritten by accident.
    assertEquals(0, run("validate", "--input", input.toString(), "--output", output.toString(),
        "--run-id", "r1"), err.toString());
    assertTrue(out.toString().contains("already exists with the same input files"),
        out.toString());
    Files.writeString(input.resolve("stores.csv"), "\n", java.nio.file.StandardOpenOption.APPEND);
    assertEquals(2, run("validate", "--input", input.toString(), "--output", output.toString(),
        "--run-id", "r1"));
    assertTrue(err.toString().contains("already exists and is not this run: input files differ"
        + " (changed stores.csv)"), err.toString());
    assertTrue(err.toString().contains("--replace"), err.toString());
    assertEquals(List.of("r1"), entries(output), "nothing staged or moved aside");
  }

  @Test
  void missingColumnExitsTwoNamingTableAndColumnWithoutStackTrace() throws IOException {
    SampleInput in = new SampleInput();
    in.tables.put("sales", in.tables.get("sales").stream()
        .map(l -> l.substring(0, l.lastIndexOf(',', l.lastIndexOf(',', l.lastIndexOf(',') - 1)
            - 1)))
        .collect(java.util.stream.Collectors.toCollection(java.util.ArrayList::new)));
    assertEquals("store_id,week,product_id,units", in.tables.get("sales").get(0));
    Path input = in.writeCsv(tmp.resolve("in"));
    Path output = tmp.resolve("out");
    int code = run("validate", "--input", input.toString(), "--output", output.toString());
    assertEquals(2, code);
    String e = err.toString();
    assertTrue(e.contains("table sales") && e.contains("'price'"), e);
    assertFalse(e.contains("\tat "), "no stack trace: " + e);
    assertEquals(List.of(), entries(output), "nothing published");
  }

  @Test
  void rejectShareAboveLimitExitsTwoAndStillWritesRejects() throws IOException {
    SampleInput in = new SampleInput();
    in.set("sales", 1, "units", "-1").set("sales", 2, "price", "abc");
    Path input = in.writeCsv(tmp.resolve("in"));
    Path conf = tmp.resolve("c.yaml");
    Files.writeString(conf, "validation:\n  max_reject_share: 0.05\n");
    Path output = tmp.resolve("out");
    // 2 of 24 rows = 8.3% > 5%.
    int code = run("validate", "--input", input.toString(), "--output", output.toString(),
        "--run-id", "r2", "--conf", conf.toString());
    assertEquals(2, code);
    assertTrue(err.toString().contains("2 of 24 input rows (8.33%) were rejected"),
        err.toString());
    List<Row> rejects = spark.read().parquet(output + "/r2/validation/rejects")
        .orderBy("row_number").collectAsList();
    assertEquals(2, rejects.size());
    assertEquals("negative_units", rejects.get(0).getAs("reason"));
    assertEquals("malformed_number", rejects.get(1).getAs("reason"));

    // The same input passes with a limit of 10%.
    Files.writeString(conf, "validation:\n  max_reject_share: 0.10\n");
    assertEquals(0, run("validate", "--input", input.toString(), "--output",
        output.toString(), "--run-id", "r3", "--conf", conf.toString()), err.toString());
  }

  @Test
  void badConfigurationKeyExitsTwo() throws IOException {
    Path input = new SampleInput().writeCsv(tmp.resolve("in"));
    Path conf = tmp.resolve("c.yaml");
    Files.writeString(conf, "validation:\n  max_reject_shar: 0.05\n");
    int code = run("validate", "--input", input.toString(), "--output",
        tmp.resolve("out").toString(), "--conf", conf.toString());
    assertEquals(2, code);
    assertTrue(err.toString().contains("unknown configuration key 'validation.max_reject_shar'"),
        err.toString());
    assertFalse(err.toString().contains("\tat "), err.toString());
  }

  @Test
  void usageErrorsExitTwoAndHelpExitsZero() {
    assertEquals(2, run("validate", "--output", tmp.toString()));
    assertTrue(err.toString().contains("--input"), err.toString());
    assertEquals(2, run("validate", "--input", "x", "--seed", "many"));
    assertEquals(2, run("validate", "--input", tmp.resolve("nope").toString(), "--output",
        tmp.resolve("out").toString()));
    assertTrue(err.toString().contains("does not exist"), err.toString());
    assertEquals(2, run("validate", "--input", tmp.toString(), "--run-id", "../escape"));
    for (String cmd : List.of("validate", "demo", "generate")) {
      assertEquals(0, run(cmd, "--help"), cmd);
    }
    assertTrue(out.toString().contains("--master=URL"), out.toString());
    assertEquals(2, run());
  }
}
