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
 * @param perDraw the portfolio's changes draw by draw (what the bands summarise), with each
 *     value's position in the draw list given to the recommender
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
    Bands[] unitsChange, PerDraw perDraw, int drawsUsed, int drawsDropped, int nonPositiveCosts, int evaluations,
    int rejectedCandidates, boolean converged, List<String> notes) {

  /**
   * The portfolio's changes at the recommended prices against current prices, one entry per
   * used draw (empty when no draw could be used).
   *
   * @param draw position of each used draw in the list of draws given to the recommender
   *     (draws whose costs could not be recovered are missing)
   * @param marginChange portfolio margin change per used draw
   * @param revenueChange portfolio revenue change per used draw
   * @param unitsChange portfolio units change (summed over its products) per used draw
   */
  public record PerDraw(int[] draw, double[] marginChange, double[] revenueChange,
      double[] unitsChange) {
    static final PerDraw NONE = new PerDraw(new int[0], new double[0], new double[0],
        new double[0]);

    public int size() {
      return draw.length;
    }
  }

  /** Percent change of each recommended price against current. */
  public double[] priceChangePercent() {
    double[] out = new double[productIds.length];
    for (int k = 0; k < out.length; k++) {
      out[k] = 100.0 * (recommendedPrice[k] / currentPrice[k] - 1.0);
    }
    return out;
  }
}
