package aislecast.bench;

import aislecast.core.demand.FactoredShares;
import aislecast.core.demand.Heterogeneity;
import aislecast.core.demand.ShareKernel;
import aislecast.core.draws.ShopperDraws;
import java.util.SplittableRandom;
import java.util.concurrent.TimeUnit;
import org.openjdk.jmh.annotations.Benchmark;
import org.openjdk.jmh.annotations.BenchmarkMode;
import org.openjdk.jmh.annotations.Mode;
import org.openjdk.jmh.annotations.OutputTimeUnit;
import org.openjdk.jmh.annotations.Param;
import org.openjdk.jmh.annotations.Scope;
import org.openjdk.jmh.annotations.Setup;
import org.openjdk.jmh.annotations.State;

/**
 * Share kernel cost for one market: R shoppers, J products, Kx attributes with random tastes plus
 * a random price coefficient. Each benchmark is one full market evaluation; {@link KernelTable}
 * divides by R J to report ns per shopper-product.
 */
@State(Scope.Thread)
@BenchmarkMode(Mode.AverageTime)
@OutputTimeUnit(TimeUnit.NANOSECONDS)
public class ShareKernelBench {
  @Param("200")
  public int shoppers;

  @Param("30")
  public int products;

  @Param("3")
  public int attributes;

  private double[] psi;
  private double[] nu;
  private double[] x;
  private double[] price;
  private double[] delta;
  private double[] alpha;
  private double[] mu;
  private double[] v;
  private double[] shares;
  private double[] probs;
  private double[] expRow;
  private double[] l;
  private double[] beta;
  private FactoredShares factored;

  @Setup
  public void setUp() {
    int r = shoppers;
    int j = products;
    int kx = attributes;
    SplittableRandom g = new SplittableRandom(2024L);
    psi = new double[Heterogeneity.dim(kx)];
    psi[0] = Math.log(0.8);
    psi[1] = Math.log(0.5);
    for (int k = 0; k < kx; k++) {
      psi[2 + k] = Math.log(0.7);
    }
    for (int q = 2 + kx; q < psi.length; q++) {
      psi[q] = 0.2;
    }
    nu = ShopperDraws.generate(7L, "bench-store", r, 1 + kx);
    x = new double[j * kx];
    for (int q = 0; q < x.length; q++) {
      x[q] = 2.0 * g.nextDouble() - 1.0;
    }
    price = new double[j];
    delta = new double[j];
    for (int p = 0; p < j; p++) {
      price[p] = 1.0 + 2.0 * g.nextDouble();
      delta[p] = -2.0 + 2.0 * g.nextDouble();
    }
    alpha = new double[r];
    mu = new double[r * j];
    v = new double[r * j];
    Heterogeneity.shopperTastes(psi, kx, nu, r, x, j, alpha, mu);
    Heterogeneity.shopperUtility(r, j, alpha, mu, price, v);
    shares = new double[j];
    probs = new double[r * j];
    expRow = new double[j];
    l = new double[kx * kx];
    beta = new double[kx];
    factored = new FactoredShares(r, j);
    factored.prepare(r, j, v);
  }

  /**
   * (a) The baseline written the obvious way: per shopper its price coefficient and tastes, per
   * element the utility and one scalar Math.exp, then normalise. No overflow guard.
   */
  @Benchmark
  public double naive() {
    int r = shoppers;
    int j = products;
    int kx = attributes;
    double sigma = Math.exp(psi[1]);
    Heterogeneity.factor(psi, kx, l);
    java.util.Arrays.fill(shares, 0.0);
    double outside = 0.0;
    int stride = 1 + kx;
    for (int i = 0; i < r; i++) {
      double ai = Math.exp(psi[0] + sigma * nu[i * stride]);
      for (int k = 0; k < kx; k++) {
        double b = 0.0;
        for (int m = 0; m <= k; m++) {
          b += l[k * kx + m] * nu[i * stride + 1 + m];
        }
        beta[k] = b;
      }
      double den = 1.0;
      for (int p = 0; p < j; p++) {
        double u = delta[p] - ai * price[p];
        for (int k = 0; k < kx; k++) {
          u += x[p * kx + k] * beta[k];
        }
        double e = Math.exp(u);
        expRow[p] = e;
        den += e;
      }
      double inv = 1.0 / den;
      for (int p = 0; p < j; p++) {
        shares[p] += expRow[p] * inv;
      }
      outside += inv;
    }
    for (int p = 0; p < j; p++) {
      shares[p] /= r;
    }
    return outside / r + shares[0];
  }

  /** (b) ShareKernel.shares: log-sum-exp, exp per shopper-product, from precomputed v. */
  @Benchmark
  public double direct() {
    return ShareKernel.shares(shoppers, products, delta, v, shares, null) + shares[0];
  }

  /** (c) FactoredShares.shares: the path estimation uses when only delta moves. */
  @Benchmark
  public double factored() {
    return factored.shares(delta, shares, null) + shares[0];
  }

  /** (c') The same, also writing the R x J shopper probabilities (share inversion, Jacobians). */
  @Benchmark
  public double factoredWithProbs() {
    return factored.shares(delta, shares, probs) + shares[0] + probs[probs.length - 1];
  }

  /** (d) FactoredShares.prepare: the exp cost paid when psi or prices move. */
  @Benchmark
  public FactoredShares prepare() {
    factored.prepare(shoppers, products, v);
    return factored;
  }

  /** (e) Everything a psi move costs: tastes, utilities, prepare. */
  @Benchmark
  public FactoredShares tastesAndPrepare() {
    Heterogeneity.shopperTastes(psi, attributes, nu, shoppers, x, products, alpha, mu);
    Heterogeneity.shopperUtility(shoppers, products, alpha, mu, price, v);
    factored.prepare(shoppers, products, v);
    return factored;
  }
}
