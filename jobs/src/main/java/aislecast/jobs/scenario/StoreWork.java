package aislecast.jobs.scenario;

import aislecast.core.scenario.BaseMarket;
import java.io.Serializable;
import java.util.List;
import java.util.Set;

/**
 * Everything one store's scenario or recommendation task needs: its base period, shopper draws,
 * the selected posterior draws of its {@code psi}, and its resolved scenarios.
 *
 * @param storeId store
 * @param region its region
 * @param productIds base-period assortment
 * @param owners owner per product
 * @param kx number of attributes
 * @param x standardised attributes J x Kx (as in estimation)
 * @param price base prices
 * @param units base units (mean over the base weeks)
 * @param marketSize base market size (mean over the base weeks)
 * @param nu shopper draws R x (1 + Kx), the ones estimation used
 * @param shoppers R
 * @param portfolio the user's portfolio owners
 * @param chain posterior chain of each selected draw
 * @param draw posterior draw (within its chain) of each selected draw
 * @param psi psi per selected draw, D x Kpsi
 * @param scenarios resolved scenarios, the same names in the same order for every store
 * @param knownCost per product a known marginal cost (the user's own unit cost) or NaN to take it
 *     from the first-order conditions; null for all NaN
 */
public record StoreWork(String storeId, String region, String[] productIds, String[] owners,
    int kx, double[] x, double[] price, double[] units, double marketSize, double[] nu,
    int shoppers, List<String> portfolio, int[] chain, int[] draw, double[][] psi,
    List<StoreScenario> scenarios, double[] knownCost) implements Serializable {

  public int products() {
    return productIds.length;
  }

  public int draws() {
    return chain.length;
  }

  /** The core view of the base period (costs not known come from first-order conditions). */
  public BaseMarket market() {
    return new BaseMarket(storeId, productIds, owners, kx, x, price, marketSize, nu, shoppers,
        knownCost, Set.copyOf(portfolio));
  }

  /** Largest assortment of any scenario here (launches add products). */
  public int maxProducts() {
    int m = productIds.length;
    for (StoreScenario s : scenarios) {
      m = Math.max(m, productIds.length + s.launches().length);
    }
    return m;
  }

  /** Copy with other psi draws (used to attach the posterior on the executors). */
  public StoreWork withDraws(int[] chains, int[] draws, double[][] psiDraws) {
    return new StoreWork(storeId, region, productIds, owners, kx, x, price, units, marketSize,
        nu, shoppers, portfolio, chains, draws, psiDraws, scenarios, knownCost);
  }
}
