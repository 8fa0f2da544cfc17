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
    return s;
  }
}
