package aislecast.core.scenario;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * A scenario resolved against one store: the scenario's assortment (base products minus
 * delistings, then launches in order), each product's owner, attributes and scenario price, and
 * which prices are fixed (changed directly or launched) as opposed to free to respond. Built once
 * per (store, scenario), used for every posterior draw.
 *
 * <p>References to products the store does not stock (a price change or delisting) are ignored
 * and listed in {@link #notes()}; contradictions (a launch that is already stocked, a "like"
 * product the store lacks, a non-positive price, an empty shelf) are errors.
 */
public final class ScenarioPlan {
  final BaseMarket market;
  final Scenario scenario;
  final int j;
  final String[] ids;
  final String[] owners;
  final int[] firm;
  final String[] ownerNames;
  final double[] x;
  final double[] price;
  final boolean[] fixed;
  /** Base index of each scenario product, or -(l + 1) for launch l. */
  final int[] source;
  /** Per launch, the base index of its like product, or -1. */
  final int[] likeIndex;
  private final List<String> notes;

  private ScenarioPlan(BaseMarket market, Scenario scenario, List<Integer> kept,
      List<String> notes) {
    this.market = market;
    this.scenario = scenario;
    this.notes = List.copyOf(notes);
    int kx = market.kx();
    List<Launch> launches = scenario.launches();
    j = kept.size() + launches.size();
    ids = new String[j];
    owners = new String[j];
    firm = new int[j];
    x = new double[j * kx];
    price = new double[j];
    fixed = new boolean[j];
    source = new int[j];
    likeIndex = new int[launches.size()];
    Map<String, Integer> ownerIndex = new LinkedHashMap<>();
    for (String o : market.ownerNames()) {
      ownerIndex.put(o, ownerIndex.size());
    }
    Map<String, PriceChange> changes = new HashMap<>();
    for (PriceChange c : scenario.priceChanges()) {
      changes.put(c.productId(), c);
    }
    int q = 0;
    for (int b : kept) {
      ids[q] = market.productId(b);
      owners[q] = market.owner(b);
      System.arraycopy(market.xView(), b * kx, x, q * kx, kx);
      PriceChange c = changes.get(ids[q]);
      price[q] = c == null ? market.price(b) : c.apply(market.price(b));
      fixed[q] = c != null;
      source[q] = b;
      q++;
    }
    for (int l = 0; l < launches.size(); l++) {
      Launch launch = launches.get(l);
      ids[q] = launch.productId();
      owners[q] = launch.owner();
      System.arraycopy(launch.x(), 0, x, q * kx, kx);
      price[q] = launch.price();
      fixed[q] = true;
      source[q] = -(l + 1);
      likeIndex[l] = launch.likeProductId() == null ? -1 : market.indexOf(launch.likeProductId());
      q++;
    }
    for (int p = 0; p < j; p++) {
      firm[p] = ownerIndex.computeIfAbsent(owners[p], o -> ownerIndex.size());
    }
    ownerNames = ownerIndex.keySet().toArray(new String[0]);
  }

  /**
   * Resolves {@code scenario} against {@code market}.
   *
   * @throws IllegalArgumentException with a message naming the store and scenario when the
   *     scenario cannot apply to this store
   */
  public static ScenarioPlan of(BaseMarket market, Scenario scenario) {
    String where = "store " + market.storeId() + ", scenario " + scenario.name() + ": ";
    List<String> notes = new ArrayList<>();
    boolean[] delisted = new boolean[market.products()];
    for (String d : scenario.delist()) {
      int b = market.indexOf(d);
      if (b < 0) {
        notes.add("delisting of " + d + " ignored: not stocked in store " + market.storeId());
      } else {
        delisted[b] = true;
      }
    }
    for (PriceChange c : scenario.priceChanges()) {
      int b = market.indexOf(c.productId());
      if (b < 0) {
        notes.add("price change on " + c.productId() + " ignored: not stocked in store "
            + market.storeId());
        continue;
      }
      double p = c.apply(market.price(b));
      if (!(p > 0) || !Double.isFinite(p)) {
        throw new IllegalArgumentException(where + "price change on " + c.productId()
            + " gives price " + p + " (base " + market.price(b) + ")");
      }
    }
    for (Launch l : scenario.launches()) {
      if (market.indexOf(l.productId()) >= 0) {
        throw new IllegalArgumentException(where + "launch " + l.productId() + " is already stocked");
      }
      if (l.x().length != market.kx()) {
        throw new IllegalArgumentException(where + "launch " + l.productId() + " has "
            + l.x().length + " attributes, the model has " + market.kx());
      }
      if (l.likeProductId() != null) {
        int b = market.indexOf(l.likeProductId());
        if (b < 0) {
          throw new IllegalArgumentException(where + "launch " + l.productId() + " is like "
              + l.likeProductId() + ", which this store does not stock");
        }
        if (delisted[b] && (Double.isNaN(l.delta()) || Double.isNaN(l.cost()))) {
          notes.add("launch " + l.productId() + " takes utility or cost from delisted "
              + l.likeProductId() + " (its base values)");
        }
      }
    }
    List<Integer> kept = new ArrayList<>();
    for (int b = 0; b < market.products(); b++) {
      if (!delisted[b]) {
        kept.add(b);
      }
    }
    if (kept.isEmpty() && scenario.launches().isEmpty()) {
      throw new IllegalArgumentException(where + "every product is delisted");
    }
    return new ScenarioPlan(market, scenario, kept, notes);
  }

  public BaseMarket market() {
    return market;
  }

  public Scenario scenario() {
    return scenario;
  }

  /** Products in the scenario's assortment. */
  public int products() {
    return j;
  }

  public String productId(int p) {
    return ids[p];
  }

  /** Scenario price before any response (changed, launched or base). */
  public double plannedPrice(int p) {
    return price[p];
  }

  /** Whether product p keeps its planned price under {@code nash}. */
  public boolean fixed(int p) {
    return fixed[p];
  }

  /** Owners of the scenario: the store's, then new ones from launches; a copy. */
  public String[] ownerNames() {
    return ownerNames.clone();
  }

  /** Ignored references, for the caller's notes table. */
  public List<String> notes() {
    return notes;
  }

  @Override
  public String toString() {
    return "ScenarioPlan[" + market.storeId() + "/" + scenario.name() + ", " + Arrays.toString(ids)
        + "]";
  }
}
