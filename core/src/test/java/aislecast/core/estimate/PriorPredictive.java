package aislecast.core.estimate;

import aislecast.core.demand.Heterogeneity;
import aislecast.core.demand.ShareKernel;
import aislecast.core.draws.ShopperDraws;
import aislecast.core.globals.Dims;
import aislecast.core.globals.Globals;
import aislecast.core.globals.InvGamma;
import aislecast.core.globals.InvWishart;
import aislecast.core.globals.Normal;
import aislecast.core.globals.Priors;
import aislecast.core.model.ProductCatalog;
import aislecast.core.model.StoreData;
import aislecast.core.rng.SplitMix64;
import aislecast.core.sim.Multinomial;
import java.util.ArrayList;
import java.util.List;

/**
 * Tiny data sets drawn from the prior predictive of the DESIGN section 4 model: globals from the
 * priors, locals from the hierarchy, data from the simulated-share model with the same shopper
 * draws the sampler uses. For simulation-based calibration (Talts et al. 2018), which needs the
 * data-generating process to be exactly the model the sampler targets.
 */
final class PriorPredictive {
  static final int STORES = 4;
  static final int WEEKS = 6;
  static final int PRODUCTS = 3;
  static final int KX = 1;
  static final int R = 20;
  static final long MARKET = 3000;

  /**
   * Priors concentrated enough that every draw gives sane shares (SBC checks the sampler for the
   * prior it is given, whichever that is).
   */
  static Priors priors() {
    int kpsi = Heterogeneity.dim(KX);
    double[] mean = {0.0, -1.5, -1.0};
    double[] var = {0.25 * 0.25, 0.3 * 0.3, 0.3 * 0.3};
    double nu0 = kpsi + 8;
    double[] s0 = new double[kpsi * kpsi];
    for (int k = 0; k < kpsi; k++) {
      s0[k * kpsi + k] = 0.02 * (nu0 - kpsi - 1);
    }
    return new Priors(1, kpsi, mean, var, new InvWishart(nu0, s0, kpsi),
        new Normal(-3.0, 0.25), new InvGamma(10, 0.9), new Normal(0.5, 0.04),
        new Normal(0.7, 0.01), new Normal(0.7, 0.01), new Normal(0.5, 0.09),
        new InvGamma(10, 0.9), new InvGamma(10, 0.09));
  }

  final ProductCatalog catalog;
  final List<StoreData> stores = new ArrayList<>();
  final Globals truth;

  PriorPredictive(long seed, Priors pr) {
    SplitMix64 rng = new SplitMix64(seed);
    int kpsi = Heterogeneity.dim(KX);
    Dims dims = new Dims(1, kpsi, PRODUCTS, 1, 1);
    double[] gammaPsi = new double[kpsi];
    for (int k = 0; k < kpsi; k++) {
      gammaPsi[k] = pr.gammaPsiMean()[k] + Math.sqrt(pr.gammaPsiVar()[k]) * rng.nextGaussian();
    }
    double[] vPsi = pr.vPsi().sample(rng);
    double[] kappabar = new double[PRODUCTS];
    double[] pi0 = new double[PRODUCTS];
    for (int j = 0; j < PRODUCTS; j++) {
      kappabar[j] = pr.kappabar().sample(rng);
      pi0[j] = pr.pi0().sample(rng);
    }
    truth = new Globals(dims, gammaPsi, vPsi, kappabar, pr.tau2().sample(rng),
        new double[] {pr.gamma().sample(rng)}, pr.sigmaXi2().sample(rng), pi0,
        new double[] {pr.pi().sample(rng)}, pr.lambda().sample(rng), pr.sigmaP2().sample(rng));
    String[] ids = new String[PRODUCTS];
    String[] owners = new String[PRODUCTS];
    double[] raw = new double[PRODUCTS];
    for (int j = 0; j < PRODUCTS; j++) {
      ids[j] = "P" + j;
      owners[j] = "O" + (j % 2);
      raw[j] = j;
    }
    catalog = new ProductCatalog(ids, owners, new String[] {"size"}, raw);
    double[] cholV = cholesky(vPsi, kpsi);
    for (int s = 0; s < STORES; s++) {
      String sid = "S" + s;
      double[] psi = new double[kpsi];
      double[] z = new double[kpsi];
      for (int k = 0; k < kpsi; k++) {
        z[k] = rng.nextGaussian();
      }
      for (int k = 0; k < kpsi; k++) {
        double v = gammaPsi[k];
        for (int m = 0; m <= k; m++) {
          v += cholV[k * kpsi + m] * z[m];
        }
        psi[k] = v;
      }
      double[] kappa = new double[PRODUCTS];
      for (int j = 0; j < PRODUCTS; j++) {
        kappa[j] = truth.kappabar(j) + Math.sqrt(truth.tau2()) * rng.nextGaussian();
      }
      double[] nu = ShopperDraws.generate(seed, sid, R, 1 + KX);
      double[] alpha = new double[R];
      double[] mu = new double[R * PRODUCTS];
      Heterogeneity.shopperTastes(psi, KX, nu, R, catalog.x(), PRODUCTS, alpha, mu);
      int rows = WEEKS * PRODUCTS;
      int[] rowStart = new int[WEEKS + 1];
      int[] product = new int[rows];
      long[] units = new long[rows];
      double[] price = new double[rows];
      double[] zs = new double[rows];
      double[] cs = new double[rows];
      long[] size = new long[WEEKS];
      String[] weeks = new String[WEEKS];
      double[] delta = new double[PRODUCTS];
      double[] v = new double[R * PRODUCTS];
      double[] share = new double[PRODUCTS + 1];
      long[] counts = new long[PRODUCTS + 1];
      for (int t = 0; t < WEEKS; t++) {
        weeks[t] = String.format("2026-02-%02d", 2 + 7 * t);
        size[t] = MARKET;
        rowStart[t] = t * PRODUCTS;
        for (int j = 0; j < PRODUCTS; j++) {
          int row = t * PRODUCTS + j;
          product[row] = j;
          zs[row] = rng.nextDouble() < 0.2 ? 1 : 0;
          cs[row] = Math.log(0.9) + 0.15 * rng.nextGaussian();
          double xi = Math.sqrt(truth.sigmaXi2()) * rng.nextGaussian();
          double logP = pi0[j] + truth.pi(0) * cs[row] + truth.lambda() * xi
              + Math.sqrt(truth.sigmaP2()) * rng.nextGaussian();
          price[row] = Math.exp(logP);
          delta[j] = kappa[j] + truth.gamma(0) * zs[row] + xi;
        }
        for (int i = 0; i < R; i++) {
          for (int j = 0; j < PRODUCTS; j++) {
            v[i * PRODUCTS + j] = mu[i * PRODUCTS + j] - alpha[i] * price[t * PRODUCTS + j];
          }
        }
        share[PRODUCTS] = ShareKernel.shares(R, PRODUCTS, delta, v, share, null);
        Multinomial.sample(rng, (int) MARKET, share, PRODUCTS, counts);
        for (int j = 0; j < PRODUCTS; j++) {
          units[t * PRODUCTS + j] = counts[j];
        }
      }
      rowStart[WEEKS] = rows;
      stores.add(new StoreData(sid, s, new double[] {1.0}, nu, R, new int[] {0, 1, 2}, weeks,
          size, rowStart, product, units, price, 1, zs, 1, cs));
    }
  }

  private static double[] cholesky(double[] a, int n) {
    var m = new org.ejml.data.DMatrixRMaj(n, n, true, a);
    var chol = org.ejml.dense.row.factory.DecompositionFactory_DDRM.chol(n, true);
    if (!chol.decompose(m)) {
      throw new IllegalStateException("prior draw of V_psi not positive definite");
    }
    return chol.getT(null).getData();
  }
}
