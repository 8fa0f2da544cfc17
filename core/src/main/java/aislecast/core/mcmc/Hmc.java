package aislecast.core.mcmc;

import org.apache.commons.math3.random.RandomGenerator;

/**
 * Hamiltonian Monte Carlo with a diagonal mass matrix and a fixed number of leapfrog steps
 * (Neal 2011, "MCMC using Hamiltonian dynamics", Handbook of MCMC, ch. 5).
 *
 * <p>A pure kernel: {@link #step} takes a state (position with its log density and gradient, so
 * nothing is recomputed) and tuning values, and returns the next state and what happened. A
 * non-finite energy at the end of a trajectory is a rejection (reported as divergent), never an
 * exception.
 */
public final class Hmc {
  private Hmc() {}

  /** Position with its log density and gradient. */
  public record State(double[] position, double logDensity, double[] gradient) {
    public static State init(Target target, double[] position) {
      double[] g = new double[target.dimension()];
      double lp = target.logDensityAndGradient(position, g);
      return new State(position.clone(), lp, g);
    }
  }

  /**
   * @param acceptProb Metropolis acceptance probability of the proposal (0 when divergent)
   * @param accepted whether the proposal was taken
   * @param divergent whether the trajectory's energy error was non-finite or above 1000
   */
  public record Info(double acceptProb, boolean accepted, boolean divergent, int steps) {}

  /** Result of one transition. */
  public record Step(State state, Info info) {}

  /**
   * One HMC transition.
   *
   * @param stepSize leapfrog step size
   * @param invMass diagonal of the inverse mass matrix, not modified
   * @param steps number of leapfrog steps
   */
  public static Step step(RandomGenerator rng, State current, Target target, double stepSize,
      double[] invMass, int steps) {
    int n = target.dimension();
    double[] q = current.position().clone();
    double[] g = current.gradient().clone();
    double[] p = new double[n];
    double kinetic0 = 0;
    for (int i = 0; i < n; i++) {
      double sd = 1.0 / Math.sqrt(invMass[i]);
      p[i] = rng.nextGaussian() * sd;
      kinetic0 += 0.5 * p[i] * p[i] * invMass[i];
    }
    double h0 = -current.logDensity() + kinetic0;
    double lp = current.logDensity();
    boolean bad = false;
    for (int s = 0; s < steps && !bad; s++) {
      for (int i = 0; i < n; i++) {
        p[i] += 0.5 * stepSize * g[i];
        q[i] += stepSize * invMass[i] * p[i];
      }
      lp = target.logDensityAndGradient(q, g);
      if (!Double.isFinite(lp)) {
        bad = true;
        break;
      }
      for (int i = 0; i < n; i++) {
        p[i] += 0.5 * stepSize * g[i];
      }
    }
    double kinetic1 = 0;
    for (int i = 0; i < n; i++) {
      kinetic1 += 0.5 * p[i] * p[i] * invMass[i];
    }
    double dh = (-lp + kinetic1) - h0;
    boolean divergent = bad || !Double.isFinite(dh) || dh > 1000;
    double acceptProb = divergent ? 0.0 : Math.min(1.0, Math.exp(-dh));
    boolean accepted = !divergent && rng.nextDouble() < acceptProb;
    State next = accepted ? new State(q, lp, g) : current;
    return new Step(next, new Info(acceptProb, accepted, divergent, steps));
  }
}
