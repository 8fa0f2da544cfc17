package aislecast.core.scenario;

import java.util.List;

/**
 * Recommended portfolio prices for one store.
 *
 * @param storeId store
 * @param productIds the portfolio's products in the store, K
 * @param currentPrice per product
 * @param recommendedPrice per product
 * @param lower guard-rail per product: max(current x (1 - max move), cost floor)
 * @param upper guard-rail per product: current x (1 + max move)
 * @param costFloor the cost quantile prices never go below
 * @param meanCost posterior mean of each product's marginal cost over the used draws
 * @param objectiveCurrent objective (mean or quantile of portfolio margin) at current prices
 * @param objectiveRecommended objective at the recommended prices
 * @param marginChange per-draw change of portfolio margin, recommended minus current
 * @param revenueChange per-draw change of portfolio revenue
 * @param unitsChange per product, per-draw change of its units
 * @param drawsUsed draws in the objective
 * @param drawsDropped draws whose costs could not be recovered (left out, counted here)
 * @param nonPositiveCosts first-order-condition costs <= 0, summed over products and used draws
 * @param evaluations objective evaluations made
 * @param rejectedCandidates candidate prices dropped because an equilibrium failed in some draw
 * @param converged the search ended on its step-size rule rather than the evaluation cap
 * @param notes anything the caller should report (infeasible guard-rails, failures)
 */
public record Recommendation(String storeId, String[] productIds, double[] currentPrice,
    double[] recommendedPrice, double[] lower, double[] upper, double[] costFloor,
    double[] meanCost,
    double objectiveCurrent, double objectiveRecommended, Bands marginChange, Bands revenueChange,
    Bands[] unitsChange, int drawsUsed, int drawsDropped, int nonPositiveCosts, int evaluations,
    int rejectedCandidates, boolean converged, List<String> notes) {

  /** Percent change of each recommended price against current. */
  public double[] priceChangePercent() {
    double[] out = new double[productIds.length];
    for (int k = 0; k < out.length; k++) {
      out[k] = 100.0 * (recommendedPrice[k] / currentPrice[k] - 1.0);
    }
    return out;
  }
}
