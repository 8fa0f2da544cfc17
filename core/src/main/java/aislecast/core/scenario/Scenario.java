package aislecast.core.scenario;

import java.util.HashSet;
import java.util.List;
import java.util.Set;

/**
 * A what-if for one store, resolved to product ids (selection by owner, attribute or region is
 * done by the caller before it gets here).
 *
 * @param name label carried into outputs
 * @param priceChanges direct price changes (held under either response)
 * @param delist products removed from the shelf
 * @param launches new products
 * @param response how the other products respond
 */
public record Scenario(String name, List<PriceChange> priceChanges, List<String> delist,
    List<Launch> launches, Response response) {

  public Scenario {
    if (name == null || name.isEmpty()) {
      throw new IllegalArgumentException("a scenario needs a name");
    }
    if (response == null) {
      throw new IllegalArgumentException("scenario " + name + ": no competitor response");
    }
    priceChanges = List.copyOf(priceChanges == null ? List.of() : priceChanges);
    delist = List.copyOf(delist == null ? List.of() : delist);
    launches = List.copyOf(launches == null ? List.of() : launches);
    Set<String> seen = new HashSet<>();
    for (PriceChange c : priceChanges) {
      if (!seen.add(c.productId())) {
        throw new IllegalArgumentException(
            "scenario " + name + ": two price changes on " + c.productId());
      }
    }
    for (String d : delist) {
      if (seen.contains(d)) {
        throw new IllegalArgumentException(
            "scenario " + name + ": " + d + " is both repriced and delisted");
      }
    }
    Set<String> launched = new HashSet<>();
    for (Launch l : launches) {
      if (!launched.add(l.productId())) {
        throw new IllegalArgumentException(
            "scenario " + name + ": " + l.productId() + " launched twice");
      }
    }
  }

  /** The base itself: no change, the given response. */
  public static Scenario none(String name, Response response) {
    return new Scenario(name, List.of(), List.of(), List.of(), response);
  }
}
