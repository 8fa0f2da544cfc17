package aislecast.jobs.estimate;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import aislecast.core.sim.DemandSimulator;
import aislecast.core.sim.SimSettings;
import aislecast.core.sim.SimWriter;
import aislecast.jobs.cli.Main;
import aislecast.jobs.io.FolderSnapshot;
import aislecast.jobs.io.Sha256Sum;
import aislecast.jobs.spark.SparkSessions;
import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.io.PrintWriter;
import java.io.StringWriter;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Map;
import java.util.stream.Stream;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * Reruns of one estimate run id through the command line (DESIGN section 8): the same inputs,
 * configuration and seed do nothing; other ones are refused naming the difference; --replace
 * swaps the folder whole. Same small simulated data as {@link EstimateJobTest} and its smallest
 * sampler settings (2 chains x 4 + 6 sweeps).
 */
class EstimateRerunTest {
  @TempDir static Path tmp;
  static SparkSessions.Handle spark;
  static Path conf;

  @BeforeAll
  static void setUp() throws Exception {
    System.setProperty("spark.sql.shuffle.partitions", "1");
    SimWriter.write(DemandSimulator.simulate(SimSettings.demo().withSizes(4, 6, 5, 2, 2, 30)),
        tmp.resolve("in"), false);
    conf = tmp.resolve("small.yaml");
    Files.writeString(conf, String.join("\n", "sampler:", "  chains: 2", "  warmup: 4",
        "  sampling: 6", "  local_steps: 1", "  leapfrog_steps: 4", "  partitions: 2", ""));
    spark = SparkSessions.open("local[2]", "estimate-rerun-test");
  }

  @AfterAll
  static void stop() {
    spark.close();
  }

  private record Run(int code, String out, String err) {}

  private static Run cli(String... args) {
    StringWriter out = new StringWriter();
    StringWriter err = new StringWriter();
    int code = Main.commandLine().setOut(new PrintWriter(out, true))
        .setErr(new PrintWriter(err, true)).execute(args);
    System.out.print(out);
    System.out.print(err);
    return new Run(code, out.toString(), err.toString());
  }

  private static String[] args(Path input, Path runs, String... extra) {
    List<String> a = new ArrayList<>(List.of("estimate", "--input", input.toString(),
        "--output", runs.toString(), "--conf", conf.toString(), "--run-id", "r",
        "--allow-unconverged"));
    a.addAll(Arrays.asList(extra));
    return a.toArray(new String[0]);
  }

  @Test
  void rerunsDoNothingOrAreRefusedOrReplaceTheFolderWhole() throws Exception {
    Path input = tmp.resolve("in-copy");
    Files.createDirectories(input);
    try (Stream<Path> s = Files.list(tmp.resolve("in"))) {
      for (Path f : (Iterable<Path>) s::iterator) {
        Files.copy(f, input.resolve(f.getFileName()));
      }
    }
    Path runs = tmp.resolve("runs");
    Path r = runs.resolve("r");

    // 1. first run, structured log lines
    Run first = cli(args(input, runs, "--seed", "5", "--log-format", "kv"));
    assertEquals(0, first.code(), first.err());
    List<String> lines = first.out().lines().toList();
    assertTrue(lines.stream().allMatch(l -> l.startsWith("ts=") && l.contains(" level=info")
        && l.contains(" job=estimate ")), first.out());
    assertTrue(lines.stream().anyMatch(l -> l.contains(" event=sweep sweep=10 of=10 ")),
        first.out());
    assertTrue(lines.stream().anyMatch(l -> l.contains(" event=published ")), first.out());

    // run.json: every input file's SHA-256 as sha256sum computes it, and the combined digest
    // over the documented lines
    JsonNode run = new ObjectMapper().readTree(r.resolve("run.json").toFile());
    JsonNode inputs = run.path("fingerprints").path("inputs");
    List<String> names = new ArrayList<>();
    StringBuilder combined = new StringBuilder();
    for (JsonNode f : inputs.path("files")) {
      Path p = input.resolve(f.path("path").asText());
      names.add(f.path("path").asText());
      assertEquals(Sha256Sum.of(p), f.path("sha256").asText(), p.toString());
      assertEquals(Files.size(p), f.path("bytes").asLong(), p.toString());
      combined.append(f.path("path").asText()).append('\t').append(Files.size(p)).append('\t')
          .append(Sha256Sum.of(p)).append('\n');
    }
    assertEquals(List.of("products.csv", "sales.csv", "shopper_draws.csv", "stores.csv"), names,
        "the tables read, not truth.json");
    Path lineFile = tmp.resolve("combined.txt");
    Files.writeString(lineFile, combined, StandardCharsets.UTF_8);
    assertEquals(Sha256Sum.of(lineFile), inputs.path("sha256").asText());
    assertTrue(run.path("fingerprints").path("configuration_sha256").asText()
        .matches("[0-9a-f]{64}"));
    assertEquals(5, run.path("seed").asLong());
    Map<String, String> before = FolderSnapshot.of(r);

    // 2. the same run again: nothing is done, nothing changes
    Run same = cli(args(input, runs, "--seed", "5", "--log-format", "text"));
    assertEquals(0, same.code(), same.err());
    assertTrue(same.out().contains("already exists with the same input files, configuration and"
        + " seed (status not_converged_allowed); nothing to do"), same.out());
    assertFalse(same.out().contains("sweep"), "no sweeps ran: " + same.out());
    assertEquals(before, FolderSnapshot.of(r));
    assertEquals(List.of("r"), FolderSnapshot.names(runs));

    // 3. another seed, then one byte changed in sales.csv: refused, folder untouched
    Run seed = cli(args(input, runs, "--seed", "6"));
    assertEquals(2, seed.code());
    assertTrue(seed.err().contains("seed differs (existing 5, now 6)"), seed.err());
    byte[] sales = Files.readAllBytes(input.resolve("sales.csv"));
    int last = sales.length - 1;
    while (!Character.isDigit(sales[last])) {
      last--; // the last digit of the last row (its unit cost): still a valid row
    }
    sales[last] = (byte) (sales[last] == '9' ? '8' : sales[last] + 1);
    Files.write(input.resolve("sales.csv"), sales);
    Run changed = cli(args(input, runs, "--seed", "5"));
    assertEquals(2, changed.code());
    assertTrue(changed.err().contains("input files differ (changed sales.csv)"), changed.err());
    assertTrue(changed.err().contains("--replace"), changed.err());
    assertFalse(changed.err().contains("seed"), changed.err());
    assertEquals(before, FolderSnapshot.of(r));
    assertEquals(List.of("r"), FolderSnapshot.names(runs));

    // 4. --replace: a new whole run in its place, nothing left aside
    Run replaced = cli(args(input, runs, "--seed", "5", "--replace"));
    assertEquals(0, replaced.code(), replaced.err());
    assertEquals(List.of("r"), FolderSnapshot.names(runs));
    JsonNode now = new ObjectMapper().readTree(r.resolve("run.json").toFile());
    assertNotEquals(run.path("written_at").asText(), now.path("written_at").asText());
    for (JsonNode f : now.path("fingerprints").path("inputs").path("files")) {
      assertEquals(Sha256Sum.of(input.resolve(f.path("path").asText())),
          f.path("sha256").asText());
    }
    Map<String, String> after = FolderSnapshot.of(r);
    assertEquals(before.keySet().stream().filter(k -> !k.contains("part-")).sorted().toList(),
        after.keySet().stream().filter(k -> !k.contains("part-")).sorted().toList(),
        "the same kinds of files (part names carry random ids)");
    assertNotEquals(before.get("run.json"), after.get("run.json"));
  }
}
