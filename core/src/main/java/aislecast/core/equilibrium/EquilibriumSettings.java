package aislecast.core.equilibrium;

/**
 * Convergence settings of {@link EquilibriumSolver}.
 *
 * @param tolerance converged when {@code max_j |FOC_j| / s_j} over re-set products is at most
 *     this (per unit of currency: the residual divided by the share is about {@code alpha} times
 *     the markup error); default 1e-10
 * @param maxIterations markup updates before giving up; default 2000
 */
public record EquilibriumSettings(double tolerance, int maxIterations) {
  public EquilibriumSettings {
    if (!(tolerance > 0) || !Double.isFinite(tolerance)) {
      throw new IllegalArgumentException("tolerance must be finite and > 0, got " + tolerance);
    }
    if (maxIterations < 1) {
      throw new IllegalArgumentException("maxIterations must be >= 1, got " + maxIterations);
    }
  }

  public static EquilibriumSettings defaults() {
    return new EquilibriumSettings(1e-10, 2000);
  }
}
