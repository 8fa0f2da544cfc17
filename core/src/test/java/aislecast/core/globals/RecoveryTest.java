package aislecast.core.globals;

import static org.junit.jupiter.api.Assertions.assertTrue;

import org.apache.commons.math3.distribution.MultivariateNormalDistribution;
import org.apache.commons.math3.random.Well19937c;
import org.junit.jupiter.api.Test;

/**
 * Calibration on data simulated from the model (common practice for samplers): stores, intercepts
 * and rows drawn with known globals (seeded), then 2,000 full global sweeps from a deliberately
 * wrong start; after 200 warmup sweeps every posterior mean must lie within 4 posterior standard
 * deviations of the truth.
 */
class RecoveryTest {
  private static final int SWEEPS = 2_000;
  private static final int WARMUP = 200;

  @Test
  void fullSweepRecoversKnownGlobals() {
    int kd = 2;
    int kx = 1;
    int products = 5;
    Dims dims = new Dims(kd, 3, products, 2, 2);
    double[] gammaPsi = {-0.5, -1.0, -0.8, 0.3, 0.0, 0.2};
    double[] vPsi = {0.36, 0.05, 0.0, 0.05, 0.25, 0.02, 0.0, 0.02, 0.25};
    double[] kappabar = {1.0, -0.5, 0.3, 2.0, -1.2};
    double tau2 = 0.5;
    double[] gamma = {0.8, -0.5};
    double[] pi0 = {0.2, 0.5, 0.9, 1.3, 0.7};
    double[] pi = {0.6, -0.3};
    double lambda = 0.5;
    double sigmaXi = 0.4;
    double sigmaP = 0.15;
    Globals truth =
        new Globals(
            dims, gammaPsi, vPsi, kappabar, tau2, gamma, sigmaXi * sigmaXi, pi0, pi, lambda,
            sigmaP * sigmaP);

    Well19937c data = new Well19937c(2024);
    GlobalStats stats = new GlobalStats(dims);
    double[][] v = {{0.36, 0.05, 0.0}, {0.05, 0.25, 0.02}, {0.0, 0.02, 0.25}};
    for (int s = 0; s < 300; s++) {
      double[] d = {1.0, data.nextGaussian()};
      double[] mean = new double[3];
      for (int k = 0; k < 3; k++) {
        mean[k] = gammaPsi[k] * d[0] + gammaPsi[3 + k] * d[1];
      }
      stats.addStore(d, new MultivariateNormalDistribution(data, mean, v).sample());
      for (int j = 0; j < products; j++) {
        if (data.nextDouble() < 0.8) {
          stats.addIntercept(j, kappabar[j] + Math.sqrt(tau2) * data.nextGaussian());
        }
      }
    }
    SimRows rows = new SimRows(3000, products, gamma, pi0, pi, lambda, sigmaXi, sigmaP, data);
    stats.regression().merge(rows.stats());

    double[] identity = {1, 0, 0, 0, 1, 0, 0, 0, 1};
    Globals g =
        new Globals(
            dims, new double[6], identity, new double[products], 5.0, new double[2], 5.0,
            new double[products], new double[2], -1.0, 5.0);
    Priors priors = Priors.defaults(kd, kx);
    Well19937c rng = new Well19937c(99);
    int p = dims.flatLength();
    double[] sum = new double[p];
    double[] sum2 = new double[p];
    for (int sweep = 0; sweep < SWEEPS; sweep++) {
      g = GlobalGibbs.draw(g, stats, priors, rng);
      if (sweep >= WARMUP) {
        double[] f = g.toFlat();
        for (int i = 0; i < p; i++) {
          sum[i] += f[i];
          sum2[i] += f[i] * f[i];
        }
      }
    }
    int kept = SWEEPS - WARMUP;
    double[] want = truth.toFlat();
    String[] names = Globals.parameterNames(dims);
    for (int i = 0; i < p; i++) {
      double mean = sum[i] / kept;
      double sd = Math.sqrt(Math.max(sum2[i] / kept - mean * mean, 0.0));
      assertTrue(
          Math.abs(mean - want[i]) <= 4.0 * sd,
          names[i] + ": posterior mean " + mean + " (sd " + sd + ") vs truth " + want[i]);
    }
  }
}
