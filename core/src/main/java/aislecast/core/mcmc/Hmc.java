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
    double[] p = new double[n];
    for (int i = 0; i < n; i++) {
      double sd = 1.0 / Math.sqrt(invMass[i]);
      p[i] = rng.nextGaussian() * sd;
    }
    return trajectory(rng, current, target, stepSize, invMass, steps, p, null);
  }

  /**
   * One generalised HMC transition with partial momentum refreshment (Horowitz 1991, "A
   * generalized guided Monte Carlo algorithm", Phys. Lett. B 268; Neal 2011, section 5.5.3): the
   * momentum {@code p} is kept between transitions, refreshed as {@code p <- a p + sqrt(1 - a^2)
   * N(0, M)}, then the trajectory runs; on acceptance {@code p} becomes the trajectory's final
   * momentum, on rejection it is negated. Each part leaves {@code pi(q) N(p; 0, M)} invariant, so
   * the position keeps its target whatever else updates it between transitions. {@code a = 0} is
   * an ordinary HMC transition with a full refresh.
   *
   * @param momentum the kept momentum, updated in place
   * @param persistence {@code a} in [0, 1)
   */
  public static Step stepPersistent(RandomGenerator rng, State current, Target target,
      double stepSize, double[] invMass, int steps, double[] momentum, double persistence) {
    int n = target.dimension();
    double fresh = Math.sqrt(1.0 - persistence * persistence);
    double[] p = new double[n];
    for (int i = 0; i < n; i++) {
      double sd = 1.0 / Math.sqrt(invMass[i]);
      p[i] = persistence * momentum[i] + fresh * rng.nextGaussian() * sd;
    }
    return trajectory(rng, current, target, stepSize, invMass, steps, p, momentum);
  }

  /**
   * Leapfrog from {@code current} with starting momentum {@code p} (overwritten), then the
   * Metropolis decision; when {@code keep} is given it receives the final momentum on acceptance
   * and the negated starting momentum on rejection.
   */
  private static Step trajectory(RandomGenerator rng, State current, Target target,
      double stepSize, double[] invMass, int steps, double[] p, double[] keep) {
    int n = target.dimension();
    double[] q = current.position().clone();
    double[] g = current.gradient().clone();
    double[] p0 = keep == null ? null : p.clone();
    double kinetic0 = 0;
    for (int i = 0; i < n; i++) {
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
    if (keep != null) {
      for (int i = 0; i < n; i++) {
        keep[i] = accepted ? p[i] : -p0[i];
      }
    }
    State next = accepted ? new State(q, lp, g) : current;
    return new Step(next, new Info(acceptProb, accepted, divergent, steps));
  }
}
