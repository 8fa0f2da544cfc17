package aislecast.jobs.estimate;

import aislecast.core.diag.ParameterSummary;
import aislecast.core.estimate.SamplerSettings;
import aislecast.core.globals.InvGamma;
import aislecast.core.globals.Priors;
import aislecast.jobs.config.PriorsConfig;
import aislecast.jobs.config.RunConfig;
import aislecast.jobs.io.RunIdentity;
import aislecast.jobs.io.RunJson;
import aislecast.jobs.validate.ValidatedInput;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.apache.spark.sql.SparkSession;

/**
 * {@code run.json} of an estimation run: the shared head ({@link RunJson#header}: status,
 * configuration, seed, versions, input fingerprints), then the problem's sizes and fingerprint,
 * timings per phase, sweeps, sampler statistics (local HMC acceptance, ridge-move acceptance,
 * divergences) and the convergence verdict. Keys are lower_snake_case.
 */
final class Manifest {
  /** Status of a run stopped for too many rejected input rows (its rejects are published). */
  static final String BAD_INPUT = "bad_input";

  private Manifest() {}

  static void write(String runDir, SparkSession spark, EstimateJob.Options o, RunConfig config,
      RunIdentity id, SamplerSettings set, EstimationProblem problem, ChainRecord rec,
      ParameterSummary[] summaries, String[] names, List<String> failures,
      EstimateJob.Status status, Map<String, Double> timings, ValidatedInput validated,
      List<String> notes, Priors priors, PriorsConfig priorsConfig) {
    Map<String, Object> m = header(spark, o, id, status.label);
    Map<String, Object> in = new LinkedHashMap<>();
    in.put("input_rows", validated.summary().inputRows());
    in.put("rejected_rows", validated.summary().rejectedRows());
    in.put("stores", problem.stores().size());
    in.put("products", problem.catalog().size());
    in.put("rows", problem.rows());
    in.put("attributes", List.of(problem.catalog().attributeNames()));
    in.put("demographics", problem.demographicNames());
    in.put("demand_shifters", problem.demandShifters());
    in.put("cost_shifters_log", problem.costShifters());
    in.put("shopper_draws", problem.drawsSource());
    in.put("data_fingerprint_sha256", problem.fingerprint());
    in.put("notes", problem.notes());
    m.put("data", in);

    Map<String, Object> s = new LinkedHashMap<>();
    s.put("chains", set.chains());
    s.put("warmup_sweeps", set.warmupSweeps());
    s.put("sampling_sweeps", set.samplingSweeps());
    s.put("thin", set.thin());
    // sampling_sweeps is what was done; with stop_when_converged the configured count is a ceiling
    s.put("stop_when_converged", config.sampler().stopWhenConverged());
    s.put("sampling_sweeps_max", config.sampler().sampling());
    s.put("kept_draws", rec.keptDraws);
    s.put("sweeps_done", rec.nextSweep());
    s.put("local_acceptance_warmup", set.warmupSweeps() == 0 ? null
        : rec.acceptWarmup / set.warmupSweeps());
    s.put("local_acceptance_sampling", rec.acceptSampling / set.samplingSweeps());
    s.put("ridge_acceptance", finite(rec.state.ridgeAcceptance()));
    s.put("divergences_warmup", rec.divergentWarmup);
    s.put("divergences_sampling", rec.divergentSampling);
    s.put("warm_start", o.warmStart());
    s.put("extends", rec.extendsRun);
    m.put("sampler", s);

    // the variance priors as used (price_noise_scale: auto resolves here)
    Map<String, Object> pr = new LinkedHashMap<>();
    pr.put("tau2", invGamma(priors.tau2()));
    pr.put("sigma_xi2", invGamma(priors.sigmaXi2()));
    pr.put("sigma_p2", invGamma(priors.sigmaP2()));
    pr.put("sigma_p2_scale_from", priorsConfig.priceNoiseScale() == null ? "variance_scale"
        : priorsConfig.priceNoiseAuto() ? "auto: first-pass regression of log price on products"
            + " and cost shifters" : "price_noise_scale");
    m.put("variance_priors", pr);

    Map<String, Object> conv = new LinkedHashMap<>();
    double worst = Double.NaN;
    String worstName = null;
    double minEss = Double.NaN;
    String minName = null;
    for (int p = 0; p < names.length; p++) {
      if (Double.isFinite(summaries[p].rhat()) && !(summaries[p].rhat() <= worst)) {
        worst = summaries[p].rhat();
        worstName = names[p];
      }
      if (Double.isFinite(summaries[p].essBulk()) && !(summaries[p].essBulk() >= minEss)) {
        minEss = summaries[p].essBulk();
        minName = names[p];
      }
    }
    conv.put("rhat_max_limit", config.sampler().rhatMax());
    conv.put("ess_min_limit", config.sampler().essMin());
    conv.put("worst_rhat", finite(worst));
    conv.put("worst_rhat_parameter", worstName);
    conv.put("min_ess_bulk", finite(minEss));
    conv.put("min_ess_bulk_parameter", minName);
    conv.put("global_parameters", names.length);
    conv.put("failures", failures);
    int need = EstimateJob.samplingSweepsNeeded(summaries, config.sampler().essMin(),
        rec.keptDraws * set.thin(), set.thin());
    conv.put("sampling_sweeps_needed_estimate", need > 0 ? need : null);
    m.put("convergence", conv);
    // things the user should know about the result (e.g. a variance prior pulling, PriorPull)
    m.put("notes", notes);

    Map<String, Object> t = new LinkedHashMap<>();
    timings.forEach((k, v) -> t.put(k + "_seconds", v));
    t.put("sweep_seconds_total", rec.sweepSeconds);
    t.put("sweep_model_task_seconds", rec.modelSeconds);
    t.put("sweep_stage_seconds", rec.aggregateSeconds);
    t.put("sweep_driver_seconds", rec.driverSeconds);
    m.put("timings", t);
    RunJson.write(spark, runDir, m);
  }

  /** The manifest of a run stopped for too many rejected input rows. */
  static void writeRejected(String runDir, SparkSession spark, EstimateJob.Options o,
      RunIdentity id, ValidatedInput validated) {
    Map<String, Object> m = header(spark, o, id, BAD_INPUT);
    Map<String, Object> in = new LinkedHashMap<>();
    in.put("input_rows", validated.summary().inputRows());
    in.put("rejected_rows", validated.summary().rejectedRows());
    in.put("reject_share", validated.summary().rejectShare());
    m.put("data", in);
    RunJson.write(spark, runDir, m);
  }

  /** The shared head ({@link RunJson#header}) plus estimate's own run facts. */
  private static Map<String, Object> header(SparkSession spark, EstimateJob.Options o,
      RunIdentity id, String status) {
    Map<String, Object> m = RunJson.header(spark, o.runId(), status, id);
    m.put("input", o.input());
    m.put("configuration_file", o.confSource());
    m.put("resumed", o.resume());
    return m;
  }

  private static Map<String, Object> invGamma(InvGamma g) {
    Map<String, Object> out = new LinkedHashMap<>();
    out.put("shape", g.shape());
    out.put("scale", g.scale());
    return out;
  }

  private static Object finite(double v) {
    return Double.isFinite(v) ? v : null;
  }

  static List<String> copy(List<String> l) {
    return new ArrayList<>(l);
  }
}
