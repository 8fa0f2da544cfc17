package aislecast.core.scenario;

import aislecast.core.demand.Heterogeneity;
import aislecast.core.demand.ShareInversion;

/**
 * Base-period mean utilities of one store under one posterior draw, recovered by inverting the
 * base period's observed shares at the draw's {@code psi} ({@link ShareInversion}).
 *
 * <p>Under the model the mean utility {@code delta_jt = kappa_sj + z_jt' gamma + xi_jt} is pinned
 * by the shares given {@code psi}: {@code s(delta, psi) = s_obs} has exactly one solution (Berry
 * 1994). So inverting the observed shares reproduces the base period exactly at every draw and
 * needs neither {@code kappa} nor {@code xi} draws. A product that sold nothing gets half a unit
 * (its share must be positive for the logarithm), which {@link #observedShares} applies.
 *
 * <p>One instance per thread: it owns its buffers.
 */
public final class BaseUtilities {
  /** Convergence threshold on {@code max_j |log s_j - log s_obs_j|}. */
  public static final double TOLERANCE = 1e-11;
  private static final int MAX_ITERATIONS = 200;

  private final ShareInversion inversion;
  private final double[] alpha;
  private final double[] v;

  public BaseUtilities(int maxShoppers, int maxProducts) {
    this.inversion = new ShareInversion(maxShoppers, maxProducts);
    this.alpha = new double[maxShoppers];
    this.v = new double[maxShoppers * maxProducts];
  }

  /**
   * Observed inside shares {@code units / market size}, with a zero-unit product counted as half
   * a unit.
   *
   * @param units per product (for a multi-week base, the mean over its weeks), not modified
   * @throws IllegalArgumentException when the shares do not leave room for the outside option
   */
  public static double[] observedShares(double[] units, double marketSize) {
    double[] s = new double[units.length];
    double sum = 0;
    for (int p = 0; p < units.length; p++) {
      double u = units[p] > 0 ? units[p] : 0.5;
      s[p] = u / marketSize;
      sum += s[p];
    }
    if (!(sum < 1)) {
      throw new IllegalArgumentException("inside shares sum to " + sum + " (market size "
          + marketSize + "): no outside option left");
    }
    return s;
  }

  /**
   * Mean utilities (price excluded) reproducing {@code observedShare} at the market's base prices
   * under {@code psi}.
   *
   * @param psi the store's heterogeneity draw, not modified
   * @param observedShare inside shares, each in (0, 1), summing below 1; not modified
   * @param deltaOut length J, modified
   * @return the inversion report (converged within {@link #TOLERANCE} or not)
   */
  public ShareInversion.Result invert(BaseMarket market, double[] psi, double[] observedShare,
      double[] deltaOut) {
    int r = market.shoppers();
    int j = market.products();
    if (observedShare.length != j || deltaOut.length < j) {
      throw new IllegalArgumentException("store " + market.storeId() + ": " + observedShare.length
          + " shares for " + j + " products");
    }
    Heterogeneity.shopperTastes(psi, market.kx(), market.nuView(), r, market.xView(), j, alpha, v);
    Heterogeneity.shopperUtility(r, j, alpha, v, market.priceView(), v);
    // plain-logit start: log(s_j / s_0) minus the shoppers' mean utility part
    double inside = 0;
    for (int p = 0; p < j; p++) {
      inside += observedShare[p];
    }
    double logS0 = Math.log(1 - inside);
    for (int p = 0; p < j; p++) {
      double mean = 0;
      for (int i = 0; i < r; i++) {
        mean += v[i * j + p];
      }
      deltaOut[p] = Math.log(observedShare[p]) - logS0 - mean / r;
    }
    return inversion.invert(r, j, v, observedShare, deltaOut, TOLERANCE, MAX_ITERATIONS);
  }
}
