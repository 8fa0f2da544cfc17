package aislecast.core.mcmc;

import aislecast.core.model.LocalParams;
import aislecast.core.model.StoreData;
import org.apache.commons.math3.random.RandomGenerator;

/**
 * Exact Gibbs draw of a store's intercepts {@code kappa_sj} given its mean utilities and the
 * globals. With {@code y = delta - z' gamma} and {@code r = log p - pi0_j - c' pi}, row t
 * contributes {@code -(y_t - kappa)^2 / (2 sigma_xi^2) - (r_t - lambda (y_t - kappa))^2 /
 * (2 sigma_p^2)}: a normal likelihood in kappa, so with the prior {@code N(kappabar_j, tau^2)} the
 * conditional is normal with
 *
 * <pre>
 *   precision = n / sigma_xi^2 + n lambda^2 / sigma_p^2 + 1 / tau^2
 *   mean      = (sum y / sigma_xi^2 + lambda sum (lambda y - r) / sigma_p^2 + kappabar / tau^2)
 *               / precision
 * </pre>
 *
 * (normal-normal conjugacy, Gelman et al., Bayesian Data Analysis, 3rd ed., section 2.5).
 */
public final class KappaGibbs {
  private KappaGibbs() {}

  /**
   * @param delta mean utilities per row, not modified
   * @param sums scratch of length 2 * products, modified
   * @param kappaOut modified
   */
  public static void draw(RandomGenerator rng, StoreData d, LocalParams g, double[] delta,
      double[] sums, double[] kappaOut) {
    int np = d.products.length;
    java.util.Arrays.fill(sums, 0, 2 * np, 0.0);
    double lambda = g.lambda();
    double sx2 = g.sigmaXi2();
    double sp2 = g.sigmaP2();
    for (int row = 0; row < d.rows(); row++) {
      double y = delta[row];
      for (int k = 0; k < d.kz; k++) {
        y -= d.z[row * d.kz + k] * g.gamma()[k];
      }
      double r = d.logPrice[row] - g.pi0()[d.product[row]];
      for (int k = 0; k < d.kc; k++) {
        r -= d.c[row * d.kc + k] * g.pi()[k];
      }
      int l = d.local[row];
      sums[2 * l] += 1;
      sums[2 * l + 1] += y / sx2 + lambda * (lambda * y - r) / sp2;
    }
    for (int l = 0; l < np; l++) {
      double n = sums[2 * l];
      double prec = n / sx2 + n * lambda * lambda / sp2 + 1.0 / g.tau2();
      double mean = (sums[2 * l + 1] + g.kappabar()[d.products[l]] / g.tau2()) / prec;
      kappaOut[l] = mean + rng.nextGaussian() / Math.sqrt(prec);
    }
  }
}
