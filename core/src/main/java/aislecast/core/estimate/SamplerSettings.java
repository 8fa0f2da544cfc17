package aislecast.core.estimate;

import java.io.Serializable;

/**
 * Settings of one estimation run's sampler, validated together, with documented defaults.
 *
 * @param chains number of chains sharing each sweep (default 4)
 * @param warmupSweeps sweeps whose draws are discarded while the local samplers adapt (300)
 * @param samplingSweeps sweeps after warmup (500); every {@code thin}-th is kept as a posterior
 *     draw
 * @param localSteps local transitions per store per sweep (default 1; the globals are fixed
 *     within a sweep, so several transitions stay exact)
 * @param leapfrogSteps leapfrog steps per local HMC transition (8)
 * @param targetAccept HMC acceptance the step size adapts to (0.8)
 * @param seed run seed: every random stream is keyed by (seed, chain, store, sweep)
 * @param fixLambdaZero fit without price endogeneity (lambda held at 0) for comparisons
 * @param ridgeMove whether each sweep proposes the joint price-sensitivity shift of
 *     {@link RidgeMove} (default true; off only to measure what it buys)
 * @param momentumPersistence after warmup, each store keeps its local HMC momentum from one
 *     sweep to the next and refreshes it partially with this weight ({@link
 *     aislecast.core.mcmc.Hmc#stepPersistent}); 0 draws a fresh momentum every transition
 * @param thin keep every {@code thin}-th sampling sweep (1: all); {@code samplingSweeps} must be
 *     a multiple of it. Thinning only saves storage and memory in long runs: the chains are the
 *     same, and the kept draws carry somewhat less information than all of them would
 */
public record SamplerSettings(
    int chains,
    int warmupSweeps,
    int samplingSweeps,
    int localSteps,
    int leapfrogSteps,
    double targetAccept,
    long seed,
    boolean fixLambdaZero,
    boolean ridgeMove,
    double momentumPersistence,
    int thin)
    implements Serializable {

  /** Settings that keep every sampling sweep. */
  public SamplerSettings(int chains, int warmupSweeps, int samplingSweeps, int localSteps,
      int leapfrogSteps, double targetAccept, long seed, boolean fixLambdaZero, boolean ridgeMove,
      double momentumPersistence) {
    this(chains, warmupSweeps, samplingSweeps, localSteps, leapfrogSteps, targetAccept, seed,
        fixLambdaZero, ridgeMove, momentumPersistence, 1);
  }

  /** Settings with a fresh momentum every local transition (probes and older tests). */
  public SamplerSettings(int chains, int warmupSweeps, int samplingSweeps, int localSteps,
      int leapfrogSteps, double targetAccept, long seed, boolean fixLambdaZero,
      boolean ridgeMove) {
    this(chains, warmupSweeps, samplingSweeps, localSteps, leapfrogSteps, targetAccept, seed,
        fixLambdaZero, ridgeMove, 0.0);
  }

  public SamplerSettings {
    require(chains >= 1, "chains must be >= 1, got " + chains);
    require(warmupSweeps >= 0, "warmup sweeps must be >= 0");
    require(samplingSweeps >= 4, "sampling sweeps must be >= 4");
    require(localSteps >= 1, "local steps must be >= 1");
    require(leapfrogSteps >= 1, "leapfrog steps must be >= 1");
    require(targetAccept > 0 && targetAccept < 1, "target acceptance must be in (0, 1)");
    require(momentumPersistence >= 0 && momentumPersistence < 1,
        "momentum persistence must be in [0, 1)");
    require(thin >= 1, "thin must be >= 1, got " + thin);
    require(samplingSweeps % thin == 0, "sampling sweeps (" + samplingSweeps
        + ") must be a multiple of thin (" + thin + ")");
  }

  /**
   * Default of {@link #momentumPersistence} (docs/sampler-record.md, "Momentum kept between
   * sweeps").
   */
  public static final double DEFAULT_MOMENTUM_PERSISTENCE = 0.9;

  public static SamplerSettings defaults(long seed) {
    return new SamplerSettings(4, 300, 500, 1, 8, 0.8, seed, false, true,
        DEFAULT_MOMENTUM_PERSISTENCE);
  }

  /** The same settings with another number of sampling sweeps (an extended run). */
  public SamplerSettings withSamplingSweeps(int sampling) {
    return new SamplerSettings(chains, warmupSweeps, sampling, localSteps, leapfrogSteps,
        targetAccept, seed, fixLambdaZero, ridgeMove, momentumPersistence, thin);
  }

  /** Draws kept per chain: {@code samplingSweeps / thin}. */
  public int keptDraws() {
    return samplingSweeps / thin;
  }

  /** Whether the state after {@code sweep} (0-based) is kept: the last of each thin block. */
  public boolean isKept(int sweep) {
    return sweep >= warmupSweeps && (sweep - warmupSweeps + 1) % thin == 0;
  }

  /** Position among the kept draws of a kept {@code sweep}. */
  public int keptIndex(int sweep) {
    return (sweep - warmupSweeps + 1) / thin - 1;
  }

  /**
   * The record's text without {@code thin} when it is 1: the text is part of the key that ties
   * checkpoints to their settings, so runs from before thinning existed still resume and extend.
   */
  @Override
  public String toString() {
    return "SamplerSettings[chains=" + chains + ", warmupSweeps=" + warmupSweeps
        + ", samplingSweeps=" + samplingSweeps + ", localSteps=" + localSteps
        + ", leapfrogSteps=" + leapfrogSteps + ", targetAccept=" + targetAccept + ", seed=" + seed
        + ", fixLambdaZero=" + fixLambdaZero + ", ridgeMove=" + ridgeMove
        + ", momentumPersistence=" + momentumPersistence + (thin == 1 ? "" : ", thin=" + thin)
        + "]";
  }

  public int totalSweeps() {
    return warmupSweeps + samplingSweeps;
  }

  /** Local transitions of warmup (adaptation) per store and chain. */
  public int localWarmup() {
    return warmupSweeps * localSteps;
  }

  private static void require(boolean ok, String message) {
    if (!ok) {
      throw new IllegalArgumentException(message);
    }
  }
}
