package aislecast.core.scenario;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashMap;
import java.util.HashSet;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;

/**
 * One store's base period as the scenario maths needs it: the stocked products, their owners and
 * standardised attributes, base prices (latest week or mean of the last n weeks: the caller's
 * choice), the market size, the store's shopper draws and the user's portfolio. Posterior
 * quantities (psi, mean utilities) come per draw, separately.
 *
 * <p>Owners are numbered by first appearance; that order is the owner order of every output.
 */
public final class BaseMarket {
  private final String storeId;
  private final String[] productIds;
  private final String[] owners;
  private final int kx;
  private final double[] x;
  private final double[] price;
  private final double marketSize;
  private final double[] nu;
  private final int shoppers;
  private final double[] knownCost;
  private final Set<String> portfolioOwners;
  private final String[] ownerNames;
  private final int[] firm;
  private final Map<String, Integer> index = new HashMap<>();

  /**
   * @param storeId store
   * @param productIds stocked products, J; not modified
   * @param owners owner of each product; not modified
   * @param kx number of attributes
   * @param x standardised attributes J x Kx; not modified
   * @param price base prices, > 0; not modified
   * @param marketSize shoppers in the base period (units = share x market size)
   * @param nu shopper draws R x (1 + Kx); not modified
   * @param shoppers R
   * @param knownCost per product a known marginal cost (e.g. the user's own unit costs) or NaN to
   *     take it from the first-order conditions; null for all NaN
   * @param portfolioOwners owners whose products form the user's portfolio
   */
  public BaseMarket(String storeId, String[] productIds, String[] owners, int kx, double[] x,
      double[] price, double marketSize, double[] nu, int shoppers, double[] knownCost,
      Set<String> portfolioOwners) {
    int j = productIds.length;
    List<String> problems = new ArrayList<>();
    if (j == 0) {
      problems.add("no products");
    }
    if (owners.length != j || price.length != j || x.length != j * kx
        || (knownCost != null && knownCost.length != j)) {
      problems.add("product arrays disagree in size");
    }
    if (shoppers < 1 || nu.length != shoppers * (1 + kx)) {
      problems.add("shopper draws are not " + shoppers + " x " + (1 + kx));
    }
    if (!(marketSize > 0) || !Double.isFinite(marketSize)) {
      problems.add("market size must be > 0, got " + marketSize);
    }
    if (problems.isEmpty()) {
      Set<String> seen = new HashSet<>();
      for (int p = 0; p < j; p++) {
        if (!seen.add(productIds[p])) {
          problems.add("product " + productIds[p] + " listed twice");
        }
        if (!(price[p] > 0) || !Double.isFinite(price[p])) {
          problems.add("product " + productIds[p] + ": base price " + price[p]);
        }
        if (owners[p] == null || owners[p].isEmpty()) {
          problems.add("product " + productIds[p] + ": no owner");
        }
        for (int k = 0; k < kx; k++) {
          if (!Double.isFinite(x[p * kx + k])) {
            problems.add("product " + productIds[p] + ": attribute " + x[p * kx + k]);
          }
        }
        if (knownCost != null && Double.isInfinite(knownCost[p])) {
          problems.add("product " + productIds[p] + ": known cost " + knownCost[p]);
        }
      }
      for (double v : nu) {
        if (!Double.isFinite(v)) {
          problems.add("shopper draws contain " + v);
          break;
        }
      }
    }
    if (!problems.isEmpty()) {
      throw new IllegalArgumentException("store " + storeId + ": " + String.join("; ", problems));
    }
    this.storeId = storeId;
    this.productIds = productIds.clone();
    this.owners = owners.clone();
    this.kx = kx;
    this.x = x.clone();
    this.price = price.clone();
    this.marketSize = marketSize;
    this.nu = nu.clone();
    this.shoppers = shoppers;
    this.knownCost = knownCost == null ? null : knownCost.clone();
    this.portfolioOwners = Set.copyOf(portfolioOwners);
    Map<String, Integer> ownerIndex = new LinkedHashMap<>();
    this.firm = new int[j];
    for (int p = 0; p < j; p++) {
      firm[p] = ownerIndex.computeIfAbsent(owners[p], o -> ownerIndex.size());
      index.put(productIds[p], p);
    }
    this.ownerNames = ownerIndex.keySet().toArray(new String[0]);
  }

  public String storeId() {
    return storeId;
  }

  public int products() {
    return productIds.length;
  }

  public int kx() {
    return kx;
  }

  public int shoppers() {
    return shoppers;
  }

  public double marketSize() {
    return marketSize;
  }

  public String productId(int p) {
    return productIds[p];
  }

  public String owner(int p) {
    return owners[p];
  }

  /** Index of a stocked product, or -1. */
  public int indexOf(String productId) {
    Integer i = index.get(productId);
    return i == null ? -1 : i;
  }

  public double price(int p) {
    return price[p];
  }

  /** Base prices; a copy. */
  public double[] prices() {
    return price.clone();
  }

  /** Known cost of product p, or NaN when it comes from the first-order conditions. */
  public double knownCost(int p) {
    return knownCost == null ? Double.NaN : knownCost[p];
  }

  public boolean inPortfolio(String owner) {
    return portfolioOwners.contains(owner);
  }

  public Set<String> portfolioOwners() {
    return portfolioOwners;
  }

  /** Distinct owners in order of first appearance; a copy. */
  public String[] ownerNames() {
    return ownerNames.clone();
  }

  // shared read-only views for the evaluators in this package
  String[] productIdsView() {
    return productIds;
  }

  String[] ownersView() {
    return owners;
  }

  double[] xView() {
    return x;
  }

  double[] priceView() {
    return price;
  }

  double[] nuView() {
    return nu;
  }

  int[] firmView() {
    return firm;
  }

  @Override
  public String toString() {
    return "BaseMarket[" + storeId + ", " + Arrays.toString(productIds) + "]";
  }
}
