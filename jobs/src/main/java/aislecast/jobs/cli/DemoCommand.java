package aislecast.jobs.cli;

import aislecast.jobs.config.RunConfig;
import aislecast.jobs.config.RunConfigLoader;
import aislecast.jobs.config.RunFailure;
import aislecast.jobs.report.ReportJob;
import aislecast.jobs.spark.SparkSessions;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import picocli.CommandLine;
import picocli.CommandLine.Command;

/**
 * {@code aislecast demo}: the pipeline on the bundled chilled-drinks sample with the embedded
 * Spark. Today it chains generate (only if the sample is missing) and validate.
 */
@Command(
    name = "demo",
    mixinStandardHelpOptions = true,
    description = {
      "Run on the bundled sample (" + DemoCommand.SAMPLE_DIR + ", generated first if missing)"
          + " with the embedded local[*] Spark and print where every output is.",
      "Steps available in this build: generate (if needed), validate, report (when the run has"
          + " posterior or scenario tables).",
      "--input replaces the sample; --conf defaults to " + DemoCommand.DEMO_CONF
          + " when that file exists."
    },
    exitCodeListHeading = "Exit codes:%n",
    exitCodeList = {"0:ok", "1:unexpected failure", "2:bad input or configuration"})
public final class DemoCommand extends JobCommand {

  static final String SAMPLE_DIR = "data-samples/chilled-drinks";
  static final String DEMO_CONF = "conf/demo.yaml";

  @Override
  protected int execute() {
    String input = common.input();
    if (input == null) {
      input = SAMPLE_DIR;
      if (!Files.isDirectory(Path.of(SAMPLE_DIR))) {
        generateSample();
      }
    }
    Path conf = common.conf();
    if (conf == null && Files.isRegularFile(Path.of(DEMO_CONF))) {
      conf = Path.of(DEMO_CONF);
    }
    RunConfig config = RunConfigLoader.load(conf);
    out().println("demo: input " + input + ", configuration "
        + (conf == null ? "built-in defaults" : conf.toString()) + ", run " + common.runId());
    String runDir = Path.of(common.output(), common.runId()).toAbsolutePath().normalize()
        .toString();
    try (SparkSessions.Handle spark = SparkSessions.open(common.master(), "aislecast demo")) {
      ValidateCommand.validateAndPublish(spark.spark(), config, input, common.output(),
          common.runId(), out()).close();
      writeReport(spark, runDir);
    }
    out().println("demo: done; the run folder is " + runDir);
    return ExitCodeMapper.OK;
  }

  /**
   * The last step: the HTML report of the run, when the run holds tables to report on. Until
   * estimate and scenarios are chained into demo, the run has only validation outputs and the
   * step says so instead of writing a page of notes.
   */
  private void writeReport(SparkSessions.Handle spark, String runDir) {
    if (!ReportJob.hasTables(spark.spark(), runDir)) {
      out().println("demo: report skipped (the run has no posterior or scenario tables yet);"
          + " after 'aislecast estimate' or 'aislecast scenarios' run 'aislecast report --run"
          + " RUNDIR'");
      return;
    }
    ReportJob.Result r = ReportJob.run(spark.spark(),
        new ReportJob.Options(runDir, List.of(), null, null), out());
    out().println("demo: report " + r.path());
  }

  /** Writes the sample through the generate command, so demo and generate cannot disagree. */
  private void generateSample() {
    out().println("demo: no sample at " + SAMPLE_DIR + "; generating it (seed " + common.seed()
        + ")");
    out().flush();
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
