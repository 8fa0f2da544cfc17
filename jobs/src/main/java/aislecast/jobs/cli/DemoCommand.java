package aislecast.jobs.cli;

import aislecast.jobs.config.RunFailure;
import java.io.BufferedReader;
import java.io.BufferedWriter;
import java.io.IOException;
import java.io.PrintWriter;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import picocli.CommandLine;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;

/**
 * {@code aislecast demo}: the whole pipeline on the bundled chilled-drinks sample with the
 * embedded Spark, in a reduced configuration that finishes in minutes on two cores: generate
 * (only if the sample is missing), a reduced copy of the input (the first {@code --draws}
 * shopper draws per store), estimate (short chains, {@code conf/demo.yaml}), scenarios (every
 * file in {@code conf/scenarios}), recommend, and the report. Every step runs through its own
 * command, so the demo behaves exactly like the commands it chains.
 */
@Command(
    name = "demo",
    mixinStandardHelpOptions = true,
    description = {
      "Run the whole pipeline on the bundled sample (" + DemoCommand.SAMPLE_DIR + ", generated"
          + " first if missing) with the embedded Spark, in a reduced configuration, and print"
          + " where every output is.",
      "Steps: generate (if needed), reduced input, estimate, scenarios, recommend, report.",
      "--input replaces the sample; --conf defaults to " + DemoCommand.DEMO_CONF + "."
    },
    exitCodeListHeading = "Exit codes:%n",
    exitCodeList = {"0:ok", "1:unexpected failure", "2:bad input or configuration"})
public final class DemoCommand extends JobCommand {

  static final String SAMPLE_DIR = "data-samples/chilled-drinks";
  static final String DEMO_CONF = "conf/demo.yaml";
  static final String SCENARIOS = "conf/scenarios";
  static final String PORTFOLIO = "Brightwater Beverages";

  @Option(names = "--draws", paramLabel = "R", defaultValue = "20",
      description = "Shopper draws per store kept in the demo's reduced input (default ${DEFAULT-VALUE}).")
  int draws;

  private PrintWriter say;

  @Override
  protected int execute() {
    String input = common.input();
    if (input == null) {
      input = SAMPLE_DIR;
      if (!Files.isDirectory(Path.of(SAMPLE_DIR))) {
        generateSample();
      }
    }
    Path conf = common.conf() != null ? common.conf() : Path.of(DEMO_CONF);
    String id = common.runId();
    Path out = Path.of(common.output()).toAbsolutePath().normalize();
    Path reduced = out.resolve(id + "-input");
    reduceInput(Path.of(input), reduced, draws);
    say().println("demo: input " + input + " reduced to " + draws + " shopper draws per store in "
        + reduced + "; configuration " + conf);

    String estimate = id + "-estimate";
    step("estimate", new EstimateCommand(), withCommon(reduced, conf, estimate,
        "--allow-unconverged"));
    String scenarios = id + "-scenarios";
    step("scenarios", new ScenariosCommand(), withCommon(reduced, conf, scenarios,
        "--posterior", out.resolve(estimate).toString(), "--scenario", SCENARIOS));
    String recommend = id + "-recommend";
    step("recommend", new RecommendCommand(), withCommon(reduced, conf, recommend,
        "--posterior", out.resolve(estimate).toString(), "--portfolio", PORTFOLIO,
        "--own-cost-column", "unit_cost", "--draws", "20"));
    List<String> report = new ArrayList<>(List.of("--run", out.resolve(scenarios).toString(),
        "--with-run", out.resolve(recommend).toString()));
    report.addAll(master());
    step("report", new ReportCommand(), report);

    say().println();
    say().println("demo: done. Outputs:");
    say().println("  posterior        " + out.resolve(estimate) + "/posterior/");
    say().println("  scenarios        " + out.resolve(scenarios) + "/scenarios/");
    say().println("  elasticities     " + out.resolve(scenarios) + "/elasticities/");
    say().println("  recommendations  " + out.resolve(recommend) + "/recommendations/");
    say().println("  report           " + out.resolve(scenarios) + "/report/index.html");
    say().println("The demo's chains are short (see " + conf + "): the estimates are not converged"
        + " and are for showing the tool only. For the full-size run use the whole sample and"
        + " the default sampler settings:");
    say().println("  java -jar jobs/target/aislecast.jar estimate --input " + input
        + " --output runs");
    say().println("Results are model estimates with stated uncertainty; decisions stay with the"
        + " people responsible; pricing must follow local competition law.");
    return ExitCodeMapper.OK;
  }

  /** The demo's own lines, in the --log-format form; each step logs through its own command. */
  private PrintWriter say() {
    if (say == null) {
      say = log("demo").out();
    }
    return say;
  }

  private List<String> withCommon(Path input, Path conf, String runId, String... extra) {
    List<String> args = new ArrayList<>(List.of("--input", input.toString(), "--output",
        common.output(), "--conf", conf.toString(), "--run-id", runId, "--seed",
        Long.toString(common.seed())));
    args.addAll(master());
    args.addAll(List.of("--log-format", common.logFormat().name().toLowerCase(Locale.ROOT)));
    if (common.replace()) {
      args.add("--replace");
    }
    args.addAll(List.of(extra));
    return args;
  }

  /** {@code --master URL} when one was given; otherwise each step picks the same default. */
  private List<String> master() {
    return common.master() == null ? List.of() : List.of("--master", common.master());
  }

  private void step(String name, Object command, List<String> args) {
    say().println("demo: " + name + " ...");
    say().flush();
    int code = new CommandLine(command).setOut(out()).setErr(err())
        .execute(args.toArray(new String[0]));
    if (code != ExitCodeMapper.OK) {
      throw new RunFailure(code == RunFailure.BAD_INPUT ? RunFailure.BAD_INPUT
          : RunFailure.OTHER, "demo: step '" + name + "' failed with exit code " + code);
    }
  }

  /**
   * Copies the input tables, keeping only shopper draws with index at most {@code r} (the sample's
   * draws are numbered from 1, so the first r); done once per run id.
   */
  static void reduceInput(Path from, Path to, int r) {
    try {
      Files.createDirectories(to);
      try (var files = Files.list(from)) {
        for (Path f : (Iterable<Path>) files::iterator) {
          String name = f.getFileName().toString();
          if (!Files.isRegularFile(f) || !name.endsWith(".csv")) {
            continue;
          }
          if (name.equals("shopper_draws.csv")) {
            filterDraws(f, to.resolve(name), r);
          } else {
            Files.copy(f, to.resolve(name), StandardCopyOption.REPLACE_EXISTING);
          }
        }
      }
    } catch (IOException e) {
      throw new UncheckedIOException("demo: cannot prepare the reduced input in " + to, e);
    }
  }

  private static void filterDraws(Path from, Path to, int r) throws IOException {
    try (BufferedReader in = Files.newBufferedReader(from, StandardCharsets.UTF_8);
        BufferedWriter w = Files.newBufferedWriter(to, StandardCharsets.UTF_8)) {
      String header = in.readLine();
      List<String> cols = List.of(header.split(","));
      int drawCol = cols.indexOf("draw");
      if (drawCol < 0) {
        throw new RunFailure(RunFailure.BAD_INPUT, "shopper_draws.csv has no draw column");
      }
      w.write(header);
      w.newLine();
      String line;
      while ((line = in.readLine()) != null) {
        String[] f = line.split(",", -1);
        if (Long.parseLong(f[drawCol].trim()) <= r) {
          w.write(line);
          w.newLine();
        }
      }
    }
  }

  /** Writes the sample through the generate command, so demo and generate cannot disagree. */
  private void generateSample() {
    say().println("demo: no sample at " + SAMPLE_DIR + "; generating it (seed " + common.seed()
        + ")");
    say().flush();
    CommandLine generate = new CommandLine(new GenerateCommand())
        .setOut(out())
        .setErr(err());
    int code = generate.execute("--output", SAMPLE_DIR, "--seed", Long.toString(common.seed()));
    if (code != 0 || !Files.isDirectory(Path.of(SAMPLE_DIR))) {
      throw new RunFailure(RunFailure.OTHER,
          "the demo sample is missing at " + SAMPLE_DIR + " and generating it failed (generate"
              + " exit code " + code + "); run 'aislecast generate --output " + SAMPLE_DIR
              + "' to see why, or pass --input DIR");
    }
  }
}
