package aislecast.core.equilibrium;

/**
 * Multi-product Bertrand-Nash prices by the zeta-markup fixed point of Morrow and Skerlos (2011,
 * Operations Research 59(2), "Fixed-point approaches to computing Bertrand-Nash equilibrium prices
 * under mixed-logit demand").
 *
 * <p>Derivation (our signs). With {@code P_rj} the shopper probabilities and {@code alpha_r > 0},
 * {@code ds_j/dp_k = -(1/R) sum_r alpha_r P_rj (1{j=k} - P_rk) = Gamma_jk - Lambda_jj 1{j=k}}
 * where {@code Lambda = diag((1/R) sum_r alpha_r P_rj)} and {@code Gamma_jk = (1/R) sum_r alpha_r
 * P_rj P_rk} (symmetric); so {@code ds/dp = Gamma - Lambda}. Firm f's profit is {@code sum_{j in
 * f} (p_j - c_j) s_j}; its first-order condition in the price of its product k is {@code s_k +
 * sum_{j in f} (p_j - c_j) ds_j/dp_k = 0}, i.e. with the ownership mask {@code H_kj = 1} when k
 * and j have the same owner:
 *
 * <pre>
 *   FOC = Lambda (p - c) - (H o Gamma)'(p - c) - s = 0
 *   p - c = zeta(p) = Lambda^-1 [ (H o Gamma)'(p - c) + s ]
 * </pre>
 *
 * (Morrow and Skerlos write {@code Lambda} with the utility's price derivative {@code -alpha},
 * which flips the sign in front of {@code s}.) The iteration is {@code p <- c + zeta(p)} on the
 * re-set ("free") products; the others keep their prices, but their markups still count in their
 * owner's profit. {@code (H o Gamma)'(p - c)} is formed per shopper from firm sums {@code g_rf =
 * sum_{k in f} P_rk (p_k - c_k)}, so an iteration costs O(R J) after the R J exponentials: the J x
 * J matrix {@code Gamma} is never built.
 *
 * <p>Convergence is checked at every iterate with the residual of {@link SolveInfo}. One instance
 * per thread: it owns its buffers; after a call, {@link #shares()}, {@link #probs()} and {@link
 * #outsideShare()} hold the market at the returned prices.
 */
public final class EquilibriumSolver {
  private final double[] shares;
  private final double[] probs;
  private final double[] lambda;
  private final double[] rho;
  private final double[] markup;
  private final double[] firmSum;
  private double outside;

  public EquilibriumSolver(int maxShoppers, int maxProducts) {
    this.shares = new double[maxProducts];
    this.probs = new double[maxShoppers * maxProducts];
    this.lambda = new double[maxProducts];
    this.rho = new double[maxProducts];
    this.markup = new double[maxProducts];
    this.firmSum = new double[maxProducts];
  }

  /** Shares at the last evaluated prices, length J of the last market; do not modify. */
  public double[] shares() {
    return shares;
  }

  /** Shopper probabilities R x J at the last evaluated prices; do not modify. */
  public double[] probs() {
    return probs;
  }

  public double outsideShare() {
    return outside;
  }

  /**
   * Evaluates the market at given prices (the {@code hold} response): shares and probabilities.
   *
   * @param price length J, not modified
   * @return the outside share
   */
  public double evaluate(MarketModel m, double[] price) {
    outside = m.shares(price, shares, probs);
    return outside;
  }

  /** {@link #solve(MarketModel, double[], boolean[], double[], EquilibriumSettings)} with defaults. */
  public SolveInfo solve(MarketModel m, double[] cost, boolean[] free, double[] price) {
    return solve(m, cost, free, price, EquilibriumSettings.defaults());
  }

  /**
   * Re-sets the prices of the free products to the Bertrand-Nash equilibrium given the others.
   *
   * @param m the market, not modified
   * @param cost marginal costs, length J, not modified
   * @param free which products re-set their price, length J, not modified
   * @param price modified: in, the starting prices (and the fixed prices of the other products);
   *     out, the last iterate (the equilibrium when converged)
   * @return convergence report; failures are reported, never thrown
   */
  public SolveInfo solve(MarketModel m, double[] cost, boolean[] free, double[] price,
      EquilibriumSettings settings) {
    final int j = m.products();
    boolean any = false;
    for (int p = 0; p < j; p++) {
      if (!Double.isFinite(price[p]) || !Double.isFinite(cost[p])) {
        evaluateQuietly(m, price);
        return new SolveInfo(false, 0, Double.NaN, Double.NaN,
            "product " + p + ": price " + price[p] + " or cost " + cost[p] + " is not finite");
      }
      any |= free[p];
    }
    if (!any) {
      evaluate(m, price);
      return SolveInfo.held();
    }
    int iterations = 0;
    while (true) {
      focTerms(m, price, cost);
      double res = 0.0;
      double absRes = 0.0;
      for (int p = 0; p < j; p++) {
        if (!free[p]) {
          continue;
        }
        if (!(lambda[p] > 0) || !(shares[p] > 0)) {
          return new SolveInfo(false, iterations, Double.NaN, Double.NaN,
              "share of product " + p + " vanished at price " + price[p]);
        }
        double foc = Math.abs(lambda[p] * markup[p] - rho[p] - shares[p]);
        absRes = Math.max(absRes, foc);
        res = Math.max(res, foc / shares[p]);
      }
      if (!Double.isFinite(res)) {
        return new SolveInfo(false, iterations, res, absRes, "non-finite first-order conditions");
      }
      if (res <= settings.tolerance()) {
        return new SolveInfo(true, iterations, res, absRes, null);
      }
      if (iterations >= settings.maxIterations()) {
        return new SolveInfo(false, iterations, res, absRes,
            "no convergence in " + iterations + " iterations (residual " + res + ")");
      }
      for (int p = 0; p < j; p++) {
        if (free[p]) {
          double zeta = (rho[p] + shares[p]) / lambda[p];
          price[p] = cost[p] + zeta;
        }
      }
      iterations++;
    }
  }

  private void evaluateQuietly(MarketModel m, double[] price) {
    java.util.Arrays.fill(shares, 0, m.products(), Double.NaN);
    outside = Double.NaN;
  }

  /**
   * First-order-condition residuals of every product at the given prices (free or not): {@code
   * FOC_j = Lambda_jj (p_j - c_j) - [(H o Gamma)'(p - c)]_j - s_j}. Also leaves the market at these
   * prices in {@link #shares()} and {@link #probs()}.
   *
   * @param focOut length J, modified
   */
  public void foc(MarketModel m, double[] price, double[] cost, double[] focOut) {
    focTerms(m, price, cost);
    for (int p = 0; p < m.products(); p++) {
      focOut[p] = lambda[p] * markup[p] - rho[p] - shares[p];
    }
  }

  /** Shares, probabilities, Lambda's diagonal and (H o Gamma)'(p - c) at {@code price}. */
  private void focTerms(MarketModel m, double[] price, double[] cost) {
    final int r = m.shoppers();
    final int j = m.products();
    final int f = m.firms();
    final int[] firm = m.firmIndex();
    final double[] alpha = m.alpha();
    for (int p = 0; p < j; p++) {
      markup[p] = price[p] - cost[p];
      shares[p] = 0.0;
      lambda[p] = 0.0;
      rho[p] = 0.0;
    }
    double out = 0.0;
    // one pass per shopper: probabilities, then its firm sums g_rf, then Lambda and rho terms
    for (int i = 0; i < r; i++) {
      int o = i * j;
      out += m.probabilities(i, price, probs, o);
      for (int q = 0; q < f; q++) {
        firmSum[q] = 0.0;
      }
      for (int p = 0; p < j; p++) {
        double pr = probs[o + p];
        shares[p] += pr;
        firmSum[firm[p]] += pr * markup[p];
      }
      double a = alpha[i];
      for (int p = 0; p < j; p++) {
        double ap = a * probs[o + p];
        lambda[p] += ap;
        rho[p] += ap * firmSum[firm[p]];
      }
    }
    double invR = 1.0 / r;
    outside = out * invR;
    for (int p = 0; p < j; p++) {
      shares[p] *= invR;
      lambda[p] *= invR;
      rho[p] *= invR;
    }
  }
}
