package aislecast.jobs.config;

import com.fasterxml.jackson.annotation.JsonCreator;
import com.fasterxml.jackson.annotation.JsonProperty;

/**
 * Settings of the estimation sampler and of its convergence checks ({@code sampler:} section).
 * Every key is optional; an absent key takes the default named here.
 *
 * @param chains chains that share every sweep (default 4, at least 2 so R-hat exists)
 * @param warmup sweeps discarded while the local samplers adapt (300)
 * @param sampling sweeps after warmup (500, at least 4); every {@code thin}-th is kept
 * @param localSteps local transitions per store and chain in one sweep (1)
 * @param leapfrogSteps leapfrog steps per local HMC transition (8)
 * @param targetAccept local HMC acceptance the step size adapts to (0.8)
 * @param shopperDraws R, quasi-random shopper draws per store when the input has no
 *     shopper_draws table (200)
 * @param checkpointEvery sweeps between checkpoints of the sampler state (25); a checkpoint cuts
 *     Spark lineage and is what {@code --resume} continues from
 * @param rhatMax largest rank-normalised R-hat accepted for any global parameter (1.01)
 * @param essMin smallest bulk ESS accepted for any global parameter (400)
 * @param progressEvery sweeps between progress lines and R-hat updates (25)
 * @param partitions store partitions of the state RDD; 0 picks twice Spark's default parallelism
 *     (capped at the number of stores). Draws do not depend on it.
 * @param sumGroup stores whose statistics are added in a fixed order before the driver adds the
 *     groups, so that draws are identical however Spark splits or retries the work (64). Larger
 *     groups send more per-store statistics to the driver; with at most this many stores the
 *     draws equal those of the in-process runner bit for bit.
 * @param ridgeMove propose the joint price-sensitivity shift each sweep (true)
 * @param fixLambdaZero fit without the price equation's endogeneity, lambda held at 0 (false;
 *     for comparisons only)
 * @param momentumPersistence after warmup, the weight with which each store's local HMC keeps
 *     its momentum from one sweep to the next (see {@code SamplerSettings}); 0 draws a fresh one
 *     every transition
 * @param thin keep every thin-th sampling sweep as a draw (1: all); {@code sampling} must be a
 *     multiple of it. For long runs, where every kept draw of every store is held in memory,
 *     checkpointed and written out
 * @param stopWhenConverged treat {@code sampling} as a ceiling: at each progress line of the
 *     sampling phase, stop once every global parameter is within {@code rhatMax} and {@code
 *     essMin}, and publish the run as if {@code sampling} had been the sweeps done (false). It
 *     decides only when the run ends, never what a sweep draws, so a stopped run may be resumed
 *     with it switched on or off
 */
public record SamplerConfig(
    @JsonProperty("chains") int chains,
    @JsonProperty("warmup") int warmup,
    @JsonProperty("sampling") int sampling,
    @JsonProperty("local_steps") int localSteps,
    @JsonProperty("leapfrog_steps") int leapfrogSteps,
    @JsonProperty("target_accept") double targetAccept,
    @JsonProperty("shopper_draws") int shopperDraws,
    @JsonProperty("checkpoint_every") int checkpointEvery,
    @JsonProperty("rhat_max") double rhatMax,
    @JsonProperty("ess_min") double essMin,
    @JsonProperty("progress_every") int progressEvery,
    @JsonProperty("partitions") int partitions,
    @JsonProperty("sum_group") int sumGroup,
    @JsonProperty("ridge_move") boolean ridgeMove,
    @JsonProperty("fix_lambda_zero") boolean fixLambdaZero,
    @JsonProperty("momentum_persistence") double momentumPersistence,
    @JsonProperty("thin") int thin,
    @JsonProperty("stop_when_converged") boolean stopWhenConverged) {

  public static final int DEFAULT_CHAINS = 4;
  public static final int DEFAULT_WARMUP = 300;
  public static final int DEFAULT_SAMPLING = 500;
  public static final int DEFAULT_LOCAL_STEPS = 1;
  public static final int DEFAULT_LEAPFROG_STEPS = 8;
  public static final double DEFAULT_TARGET_ACCEPT = 0.8;
  public static final int DEFAULT_SHOPPER_DRAWS = 200;
  public static final int DEFAULT_CHECKPOINT_EVERY = 25;
  public static final double DEFAULT_RHAT_MAX = 1.01;
  public static final double DEFAULT_ESS_MIN = 400;
  public static final int DEFAULT_PROGRESS_EVERY = 25;
  public static final int DEFAULT_PARTITIONS = 0;
  public static final int DEFAULT_SUM_GROUP = 64;
  public static final double DEFAULT_MOMENTUM_PERSISTENCE =
      aislecast.core.estimate.SamplerSettings.DEFAULT_MOMENTUM_PERSISTENCE;

  public SamplerConfig {
    require(chains >= 2, "sampler.chains", chains + " (need at least 2 for R-hat)");
    require(warmup >= 0, "sampler.warmup", warmup + " (need >= 0)");
    require(sampling >= 4, "sampler.sampling", sampling + " (need >= 4)");
    require(localSteps >= 1, "sampler.local_steps", localSteps + " (need >= 1)");
    require(leapfrogSteps >= 1, "sampler.leapfrog_steps", leapfrogSteps + " (need >= 1)");
    require(targetAccept > 0 && targetAccept < 1, "sampler.target_accept",
        targetAccept + " (need a value in (0, 1))");
    require(shopperDraws >= 1, "sampler.shopper_draws", shopperDraws + " (need >= 1)");
    require(checkpointEvery >= 1, "sampler.checkpoint_every", checkpointEvery + " (need >= 1)");
    require(rhatMax >= 1.0, "sampler.rhat_max", rhatMax + " (need >= 1)");
    require(essMin >= 0, "sampler.ess_min", essMin + " (need >= 0)");
    require(progressEvery >= 1, "sampler.progress_every", progressEvery + " (need >= 1)");
    require(partitions >= 0, "sampler.partitions", partitions + " (need >= 0; 0 = automatic)");
    require(sumGroup >= 1, "sampler.sum_group", sumGroup + " (need >= 1)");
    require(momentumPersistence >= 0 && momentumPersistence < 1, "sampler.momentum_persistence",
        momentumPersistence + " (need a value in [0, 1))");
    require(thin >= 1, "sampler.thin", thin + " (need >= 1)");
    require(sampling % thin == 0, "sampler.sampling", sampling + " (need a multiple of"
        + " sampler.thin = " + thin + ")");
  }

  /** Settings that keep every sampling sweep. */
  public SamplerConfig(int chains, int warmup, int sampling, int localSteps, int leapfrogSteps,
      double targetAccept, int shopperDraws, int checkpointEvery, double rhatMax, double essMin,
      int progressEvery, int partitions, int sumGroup, boolean ridgeMove, boolean fixLambdaZero,
      double momentumPersistence) {
    this(chains, warmup, sampling, localSteps, leapfrogSteps, targetAccept, shopperDraws,
        checkpointEvery, rhatMax, essMin, progressEvery, partitions, sumGroup, ridgeMove,
        fixLambdaZero, momentumPersistence, 1, false);
  }

  /** YAML entry point: absent keys take their defaults (a primitive cannot say "absent"). */
  @JsonCreator
  static SamplerConfig fromYaml(
      @JsonProperty("chains") Integer chains,
      @JsonProperty("warmup") Integer warmup,
      @JsonProperty("sampling") Integer sampling,
      @JsonProperty("local_steps") Integer localSteps,
      @JsonProperty("leapfrog_steps") Integer leapfrogSteps,
      @JsonProperty("target_accept") Double targetAccept,
      @JsonProperty("shopper_draws") Integer shopperDraws,
      @JsonProperty("checkpoint_every") Integer checkpointEvery,
      @JsonProperty("rhat_max") Double rhatMax,
      @JsonProperty("ess_min") Double essMin,
      @JsonProperty("progress_every") Integer progressEvery,
      @JsonProperty("partitions") Integer partitions,
      @JsonProperty("sum_group") Integer sumGroup,
      @JsonProperty("ridge_move") Boolean ridgeMove,
      @JsonProperty("fix_lambda_zero") Boolean fixLambdaZero,
      @JsonProperty("momentum_persistence") Double momentumPersistence,
      @JsonProperty("thin") Integer thin,
      @JsonProperty("stop_when_converged") Boolean stopWhenConverged) {
    return new SamplerConfig(
        or(chains, DEFAULT_CHAINS),
        or(warmup, DEFAULT_WARMUP),
        or(sampling, DEFAULT_SAMPLING),
        or(localSteps, DEFAULT_LOCAL_STEPS),
        or(leapfrogSteps, DEFAULT_LEAPFROG_STEPS),
        or(targetAccept, DEFAULT_TARGET_ACCEPT),
        or(shopperDraws, DEFAULT_SHOPPER_DRAWS),
        or(checkpointEvery, DEFAULT_CHECKPOINT_EVERY),
        or(rhatMax, DEFAULT_RHAT_MAX),
        or(essMin, DEFAULT_ESS_MIN),
        or(progressEvery, DEFAULT_PROGRESS_EVERY),
        or(partitions, DEFAULT_PARTITIONS),
        or(sumGroup, DEFAULT_SUM_GROUP),
        or(ridgeMove, true),
        or(fixLambdaZero, false),
        or(momentumPersistence, DEFAULT_MOMENTUM_PERSISTENCE),
        or(thin, 1),
        or(stopWhenConverged, false));
  }

  public static SamplerConfig defaults() {
    return fromYaml(null, null, null, null, null, null, null, null, null, null, null, null, null,
        null, null, null, null, null);
  }

  /** Copy with other sweep counts (tests, benchmarks and the demo's reduced run). */
  public SamplerConfig withSweeps(int newWarmup, int newSampling) {
    return new SamplerConfig(chains, newWarmup, newSampling, localSteps, leapfrogSteps,
        targetAccept, shopperDraws, checkpointEvery, rhatMax, essMin, progressEvery, partitions,
        sumGroup, ridgeMove, fixLambdaZero, momentumPersistence, thin, stopWhenConverged);
  }

  /** Copy with other convergence limits. */
  public SamplerConfig withLimits(double newRhatMax, double newEssMin) {
    return new SamplerConfig(chains, warmup, sampling, localSteps, leapfrogSteps, targetAccept,
        shopperDraws, checkpointEvery, newRhatMax, newEssMin, progressEvery, partitions, sumGroup,
        ridgeMove, fixLambdaZero, momentumPersistence, thin, stopWhenConverged);
  }

  /** Copy with other Spark layout settings. */
  public SamplerConfig withLayout(int newPartitions, int newSumGroup, int newCheckpointEvery) {
    return new SamplerConfig(chains, warmup, sampling, localSteps, leapfrogSteps, targetAccept,
        shopperDraws, newCheckpointEvery, rhatMax, essMin, progressEvery, newPartitions,
        newSumGroup, ridgeMove, fixLambdaZero, momentumPersistence, thin, stopWhenConverged);
  }

  public int totalSweeps() {
    return warmup + sampling;
  }

  private static int or(Integer v, int d) {
    return v == null ? d : v;
  }

  private static double or(Double v, double d) {
    return v == null ? d : v;
  }

  private static boolean or(Boolean v, boolean d) {
    return v == null ? d : v;
  }

  private static void require(boolean ok, String key, String detail) {
    if (!ok) {
      throw new ConfigException(key + ": invalid value " + detail);
    }
  }
}
