package aislecast.core.mcmc;

import java.io.Serializable;

/**
 * Everything one chain keeps for one store between sweeps: the locals and the local sampler's
 * tuning. Mutable and owned by one task at a time; Spark copies it when it serialises.
 */
public final class StoreChainState implements Serializable {
  private static final long serialVersionUID = 1L;

  /** [psi, kappa, delta]: the HMC position. */
  public double[] position;
  public double logDensity;
  public double[] gradient;
  public DualAveraging stepAdapt;
  public double stepSize;
  public double[] invMass;
  public Welford window;
  /** Local transitions done so far (warmup and sampling). */
  public int iteration;
  public long accepted;
  public long divergent;
  public double acceptSum;
  public long transitions;
  /** Momentum kept between transitions when the local kernel refreshes it partially, else null. */
  public double[] momentum;
  /**
   * The ridge shift this chain's locals were last evaluated under and the natural position it
   * maps them to (null when none was proposed at the end of the last sweep). Applying an accepted
   * shift next sweep reuses the position instead of repeating the same re-inversion: the same
   * input gives the same numbers, so the draws do not depend on it, and a state without it (an
   * older checkpoint) simply recomputes. Never changed once set, so copies share the arrays.
   */
  public double[] ridgeShift;
  public double[] ridgeNatural;

  public StoreChainState copy() {
    StoreChainState s = new StoreChainState();
    s.position = position.clone();
    s.logDensity = logDensity;
    s.gradient = gradient == null ? null : gradient.clone();
    s.stepAdapt = stepAdapt;
    s.stepSize = stepSize;
    s.invMass = invMass.clone();
    s.window = window.copy();
    s.iteration = iteration;
    s.accepted = accepted;
    s.divergent = divergent;
    s.acceptSum = acceptSum;
    s.transitions = transitions;
    s.momentum = momentum == null ? null : momentum.clone();
    s.ridgeShift = ridgeShift;
    s.ridgeNatural = ridgeNatural;
    return s;
  }
}
