package aislecast.jobs.cli;

import aislecast.jobs.config.RunConfig;
import aislecast.jobs.config.RunConfigLoader;
import aislecast.jobs.io.RunDirectory;
import aislecast.jobs.spark.SparkSessions;
import aislecast.jobs.validate.InputValidator;
import aislecast.jobs.validate.ValidatedInput;
import java.io.PrintWriter;
import org.apache.spark.sql.SparkSession;
import picocli.CommandLine.Command;

/** {@code aislecast validate}: check the input tables and write the rejects table. */
@Command(
    name = "validate",
    mixinStandardHelpOptions = true,
    description = {
      "Check the input tables row by row. Every rejected row goes to"
          + " <output>/<run id>/validation/rejects (Parquet) with a reason code and message;"
          + " counts by table and reason go to validation/summary.",
      "Fails (exit 2) on a wrong schema, or when the rejected share of rows exceeds"
          + " validation.max_reject_share (the rejects are still written)."
    },
    exitCodeListHeading = "Exit codes:%n",
    exitCodeList = {
      "0:input accepted",
      "1:unexpected failure",
      "2:bad input or configuration (missing table or column, too many rejects, bad option)"
    })
public final class ValidateCommand extends JobCommand {

  @Override
  protected int execute() {
    if (common.input() == null) {
      throw usageError("missing required option --input=DIR");
    }
    RunConfig config = RunConfigLoader.load(common.conf());
    try (SparkSessions.Handle spark = SparkSessions.open(common.master(), "aislecast validate")) {
      validateAndPublish(spark.spark(), config, common.input(), common.output(), common.runId(),
          out()).close();
    }
    return ExitCodeMapper.OK;
  }

  /**
   * Validates {@code input} into a new run folder {@code <outputRoot>/<runId>} (published whole,
   * also when too many rows were rejected), prints the summary, then enforces the reject share.
   *
   * @return the accepted input; the caller closes it
   */
  static ValidatedInput validateAndPublish(SparkSession spark, RunConfig config, String input,
      String outputRoot, String runId, PrintWriter out) {
    RunDirectory run = RunDirectory.create(spark, outputRoot, runId);
    ValidatedInput validated;
    try {
      validated = InputValidator.run(spark, config, input, run.staging());
      run.commit();
    } finally {
      run.abort();
    }
    double max = config.validation().maxRejectShare();
    out.println("Validated " + input + " (run " + runId + "):");
    out.print(validated.summary().format(max));
    for (String note : validated.notes()) {
      out.println("  note: " + note);
    }
    out.println("Outputs:");
    out.println("  rejects  " + run.target() + "/" + InputValidator.REJECTS_DIR);
    out.println("  summary  " + run.target() + "/" + InputValidator.SUMMARY_DIR
        + " (text: " + InputValidator.SUMMARY_TEXT + ")");
    out.flush();
    try {
      validated.requireRejectShareAtMost(max, run.target() + "/" + InputValidator.REJECTS_DIR);
    } catch (RuntimeException e) {
      validated.close();
      throw e;
    }
    return validated;
  }
}
