package aislecast.core.globals;

import org.apache.commons.math3.random.RandomGenerator;

/**
 * Rows simulated from the demand and price equations with known parameters (test data only):
 * {@code y = z'gamma + xi}, {@code log p = pi0_j + c'pi + lambda xi + e}.
 */
final class SimRows {
  final int n;
  final int kz;
  final int products;
  final int kc;
  final double[] z; // n x kz
  final int[] product;
  final double[] c; // n x kc
  final double[] y;
  final double[] l;

  SimRows(
      int n, int products, double[] gamma, double[] pi0, double[] pi, double lambda, double sigmaXi,
      double sigmaP, RandomGenerator rng) {
    this.n = n;
    this.kz = gamma.length;
    this.products = products;
    this.kc = pi.length;
    z = new double[n * kz];
    product = new int[n];
    c = new double[n * kc];
    y = new double[n];
    l = new double[n];
    for (int t = 0; t < n; t++) {
      product[t] = t % products;
      double zg = 0.0;
      for (int a = 0; a < kz; a++) {
        // a 0/1 display-like shifter and a continuous one
        z[t * kz + a] = a % 2 == 0 ? (rng.nextDouble() < 0.3 ? 1.0 : 0.0) : rng.nextGaussian();
        zg += z[t * kz + a] * gamma[a];
      }
      double cp = 0.0;
      for (int k = 0; k < kc; k++) {
        c[t * kc + k] = 0.5 * rng.nextGaussian();
        cp += c[t * kc + k] * pi[k];
      }
      double xi = sigmaXi * rng.nextGaussian();
      y[t] = zg + xi;
      l[t] = pi0[product[t]] + cp + lambda * xi + sigmaP * rng.nextGaussian();
    }
  }

  RegressionStats stats() {
    RegressionStats s = new RegressionStats(kz, products, kc);
    for (int t = 0; t < n; t++) {
      s.add(z, t * kz, product[t], c, t * kc, y[t], l[t]);
    }
    return s;
  }

  /** Row t of W = [z, one-hot product, c]. */
  double[] w(int t) {
    double[] w = new double[kz + products + kc];
    for (int a = 0; a < kz; a++) {
      w[a] = z[t * kz + a];
    }
    w[kz + product[t]] = 1.0;
    for (int k = 0; k < kc; k++) {
      w[kz + products + k] = c[t * kc + k];
    }
    return w;
  }
}
