package aislecast.core.demand;

import java.util.SplittableRandom;

/** A simulated market for the demand tests: draws, attributes, prices, psi and utilities. */
final class TestMarket {
  final int r;
  final int j;
  final int kx;
  final double[] psi;
  final double[] nu;
  final double[] x;
  final double[] price;
  final double[] delta;
  final double[] alpha;
  final double[] mu;
  final double[] v;

  private TestMarket(int r, int j, int kx, double[] psi, double[] nu, double[] x, double[] price,
      double[] delta) {
    this.r = r;
    this.j = j;
    this.kx = kx;
    this.psi = psi;
    this.nu = nu;
    this.x = x;
    this.price = price;
    this.delta = delta;
    this.alpha = new double[r];
    this.mu = new double[r * j];
    this.v = new double[r * j];
    refresh();
  }

  /** Recomputes alpha, mu and v after psi, draws, attributes or prices changed. */
  void refresh() {
    Heterogeneity.shopperTastes(psi, kx, nu, r, x, j, alpha, mu);
    Heterogeneity.shopperUtility(r, j, alpha, mu, price, v);
  }

  /** Shopper parts at other prices, into a fresh array (tests only). */
  double[] utilityAt(double[] otherPrice) {
    double[] out = new double[r * j];
    Heterogeneity.shopperUtility(r, j, alpha, mu, otherPrice, out);
    return out;
  }

  /**
   * Random market: N(0,1) shopper draws (pseudo-random, seeded), N(0,1) attributes, prices in
   * [1, 3], mean utilities in [-1, 1]; psi given.
   */
  static TestMarket random(long seed, int r, int j, int kx, double[] psi) {
    SplittableRandom g = new SplittableRandom(seed);
    double[] nu = new double[r * (1 + kx)];
    for (int q = 0; q < nu.length; q++) {
      nu[q] = gaussian(g);
    }
    double[] x = new double[j * kx];
    for (int q = 0; q < x.length; q++) {
      x[q] = gaussian(g);
    }
    double[] price = new double[j];
    double[] delta = new double[j];
    for (int p = 0; p < j; p++) {
      price[p] = 1.0 + 2.0 * g.nextDouble();
      delta[p] = -1.0 + 2.0 * g.nextDouble();
    }
    return new TestMarket(r, j, kx, psi, nu, x, price, delta);
  }

  /** Market from explicit pieces. */
  static TestMarket of(int r, int j, int kx, double[] psi, double[] nu, double[] x, double[] price,
      double[] delta) {
    return new TestMarket(r, j, kx, psi, nu, x, price, delta);
  }

  /** psi with price-sensitivity location a, log sigma, and log diag / off-diagonal of L. */
  static double[] psi(int kx, double a, double logSigma, double logDiag, double offDiag) {
    double[] psi = new double[Heterogeneity.dim(kx)];
    psi[0] = a;
    psi[1] = logSigma;
    for (int k = 0; k < kx; k++) {
      psi[2 + k] = logDiag;
    }
    for (int q = 2 + kx; q < psi.length; q++) {
      psi[q] = offDiag;
    }
    return psi;
  }

  /** Box-Muller; fine for test inputs. */
  static double gaussian(SplittableRandom g) {
    double u1 = 1.0 - g.nextDouble();
    double u2 = g.nextDouble();
    return Math.sqrt(-2.0 * Math.log(u1)) * Math.cos(2.0 * Math.PI * u2);
  }
}
