package aislecast.core.mcmc;

/** A differentiable log density over a flat position vector. */
public interface Target {
  int dimension();

  /**
   * Log density (up to a constant) and its gradient.
   *
   * @param position not modified
   * @param gradOut modified, length {@link #dimension()}
   * @return the log density; NaN or -infinity where it is not defined
   */
  double logDensityAndGradient(double[] position, double[] gradOut);
}
