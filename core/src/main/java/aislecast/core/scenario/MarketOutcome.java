package aislecast.core.scenario;

import java.util.Set;

/**
 * A market at one set of prices, for one store and posterior draw: per product, per owner and for
 * the user's portfolio. Units are {@code share x market size}; revenue {@code price x units};
 * margin {@code (price - cost) x units} (NaN when the cost is unknown).
 *
 * @param productIds the assortment, J
 * @param owners owner per product
 * @param price per product
 * @param cost marginal cost per product (from the base first-order conditions or known)
 * @param share per product
 * @param units per product
 * @param revenue per product
 * @param margin per product
 * @param outsideShare share of shoppers buying none of the products
 * @param ownerNames owners, in output order (may include owners with no product here)
 * @param ownerShare summed over each owner's products
 * @param ownerUnits summed
 * @param ownerRevenue summed
 * @param ownerMargin summed
 * @param portfolioShare summed over the portfolio's products
 * @param portfolioUnits summed
 * @param portfolioRevenue summed
 * @param portfolioMargin summed
 * @param elasticity J x J, row j = share j responding to price k, {@code (ds_j/dp_k) p_k / s_j};
 *     null when not requested
 * @param diversion J x (J + 1), row j: fraction of j's lost sales going to each product, last
 *     column the outside option; null when not requested
 */
public record MarketOutcome(
    String[] productIds,
    String[] owners,
    double[] price,
    double[] cost,
    double[] share,
    double[] units,
    double[] revenue,
    double[] margin,
    double outsideShare,
    String[] ownerNames,
    double[] ownerShare,
    double[] ownerUnits,
    double[] ownerRevenue,
    double[] ownerMargin,
    double portfolioShare,
    double portfolioUnits,
    double portfolioRevenue,
    double portfolioMargin,
    double[] elasticity,
    double[] diversion) {

  /** Builds the per-product figures and their sums; copies every array it is given. */
  static MarketOutcome of(int j, String[] productIds, String[] owners, int[] firm,
      String[] ownerNames, Set<String> portfolio, double[] price, double[] cost, double[] share,
      double outsideShare, double marketSize, double[] elasticity, double[] diversion) {
    double[] units = new double[j];
    double[] revenue = new double[j];
    double[] margin = new double[j];
    int f = ownerNames.length;
    double[] oShare = new double[f];
    double[] oUnits = new double[f];
    double[] oRevenue = new double[f];
    double[] oMargin = new double[f];
    double pShare = 0;
    double pUnits = 0;
    double pRevenue = 0;
    double pMargin = 0;
    for (int p = 0; p < j; p++) {
      units[p] = share[p] * marketSize;
      revenue[p] = price[p] * units[p];
      margin[p] = (price[p] - cost[p]) * units[p];
      int o = firm[p];
      oShare[o] += share[p];
      oUnits[o] += units[p];
      oRevenue[o] += revenue[p];
      oMargin[o] += margin[p];
      if (portfolio.contains(owners[p])) {
        pShare += share[p];
        pUnits += units[p];
        pRevenue += revenue[p];
        pMargin += margin[p];
      }
    }
    return new MarketOutcome(java.util.Arrays.copyOf(productIds, j),
        java.util.Arrays.copyOf(owners, j), java.util.Arrays.copyOf(price, j),
        java.util.Arrays.copyOf(cost, j), java.util.Arrays.copyOf(share, j), units, revenue,
        margin, outsideShare, ownerNames.clone(), oShare, oUnits, oRevenue, oMargin, pShare,
        pUnits, pRevenue, pMargin, elasticity, diversion);
  }

  public int products() {
    return productIds.length;
  }

  /** Index of a product in this outcome, or -1. */
  public int indexOf(String productId) {
    for (int p = 0; p < productIds.length; p++) {
      if (productIds[p].equals(productId)) {
        return p;
      }
    }
    return -1;
  }

  /** Index of an owner in this outcome, or -1. */
  public int ownerIndex(String owner) {
    for (int o = 0; o < ownerNames.length; o++) {
      if (ownerNames[o].equals(owner)) {
        return o;
      }
    }
    return -1;
  }
}
