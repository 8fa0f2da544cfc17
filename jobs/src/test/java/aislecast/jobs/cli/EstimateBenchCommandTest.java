package aislecast.jobs.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.io.IOException;
import java.io.PrintWriter;
import java.io.StringWriter;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.stream.Stream;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import picocli.CommandLine;

/**
 * {@code estimate-bench --conf}: the file's priors reach the runs, while the sweep counts and
 * chains are the command's and every run does all its sweeps. Read back from the run's own
 * {@code run.json}, which states the priors and sweeps as used.
 */
class EstimateBenchCommandTest {

  @TempDir Path tmp;

  @Test
  void configurationPriorsApplyAndTheCommandKeepsItsSweeps() throws IOException {
    Path conf = tmp.resolve("bench.yaml");
    // a prior scale unlike the default (0.5), a sweep count, chain count and early stop the
    // command must override
    Files.writeString(conf, "priors:\n  variance_scale: 0.005\n  price_noise_scale: 0.002\n"
        + "sampler:\n  chains: 6\n  warmup: 300\n  sampling: 900\n  stop_when_converged: true\n"
        + "  thin: 3\n");
    Path work = tmp.resolve("work");
    StringWriter err = new StringWriter();
    CommandLine cli = Main.commandLine();
    cli.setErr(new PrintWriter(err, true));
    int code = cli.execute("estimate-bench", "--base-stores", "3", "--scales", "1", "--warmup",
        "2", "--sampling", "4", "--chains", "2", "--master", "local[2]", "--conf",
        conf.toString(), "--work", work.toString());
    assertEquals(0, code, err.toString());

    List<Path> runs;
    try (Stream<Path> s = Files.list(work.resolve("runs"))) {
      runs = s.filter(p -> p.getFileName().toString().startsWith("bench-x1-")).toList();
    }
    assertEquals(1, runs.size(), runs.toString());
    JsonNode m = new ObjectMapper().readTree(runs.get(0).resolve("run.json").toFile());
    JsonNode pr = m.path("variance_priors");
    assertEquals(0.005, pr.path("tau2").path("scale").asDouble(), 0.0, pr.toString());
    assertEquals(0.005, pr.path("sigma_xi2").path("scale").asDouble(), 0.0, pr.toString());
    assertEquals(0.002, pr.path("sigma_p2").path("scale").asDouble(), 0.0, pr.toString());
    JsonNode s = m.path("sampler");
    assertEquals(2, s.path("chains").asInt(), s.toString());
    assertEquals(2, s.path("warmup_sweeps").asInt(), s.toString());
    assertEquals(4, s.path("sampling_sweeps").asInt(), s.toString());
    assertEquals(1, s.path("thin").asInt(), s.toString());
    assertFalse(s.path("stop_when_converged").asBoolean(true), s.toString());
    assertEquals(6, s.path("sweeps_done").asInt(), s.toString());
  }

  @Test
  void aMissingConfigurationFileIsAClearUsageError() {
    StringWriter err = new StringWriter();
    CommandLine cli = Main.commandLine();
    cli.setErr(new PrintWriter(err, true));
    int code = cli.execute("estimate-bench", "--base-stores", "3", "--scales", "1",
        "--conf", tmp.resolve("none.yaml").toString(), "--work", tmp.toString());
    assertEquals(2, code, err.toString());
    assertTrue(err.toString().contains("none.yaml does not exist"), err.toString());
  }
}
