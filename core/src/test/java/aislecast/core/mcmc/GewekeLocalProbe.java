package aislecast.core.mcmc;

import aislecast.core.demand.Heterogeneity;
import aislecast.core.demand.ShareKernel;
import aislecast.core.estimate.SimFixture;
import aislecast.core.estimate.Sweeps;
import aislecast.core.globals.Globals;
import aislecast.core.model.LocalParams;
import aislecast.core.model.StoreData;
import aislecast.core.rng.SplitMix64;
import aislecast.core.rng.Streams;
import aislecast.core.sim.Multinomial;
import aislecast.core.sim.SimSettings;

/**
 * Manual probe (not a test): the successive-conditional simulator of Geweke (2004, JASA 99) for
 * one store's local kernel at fixed globals. Each iteration draws the store's data (log prices
 * from the price equation given xi, then units from the multinomial given the shares) from the
 * model given the current locals, then runs the local kernel on those data. If the kernel leaves
 * the posterior of the locals invariant, the locals keep their prior, {@code psi ~ N(Gamma' d,
 * V)}, {@code kappa ~ N(kappabar, tau^2)}, {@code xi ~ N(0, sigma_xi^2)}: the probe prints each
 * moment against its prior value with a batch-means standard error.
 *
 * <p>Arguments: weeks, products, iterations, kernel steps per iteration; environment
 * {@code SEED}, {@code LF} (leapfrog steps, default 8), {@code STORE} (index, default 0).
 */
public final class GewekeLocalProbe {
  public static void main(String[] args) {
    int weeks = Integer.parseInt(args[0]);
    int products = Integer.parseInt(args[1]);
    int iterations = Integer.parseInt(args[2]);
    int steps = Integer.parseInt(args[3]);
    long seed = Long.parseLong(System.getenv().getOrDefault("SEED", "5"));
    int leapfrog = Integer.parseInt(System.getenv().getOrDefault("LF", "8"));
    int storeIx = Integer.parseInt(System.getenv().getOrDefault("STORE", "0"));
    SimFixture f = new SimFixture(SimSettings.demo().withSizes(4, weeks, products, 2, 3, 50));
    Globals truth = f.truth;
    LocalParams g = Sweeps.localParams(new Globals[] {truth})[0];
    StoreData d = f.stores.get(storeIx);
    double[] x = f.catalog.x();
    int kx = f.catalog.attributes();
    int kp = Heterogeneity.dim(kx);
    int np = d.products.length;
    StoreSampler sampler = new StoreSampler(d, x, kx);
    SplitMix64 rng = Streams.stream(seed, 0, 0);
    // start at the simulation's true locals, a draw from their prior given the globals
    double[] nat = aislecast.core.estimate.SimFitProbe.truthLocals(f, d);
    StoreChainState s = sampler.init(rng, g, x, kx);
    s.position = sampler.fromNatural(nat);
    int warm = 300;
    var set = new StoreSampler.Settings(warm, leapfrog, 0.8);
    for (int i = 0; i < warm; i++) {
      sampler.step(rng, s, g, set); // tune on the observed data; the draws are discarded
    }
    s.position = sampler.fromNatural(nat);
    int nStat = kp + 3;
    double[][] stat = new double[nStat][iterations];
    double[] psiMean = new double[kp];
    g.psiMean(d.demographics, psiMean);
    int r = d.shoppers;
    int jCat = x.length / kx;
    double[] alpha = new double[r];
    double[] mu = new double[r * jCat];
    int jmax = d.maxAssortment();
    double[] v = new double[r * jmax];
    double[] del = new double[jmax];
    double[] sh = new double[jmax];
    long[] q = new long[jmax];
    long t0 = System.nanoTime();
    for (int it = 0; it < iterations; it++) {
      nat = sampler.natural(s.position);
      double[] kappa = java.util.Arrays.copyOfRange(nat, kp, kp + np);
      double[] delta = java.util.Arrays.copyOfRange(nat, kp + np, nat.length);
      // data given the locals: log price from the price equation, then units from the shares
      for (int row = 0; row < d.rows(); row++) {
        double xi = aislecast.core.model.StoreDensity.xi(d, g, kappa, delta, row);
        double m = g.pi0()[d.product[row]] + g.lambda() * xi;
        for (int k = 0; k < d.kc; k++) {
          m += d.c[row * d.kc + k] * g.pi()[k];
        }
        double lp = m + Math.sqrt(g.sigmaP2()) * rng.nextGaussian();
        d.logPrice[row] = lp;
        d.price[row] = Math.exp(lp);
      }
      Heterogeneity.shopperTastes(nat, kx, d.nu, r, x, jCat, alpha, mu);
      for (int t = 0; t < d.markets(); t++) {
        int a = d.rowStart[t];
        int j = d.rowStart[t + 1] - a;
        for (int p = 0; p < j; p++) {
          del[p] = nat[kp + np + a + p];
          for (int i = 0; i < r; i++) {
            v[i * j + p] = mu[i * jCat + d.product[a + p]] - alpha[i] * d.price[a + p];
          }
        }
        ShareKernel.shares(r, j, del, v, sh, null);
        Multinomial.sample(rng, (int) d.marketSize[t], sh, j, q);
        for (int p = 0; p < j; p++) {
          d.units[a + p] = q[p];
        }
      }
      // the sampler's coordinates depend on prices: same natural locals, new data
      s.position = sampler.fromNatural(nat);
      for (int k = 0; k < steps; k++) {
        sampler.step(rng, s, g, set);
      }
      nat = sampler.natural(s.position);
      for (int k = 0; k < kp; k++) {
        stat[k][it] = nat[k] - psiMean[k];
      }
      double kd = 0;
      for (int l = 0; l < np; l++) {
        kd += nat[kp + l] - truth.kappabar()[d.products[l]];
      }
      stat[kp][it] = kd / np;
      double xs = 0;
      double xs2 = 0;
      kappa = java.util.Arrays.copyOfRange(nat, kp, kp + np);
      delta = java.util.Arrays.copyOfRange(nat, kp + np, nat.length);
      for (int row = 0; row < d.rows(); row++) {
        double xi = aislecast.core.model.StoreDensity.xi(d, g, kappa, delta, row);
        xs += xi;
        xs2 += xi * xi;
      }
      stat[kp + 1][it] = xs / d.rows();
      stat[kp + 2][it] = xs2 / d.rows();
    }
    double sec = (System.nanoTime() - t0) / 1e9;
    System.out.printf("store %s: %d rows, %d iterations x %d kernel steps, %.1f s, acceptance %.2f%n",
        d.storeId, d.rows(), iterations, steps, sec, s.acceptSum / s.transitions);
    String[] names = new String[nStat];
    double[] expect = new double[nStat];
    for (int k = 0; k < kp; k++) {
      names[k] = "psi[" + k + "] - mean";
    }
    names[kp] = "mean kappa - kappabar";
    names[kp + 1] = "mean xi";
    names[kp + 2] = "mean xi^2";
    expect[kp + 2] = g.sigmaXi2();
    for (int k = 0; k < nStat; k++) {
      double m = LocalMixingProbe.mean(stat[k]);
      double se = batchSe(stat[k], 50);
      System.out.printf("%-22s prior %8.4f  kernel %8.4f  se %.4f  z %6.2f%n", names[k], expect[k], m, se,
          (m - expect[k]) / se);
    }
    for (int k = 0; k < kp; k++) {
      double m = LocalMixingProbe.mean(stat[k]);
      double var = 0;
      for (double w : stat[k]) {
        var += (w - m) * (w - m);
      }
      var /= iterations - 1;
      System.out.printf("var psi[%d]: prior %.4f kernel %.4f%n", k, g.vPsi()[k * kp + k], var);
    }
  }

  /** Standard error of the mean by batch means. */
  static double batchSe(double[] x, int batches) {
    int len = x.length / batches;
    double m = LocalMixingProbe.mean(x);
    double bv = 0;
    for (int i = 0; i < batches; i++) {
      double s = 0;
      for (int k = 0; k < len; k++) {
        s += x[i * len + k];
      }
      s /= len;
      bv += (s - m) * (s - m);
    }
    bv /= batches - 1;
    return Math.sqrt(bv / batches);
  }
}
