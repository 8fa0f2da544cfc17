package aislecast.jobs.scenario;

import aislecast.core.scenario.Launch;
import aislecast.core.scenario.PriceChange;
import aislecast.core.scenario.Response;
import aislecast.core.scenario.Scenario;
import java.io.Serializable;
import java.util.ArrayList;
import java.util.List;

/**
 * One scenario resolved to one store's product ids (the serialisable form shipped to executors;
 * {@link #toCore()} gives the core {@link Scenario}).
 *
 * @param name output name ({@code <file name>-<response>})
 * @param response hold or nash
 * @param changeIds products with a direct price change
 * @param changeKinds their {@link PriceChange.Kind} ordinals
 * @param changeAmounts their amounts
 * @param delist delisted products
 * @param launches launches that apply in this store
 */
public record StoreScenario(String name, Response response, String[] changeIds,
    int[] changeKinds, double[] changeAmounts, String[] delist, LaunchData[] launches)
    implements Serializable {

  /** A launch in this store: standardised attributes, price, like product, shift and cost. */
  public record LaunchData(String productId, String owner, double[] x, double price,
      String like, double utilityShift, double cost) implements Serializable {}

  public Scenario toCore() {
    List<PriceChange> changes = new ArrayList<>();
    PriceChange.Kind[] kinds = PriceChange.Kind.values();
    for (int i = 0; i < changeIds.length; i++) {
      changes.add(new PriceChange(changeIds[i], kinds[changeKinds[i]], changeAmounts[i]));
    }
    List<Launch> ls = new ArrayList<>();
    for (LaunchData l : launches) {
      ls.add(new Launch(l.productId(), l.owner(), l.x(), l.price(), l.like(), l.utilityShift(),
          Double.NaN, l.cost()));
    }
    return new Scenario(name, changes, List.of(delist), ls, response);
  }
}
