package aislecast.core.equilibrium;

import aislecast.core.demand.Heterogeneity;

/**
 * One market's demand as a function of prices, for pricing work: R shoppers with price
 * sensitivities {@code alpha_r}, price-free utilities {@code delta_j + mu_rj} and the firm that
 * owns each product.
 *
 * <p>Shopper r buys product j with probability {@code P_rj = exp(u_rj) / (1 + sum_k exp(u_rk))},
 * {@code u_rj = delta_j + mu_rj - alpha_r p_j} (DESIGN section 4), and {@code s_j = (1/R) sum_r
 * P_rj}; this is the same model as {@link aislecast.core.demand.ShareKernel} with {@code v_rj =
 * mu_rj - alpha_r p_j}.
 *
 * <p>A reusable workspace: one instance per thread, sized once for the largest market, reloaded
 * per (store, posterior draw, assortment) with {@link #load} or {@link #loadTastes}. Arrays are
 * flat and row-major (R x J); nothing is allocated after construction.
 */
public final class MarketModel {
  private final int maxShoppers;
  private final int maxProducts;
  private final double[] alpha;
  private final double[] mu;
  private final double[] base;
  private final double[] delta;
  private final int[] firm;
  private final double[] row;
  private int r;
  private int j;
  private int firms;

  public MarketModel(int maxShoppers, int maxProducts) {
    if (maxShoppers < 1 || maxProducts < 1) {
      throw new IllegalArgumentException("need at least one shopper and one product");
    }
    this.maxShoppers = maxShoppers;
    this.maxProducts = maxProducts;
    this.alpha = new double[maxShoppers];
    this.mu = new double[maxShoppers * maxProducts];
    this.base = new double[maxShoppers * maxProducts];
    this.delta = new double[maxProducts];
    this.firm = new int[maxProducts];
    this.row = new double[maxProducts];
  }

  /**
   * Loads a market from a store's heterogeneity draw.
   *
   * @param psi heterogeneity vector (layout in {@link Heterogeneity}), not modified
   * @param kx number of attributes
   * @param nu shopper draws R x (1 + Kx), not modified
   * @param shoppers R
   * @param x standardised attributes J x Kx of this market's products, not modified
   * @param products J
   * @param delta mean utilities (price excluded), length J, not modified
   * @param firm owner of each product as 0..F-1 (F at most the workspace's product capacity; a
   *     firm may have no product here), length J, not modified
   */
  public void load(double[] psi, int kx, double[] nu, int shoppers, double[] x, int products,
      double[] delta, int[] firm) {
    checkSize(shoppers, products);
    Heterogeneity.shopperTastes(psi, kx, nu, shoppers, x, products, alpha, mu);
    finishLoad(shoppers, products, delta, firm);
  }

  /**
   * Loads a market from given tastes (e.g. plain logit: equal alphas and mu = 0).
   *
   * @param alpha price sensitivities, length R, not modified
   * @param mu attribute part of utility R x J, not modified
   */
  public void loadTastes(int shoppers, int products, double[] alpha, double[] mu, double[] delta,
      int[] firm) {
    checkSize(shoppers, products);
    System.arraycopy(alpha, 0, this.alpha, 0, shoppers);
    System.arraycopy(mu, 0, this.mu, 0, shoppers * products);
    finishLoad(shoppers, products, delta, firm);
  }

  private void checkSize(int shoppers, int products) {
    if (shoppers < 1 || shoppers > maxShoppers || products < 1 || products > maxProducts) {
      throw new IllegalArgumentException("market of " + shoppers + " shoppers x " + products
          + " products does not fit this workspace (" + maxShoppers + " x " + maxProducts + ")");
    }
  }

  private void finishLoad(int shoppers, int products, double[] delta, int[] firm) {
    int f = 0;
    for (int p = 0; p < products; p++) {
      if (firm[p] < 0 || firm[p] >= maxProducts) {
        throw new IllegalArgumentException("firm index " + firm[p] + " of product " + p
            + " is not in 0.." + (maxProducts - 1));
      }
      if (!Double.isFinite(delta[p])) {
        throw new IllegalArgumentException("mean utility of product " + p + " is " + delta[p]);
      }
      f = Math.max(f, firm[p] + 1);
    }
    for (int i = 0; i < shoppers; i++) {
      if (!(alpha[i] > 0) || !Double.isFinite(alpha[i])) {
        throw new IllegalArgumentException("price sensitivity of shopper " + i + " is " + alpha[i]);
      }
    }
    this.r = shoppers;
    this.j = products;
    this.firms = f;
    System.arraycopy(delta, 0, this.delta, 0, products);
    System.arraycopy(firm, 0, this.firm, 0, products);
    for (int i = 0; i < shoppers; i++) {
      int o = i * products;
      for (int p = 0; p < products; p++) {
        base[o + p] = delta[p] + mu[o + p];
      }
    }
  }

  public int shoppers() {
    return r;
  }

  public int products() {
    return j;
  }

  /** Number of firms: one more than the largest firm index. */
  public int firms() {
    return firms;
  }

  public int firm(int p) {
    return firm[p];
  }

  /** Price sensitivities, length R; do not modify. */
  public double[] alpha() {
    return alpha;
  }

  /** Firm of each product, length J; do not modify. */
  public int[] firmIndex() {
    return firm;
  }

  public double delta(int p) {
    return delta[p];
  }

  /**
   * Shopper utility parts {@code v_rj = mu_rj - alpha_r p_j} in the form {@link
   * aislecast.core.demand.ShareKernel} takes them.
   *
   * @param vOut R x J, modified
   */
  public void shopperUtility(double[] price, double[] vOut) {
    Heterogeneity.shopperUtility(r, j, alpha, mu, price, vOut);
  }

  /** Copies the mean utilities into {@code out} (length J). */
  public void delta(double[] out) {
    System.arraycopy(delta, 0, out, 0, j);
  }

  /** Price-free utilities {@code delta_j + mu_rj}, R x J; for the solvers of this package. */
  double[] baseUtility() {
    return base;
  }

  /**
   * Shares at the given prices. Each shopper's row is exponentiated directly (the outside option's
   * 1 keeps the denominator >= 1, so underflow only loses probabilities below 1e-308); a row that
   * overflows is redone with its maximum factored out ({@link #probabilities}), so any utility
   * works.
   *
   * @param price length J, not modified
   * @param sharesOut length J, modified
   * @param probsOut R x J shopper probabilities, modified; may be null
   * @return the outside share
   */
  public double shares(double[] price, double[] sharesOut, double[] probsOut) {
    final int jj = j;
    final double[] e = row;
    for (int p = 0; p < jj; p++) {
      sharesOut[p] = 0.0;
    }
    double outside = 0.0;
    for (int i = 0; i < r; i++) {
      int o = i * jj;
      double[] out = probsOut != null ? probsOut : e;
      int off = probsOut != null ? o : 0;
      double p0 = probabilities(i, price, out, off);
      for (int p = 0; p < jj; p++) {
        sharesOut[p] += out[off + p];
      }
      outside += p0;
    }
    double invR = 1.0 / r;
    for (int p = 0; p < jj; p++) {
      sharesOut[p] *= invR;
    }
    return outside * invR;
  }

  /**
   * Shopper i's choice probabilities at {@code price}.
   *
   * @param probOut modified at {@code off .. off + J - 1}
   * @return the shopper's outside-option probability
   */
  double probabilities(int i, double[] price, double[] probOut, int off) {
    final int jj = j;
    final int o = i * jj;
    final double a = alpha[i];
    double den = 1.0;
    for (int p = 0; p < jj; p++) {
      double ex = Math.exp(base[o + p] - a * price[p]);
      probOut[off + p] = ex;
      den += ex;
    }
    if (den < Double.POSITIVE_INFINITY) {
      double inv = 1.0 / den;
      for (int p = 0; p < jj; p++) {
        probOut[off + p] *= inv;
      }
      return inv;
    }
    // overflow (or NaN): factor out m = max(0, max_j u_ij)
    double m = 0.0;
    for (int p = 0; p < jj; p++) {
      m = Math.max(m, base[o + p] - a * price[p]);
    }
    double e0 = Math.exp(-m);
    den = e0;
    for (int p = 0; p < jj; p++) {
      double ex = Math.exp(base[o + p] - a * price[p] - m);
      probOut[off + p] = ex;
      den += ex;
    }
    double inv = 1.0 / den;
    for (int p = 0; p < jj; p++) {
      probOut[off + p] *= inv;
    }
    return e0 * inv;
  }
}
