package aislecast.jobs.cli;

import aislecast.jobs.config.RunConfig;
import aislecast.jobs.config.RunConfigLoader;
import aislecast.jobs.config.RunFailure;
import aislecast.jobs.io.InputFingerprint;
import aislecast.jobs.io.RunDirectory;
import aislecast.jobs.io.RunIdentity;
import aislecast.jobs.io.RunJson;
import aislecast.jobs.io.RunLog;
import aislecast.jobs.spark.SparkSessions;
import aislecast.jobs.validate.InputValidator;
import aislecast.jobs.validate.ValidatedInput;
import java.io.PrintWriter;
import java.util.LinkedHashMap;
import java.util.Map;
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
      "0:input accepted (or the same run existed already and had accepted it)",
      "1:unexpected failure",
      "2:bad input or configuration (missing table or column, too many rejects, bad option)"
    })
public final class ValidateCommand extends JobCommand {

  /** run.json status of a run with too many rejected rows (its rejects are published). */
  static final String BAD_INPUT = "bad_input";

  @Override
  protected int execute() {
    if (common.input() == null) {
      throw usageError("missing required option --input=DIR");
    }
    RunConfig config = RunConfigLoader.load(common.conf());
    try (SparkSessions.Handle spark = SparkSessions.open(common.master(), "aislecast validate")) {
      ValidatedInput v = validateAndPublish(spark.spark(), config, common.input(),
          common.output(), common.runId(), common.replace(), log("validate"));
      if (v != null) {
        v.close();
      }
    }
    return ExitCodeMapper.OK;
  }

  /**
   * Validates {@code input} into a new run folder {@code <outputRoot>/<runId>} (published whole
   * with its run.json, also when too many rows were rejected), prints the summary, then enforces
   * the reject share. When the run exists with the same input files and configuration nothing is
   * done: the stored status decides (exit 2 again if it had too many rejects).
   *
   * @return the accepted input, which the caller closes; null when an identical run existed
   */
  static ValidatedInput validateAndPublish(SparkSession spark, RunConfig config, String input,
      String outputRoot, String runId, boolean replace, RunLog log) {
    PrintWriter out = log.out();
    long t0 = System.nanoTime();
    RunIdentity id = RunIdentity.of("validate", config)
        .part("inputs", "input files", InputFingerprint.ofInput(spark, config, input));
    RunDirectory run = RunDirectory.create(spark, outputRoot, runId, id, replace);
    run.notes().forEach(n -> log.info("repair", "validate: " + n));
    if (run.identicalExists()) {
      log.info("run_exists", "validate: run " + run.target() + " already exists with the same"
          + " input files and configuration; nothing to do", "run_dir", run.target());
      if (BAD_INPUT.equals(run.existing().path("status").asText())) {
        throw new RunFailure(RunFailure.BAD_INPUT, "that run rejected too many rows; see "
            + run.target() + "/" + InputValidator.REJECTS_DIR);
      }
      return null;
    }
    ValidatedInput validated;
    double max = config.validation().maxRejectShare();
    try {
      validated = InputValidator.run(spark, config, input, run.staging());
      boolean tooMany = validated.summary().rejectShare() > max;
      Map<String, Object> m = RunJson.header(spark, runId, tooMany ? BAD_INPUT : "ok", id);
      m.put("input", input);
      Map<String, Object> rows = new LinkedHashMap<>();
      rows.put("input_rows", validated.summary().inputRows());
      rows.put("rejected_rows", validated.summary().rejectedRows());
      rows.put("reject_share", validated.summary().rejectShare());
      m.put("data", rows);
      m.put("notes", validated.notes());
      m.put("timings_seconds", Map.of("total", (System.nanoTime() - t0) * 1e-9));
      RunJson.write(spark, run.staging(), m);
      run.commit();
    } finally {
      run.abort();
    }
    out.println("Validated " + input + " (run " + runId + "):");
    out.print(validated.summary().format(max));
    for (String note : validated.notes()) {
      out.println("  note: " + note);
    }
    log.info("published", "Outputs:", "run_dir", run.target(), "replaced", replace);
    out.println("  rejects  " + run.target() + "/" + InputValidator.REJECTS_DIR);
    out.println("  summary  " + run.target() + "/" + InputValidator.SUMMARY_DIR
        + " (text: " + InputValidator.SUMMARY_TEXT + ")");
    out.println("  run.json " + run.target() + "/" + RunJson.FILE);
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
