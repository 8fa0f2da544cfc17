package aislecast.core.scenario;

import aislecast.core.equilibrium.MarginalCosts;

/**
 * A store's base period under one posterior draw: the draw's inputs, the marginal costs recovered
 * at base prices, and the base outcome. Shared by every scenario of that (store, draw).
 *
 * @param market the store
 * @param psi heterogeneity draw (copied)
 * @param delta base mean utilities of the store's products (copied)
 * @param cost marginal costs: known ones as given, the others from the first-order conditions
 *     (NaN when those could not be solved)
 * @param costNonPositive which first-order-condition costs are <= 0 (reported, never clipped)
 * @param costInfo the cost solve's report
 * @param outcome the base market
 */
public record BaseDraw(BaseMarket market, double[] psi, double[] delta, double[] cost,
    boolean[] costNonPositive, MarginalCosts.Info costInfo, MarketOutcome outcome) {

  /** Number of products whose first-order-condition cost is <= 0. */
  public int nonPositiveCosts() {
    int n = 0;
    for (boolean b : costNonPositive) {
      n += b ? 1 : 0;
    }
    return n;
  }
}
