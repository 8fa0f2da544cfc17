package aislecast.core.equilibrium;

import aislecast.core.demand.Heterogeneity;
import aislecast.core.demand.ShareKernel;
import aislecast.core.draws.ShopperDraws;
import java.util.SplittableRandom;

/** Seeded test markets and independent profit calculations through {@link ShareKernel}. */
public final class Markets {
  private Markets() {}

  /** A random-coefficients market: everything drawn from {@code seed}. */
  public static final class Rc {
    public final int r;
    public final int j;
    public final int kx;
    public final double[] psi;
    public final double[] nu;
    public final double[] x;
    public final double[] delta;
    public final int[] firm;
    public final double[] cost;

    public Rc(long seed, int r, int j, int kx, int firms) {
      SplittableRandom g = new SplittableRandom(seed);
      this.r = r;
      this.j = j;
      this.kx = kx;
      psi = new double[Heterogeneity.dim(kx)];
      psi[0] = Math.log(0.8) + 0.2 * g.nextGaussian();
      psi[1] = Math.log(0.5);
      for (int k = 0; k < kx; k++) {
        psi[2 + k] = Math.log(0.6 + 0.4 * g.nextDouble());
      }
      for (int q = 2 + kx; q < psi.length; q++) {
        psi[q] = 0.3 * g.nextGaussian();
      }
      nu = ShopperDraws.generate(seed, "test-store", r, 1 + kx);
      x = new double[j * kx];
      for (int q = 0; q < x.length; q++) {
        x[q] = g.nextGaussian();
      }
      delta = new double[j];
      firm = new int[j];
      cost = new double[j];
      for (int p = 0; p < j; p++) {
        delta[p] = -1.0 + g.nextDouble();
        firm[p] = p % firms;
        cost[p] = 0.5 + g.nextDouble();
      }
    }

    public MarketModel model() {
      MarketModel m = new MarketModel(r, j);
      m.load(psi, kx, nu, r, x, j, delta, firm);
      return m;
    }
  }

  /** Plain logit: one shopper type with price sensitivity {@code alpha} and no tastes. */
  public static MarketModel logit(double alpha, double[] delta, int[] firm) {
    int j = delta.length;
    MarketModel m = new MarketModel(1, j);
    m.loadTastes(1, j, new double[] {alpha}, new double[j], delta, firm);
    return m;
  }

  /**
   * Gradient of each product's owner's profit in that product's price, {@code s_k + sum_{j in
   * f(k)} (p_j - c_j) ds_j/dp_k}, with shares and the price Jacobian from {@link ShareKernel}.
   */
  public static double[] profitGradient(MarketModel m, double[] price, double[] cost, double[] sharesOut) {
    int r = m.shoppers();
    int j = m.products();
    double[] v = new double[r * j];
    m.shopperUtility(price, v);
    double[] delta = new double[j];
    m.delta(delta);
    double[] probs = new double[r * j];
    ShareKernel.shares(r, j, delta, v, sharesOut, probs);
    double[] dsdp = new double[j * j];
    ShareKernel.jacobianPrice(r, j, probs, m.alpha(), dsdp);
    double[] grad = new double[j];
    for (int k = 0; k < j; k++) {
      double gk = sharesOut[k];
      for (int q = 0; q < j; q++) {
        if (m.firm(q) == m.firm(k)) {
          gk += (price[q] - cost[q]) * dsdp[q * j + k];
        }
      }
      grad[k] = gk;
    }
    return grad;
  }

  /** Profit of firm {@code f} at {@code price}, shares from {@link ShareKernel}. */
  public static double firmProfit(MarketModel m, double[] price, double[] cost, int f) {
    int r = m.shoppers();
    int j = m.products();
    double[] v = new double[r * j];
    m.shopperUtility(price, v);
    double[] delta = new double[j];
    m.delta(delta);
    double[] s = new double[j];
    ShareKernel.shares(r, j, delta, v, s, null);
    double profit = 0;
    for (int p = 0; p < j; p++) {
      if (m.firm(p) == f) {
        profit += (price[p] - cost[p]) * s[p];
      }
    }
    return profit;
  }
}
