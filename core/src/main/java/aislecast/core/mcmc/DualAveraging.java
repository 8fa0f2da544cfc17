package aislecast.core.mcmc;

import java.io.Serializable;

/**
 * Step-size adaptation by dual averaging (Hoffman and Gelman 2014, "The No-U-Turn Sampler",
 * JMLR 15, section 3.2.1), with their default constants gamma = 0.05, t0 = 10, kappa = 0.75.
 * Pure: {@link #update} returns a new state.
 *
 * @param mu shrinkage point, log(10 * initial step size)
 * @param logStep current log step size
 * @param logStepBar averaged log step size (the value used after warmup)
 * @param hBar running average of (target - acceptance)
 * @param count number of updates since the last restart
 */
public record DualAveraging(double mu, double logStep, double logStepBar, double hBar, int count)
    implements Serializable {
  private static final double GAMMA = 0.05;
  private static final double T0 = 10;
  private static final double KAPPA = 0.75;

  public static DualAveraging init(double stepSize) {
    return new DualAveraging(Math.log(10 * stepSize), Math.log(stepSize), 0.0, 0.0, 0);
  }

  public DualAveraging update(double acceptProb, double target) {
    int m = count + 1;
    double eta = 1.0 / (m + T0);
    double h = (1 - eta) * hBar + eta * (target - acceptProb);
    double log = mu - Math.sqrt(m) / GAMMA * h;
    double w = Math.pow(m, -KAPPA);
    double bar = w * log + (1 - w) * logStepBar;
    return new DualAveraging(mu, log, bar, h, m);
  }

  public double stepSize() {
    return Math.exp(logStep);
  }

  public double finalStepSize() {
    return Math.exp(count == 0 ? logStep : logStepBar);
  }
}
