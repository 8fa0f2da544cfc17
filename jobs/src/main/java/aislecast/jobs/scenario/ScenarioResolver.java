package aislecast.jobs.scenario;

import aislecast.core.model.ProductCatalog;
import aislecast.core.scenario.BaseMarket;
import aislecast.core.scenario.PriceChange;
import aislecast.core.scenario.Response;
import aislecast.core.scenario.ScenarioPlan;
import aislecast.jobs.config.ConfigException;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashMap;
import java.util.HashSet;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Set;
import java.util.TreeSet;

/**
 * Resolves the scenario file's selections (products, owners, attribute values, regions, stores,
 * top seller) into per-store scenarios of product ids, on the driver, and checks each against its
 * store (a launch's like product stocked, no empty shelf) before any Spark task runs. References
 * to unknown products, owners, attributes, regions or stores are configuration errors; an entry
 * that selects nothing stocked is a note.
 */
final class ScenarioResolver {
  private final ScenarioFile.Resolved file;
  private final ProductCatalog catalog;
  private final List<StoreWork> stores;
  private final Set<String> owners = new HashSet<>();
  private final Set<String> regions = new HashSet<>();
  private final Set<String> storeIds = new HashSet<>();
  private final Map<String, Integer> attribute = new HashMap<>();
  private final List<String> notes = new ArrayList<>();

  private ScenarioResolver(ScenarioFile.Resolved file, ProductCatalog catalog,
      List<StoreWork> stores) {
    this.file = file;
    this.catalog = catalog;
    this.stores = stores;
    for (int p = 0; p < catalog.size(); p++) {
      owners.add(catalog.owner(p));
    }
    for (StoreWork s : stores) {
      regions.add(s.region());
      storeIds.add(s.storeId());
    }
    String[] names = catalog.attributeNames();
    for (int k = 0; k < names.length; k++) {
      attribute.put(names[k], k);
    }
  }

  /** The result: stores with their scenarios attached, and notes for the user. */
  record Result(List<StoreWork> stores, List<String> scenarioNames, List<String> notes) {}

  static Result resolve(ScenarioFile.Resolved file, ProductCatalog catalog,
      List<StoreWork> stores) {
    return new ScenarioResolver(file, catalog, stores).run();
  }

  private Result run() {
    for (String o : file.portfolio()) {
      if (!owners.contains(o)) {
        throw new ConfigException("settings.portfolio: owner '" + o + "' owns no product in the"
            + " input (owners: " + new TreeSet<>(owners) + ")");
      }
    }
    List<String> names = new ArrayList<>();
    Map<String, List<StoreScenario>> perStore = new LinkedHashMap<>();
    for (StoreWork s : stores) {
      perStore.put(s.storeId(), new ArrayList<>());
    }
    for (ScenarioFile.Spec spec : file.scenarios()) {
      for (String r : spec.responseList()) {
        String name = spec.name() + "-" + r;
        names.add(name);
        Response response = Response.valueOf(r.toUpperCase(Locale.ROOT));
        Map<String, StoreScenario> byStore = resolveOne(spec, name, response);
        for (StoreWork s : stores) {
          perStore.get(s.storeId()).add(byStore.get(s.storeId()));
        }
      }
    }
    List<StoreWork> out = new ArrayList<>();
    for (StoreWork s : stores) {
      StoreWork w = new StoreWork(s.storeId(), s.region(), s.productIds(), s.owners(), s.kx(),
          s.x(), s.price(), s.units(), s.marketSize(), s.nu(), s.shoppers(), s.portfolio(),
          s.chain(), s.draw(), s.psi(), List.copyOf(perStore.get(s.storeId())), s.knownCost());
      BaseMarket market = w.market();
      for (StoreScenario sc : w.scenarios()) {
        try {
          notes.addAll(ScenarioPlan.of(market, sc.toCore()).notes());
        } catch (IllegalArgumentException e) {
          throw new ConfigException("scenario files " + String.join(", ", file.sources())
              + ": " + e.getMessage());
        }
      }
      out.add(w);
    }
    return new Result(out, names, notes);
  }

  private Map<String, StoreScenario> resolveOne(ScenarioFile.Spec spec, String name,
      Response response) {
    String where = "scenario " + spec.name() + ": ";
    Map<String, Map<String, PriceChange>> changes = new HashMap<>();
    for (ScenarioFile.Change c : spec.changes()) {
      PriceChange.Kind kind = c.percent() != null ? PriceChange.Kind.PERCENT
          : c.add() != null ? PriceChange.Kind.ABSOLUTE : PriceChange.Kind.SET;
      double amount = c.percent() != null ? c.percent() : c.add() != null ? c.add() : c.setTo();
      Map<String, Set<String>> hit = select(c.select(), where + "price change: ");
      for (Map.Entry<String, Set<String>> e : hit.entrySet()) {
        Map<String, PriceChange> m = changes.computeIfAbsent(e.getKey(), k -> new HashMap<>());
        for (String p : e.getValue()) {
          if (m.put(p, new PriceChange(p, kind, amount)) != null) {
            throw new ConfigException(where + "two price changes select " + p + " in store "
                + e.getKey());
          }
        }
      }
    }
    Map<String, Set<String>> delisted = new HashMap<>();
    for (ScenarioFile.Select d : spec.delistings()) {
      for (Map.Entry<String, Set<String>> e : select(d, where + "delist: ").entrySet()) {
        delisted.computeIfAbsent(e.getKey(), k -> new HashSet<>()).addAll(e.getValue());
      }
    }
    Map<String, List<StoreScenario.LaunchData>> launches = new HashMap<>();
    for (ScenarioFile.Launch l : spec.launchList()) {
      if (catalog.indexOf(l.productId()) >= 0) {
        throw new ConfigException(where + "launch " + l.productId() + " is an existing product");
      }
      int like = catalog.indexOf(l.like());
      if (like < 0) {
        throw new ConfigException(where + "launch " + l.productId() + " is like unknown product "
            + l.like());
      }
      double[] x = standardisedLike(like, l.attributes(), where + "launch " + l.productId());
      Set<String> scope = scope(l.regions(), l.stores(), where + "launch " + l.productId());
      int count = 0;
      for (StoreWork s : stores) {
        if (scope.contains(s.storeId()) && Arrays.asList(s.productIds()).contains(l.like())) {
          launches.computeIfAbsent(s.storeId(), k -> new ArrayList<>()).add(
              new StoreScenario.LaunchData(l.productId(), l.owner(), x, l.price(), l.like(),
                  l.utilityShift() == null ? 0.0 : l.utilityShift(),
                  l.cost() == null ? Double.NaN : l.cost()));
          count++;
        }
      }
      if (count < scope.size()) {
        notes.add(where + "launch " + l.productId() + " applies in " + count + " of "
            + scope.size() + " stores in scope (the others do not stock " + l.like() + ")");
      }
    }
    Map<String, StoreScenario> out = new HashMap<>();
    for (StoreWork s : stores) {
      Map<String, PriceChange> m = changes.getOrDefault(s.storeId(), Map.of());
      Set<String> d = delisted.getOrDefault(s.storeId(), Set.of());
      for (String p : d) {
        if (m.containsKey(p)) {
          throw new ConfigException(where + p + " is both repriced and delisted in store "
              + s.storeId());
        }
      }
      List<String> ids = new ArrayList<>(new TreeSet<>(m.keySet()));
      int[] kinds = new int[ids.size()];
      double[] amounts = new double[ids.size()];
      for (int i = 0; i < ids.size(); i++) {
        kinds[i] = m.get(ids.get(i)).kind().ordinal();
        amounts[i] = m.get(ids.get(i)).amount();
      }
      out.put(s.storeId(), new StoreScenario(name, response, ids.toArray(new String[0]), kinds,
          amounts, new TreeSet<>(d).toArray(new String[0]),
          launches.getOrDefault(s.storeId(), List.of())
              .toArray(new StoreScenario.LaunchData[0])));
    }
    return out;
  }

  /** Per store in scope, the selected products it stocks. */
  private Map<String, Set<String>> select(ScenarioFile.Select sel, String where) {
    Set<String> products = new TreeSet<>();
    Set<String> ownerSet = null;
    if (sel.owners() != null) {
      ownerSet = new HashSet<>();
      for (String o : sel.owners()) {
        if (ScenarioFile.PORTFOLIO.equals(o)) {
          ownerSet.addAll(file.portfolio());
        } else if (owners.contains(o)) {
          ownerSet.add(o);
        } else {
          throw new ConfigException(where + "unknown owner '" + o + "' (owners: "
              + new TreeSet<>(owners) + ", or '" + ScenarioFile.PORTFOLIO + "')");
        }
      }
    }
    if (sel.products() != null) {
      for (String p : sel.products()) {
        if (catalog.indexOf(p) < 0) {
          throw new ConfigException(where + "unknown product '" + p + "'");
        }
      }
    }
    if (sel.where() != null) {
      for (String a : sel.where().keySet()) {
        if (!attribute.containsKey(a)) {
          throw new ConfigException(where + "unknown attribute '" + a + "' (attributes: "
              + attribute.keySet() + ")");
        }
      }
    }
    for (int p = 0; p < catalog.size(); p++) {
      String id = catalog.id(p);
      if (sel.products() != null && !sel.products().contains(id)) {
        continue;
      }
      if (ownerSet != null && !ownerSet.contains(catalog.owner(p))) {
        continue;
      }
      if (sel.where() != null && !matches(p, sel.where())) {
        continue;
      }
      products.add(id);
    }
    Set<String> scope = scope(sel.regions(), sel.stores(), where);
    if (Boolean.TRUE.equals(sel.topSeller())) {
      Map<String, Double> total = new HashMap<>();
      for (StoreWork s : stores) {
        if (scope.contains(s.storeId())) {
          for (int q = 0; q < s.products(); q++) {
            if (products.contains(s.productIds()[q])) {
              total.merge(s.productIds()[q], s.units()[q], Double::sum);
            }
          }
        }
      }
      String best = null;
      for (String p : new TreeSet<>(total.keySet())) {
        if (best == null || total.get(p) > total.get(best)) {
          best = p;
        }
      }
      products = best == null ? Set.of() : Set.of(best);
      if (best != null) {
        notes.add(where + "top seller in scope is " + best + " (" + Math.round(total.get(best))
            + " base units over " + scope.size() + " stores)");
      }
    }
    Map<String, Set<String>> out = new HashMap<>();
    for (StoreWork s : stores) {
      if (!scope.contains(s.storeId())) {
        continue;
      }
      Set<String> hit = new TreeSet<>();
      for (String p : s.productIds()) {
        if (products.contains(p)) {
          hit.add(p);
        }
      }
      if (!hit.isEmpty()) {
        out.put(s.storeId(), hit);
      }
    }
    if (out.isEmpty()) {
      notes.add(where + "selects no product stocked in the stores in scope");
    }
    return out;
  }

  private Set<String> scope(List<String> regionList, List<String> storeList, String where) {
    if (regionList != null) {
      for (String r : regionList) {
        if (!regions.contains(r)) {
          throw new ConfigException(where + "unknown region '" + r + "' (regions: "
              + new TreeSet<>(regions) + ")");
        }
      }
    }
    if (storeList != null) {
      for (String s : storeList) {
        if (!storeIds.contains(s)) {
          throw new ConfigException(where + "unknown store '" + s + "'");
        }
      }
    }
    Set<String> out = new HashSet<>();
    for (StoreWork s : stores) {
      if ((regionList == null || regionList.contains(s.region()))
          && (storeList == null || storeList.contains(s.storeId()))) {
        out.add(s.storeId());
      }
    }
    return out;
  }

  private boolean matches(int p, Map<String, Double> where) {
    int kx = catalog.attributes();
    for (Map.Entry<String, Double> e : where.entrySet()) {
      int k = attribute.get(e.getKey());
      double raw = catalog.x()[p * kx + k] * catalog.rawSd()[k] + catalog.rawMean()[k];
      if (Math.abs(raw - e.getValue()) > 1e-9 * Math.max(1, Math.abs(raw))) {
        return false;
      }
    }
    return true;
  }

  /** The like product's raw attributes with the given ones replaced, standardised. */
  private double[] standardisedLike(int like, Map<String, Double> given, String where) {
    int kx = catalog.attributes();
    double[] x = Arrays.copyOfRange(catalog.x(), like * kx, (like + 1) * kx);
    if (given != null) {
      for (Map.Entry<String, Double> e : given.entrySet()) {
        Integer k = attribute.get(e.getKey());
        if (k == null) {
          throw new ConfigException(where + ": unknown attribute '" + e.getKey()
              + "' (attributes: " + attribute.keySet() + ")");
        }
        x[k] = (e.getValue() - catalog.rawMean()[k]) / catalog.rawSd()[k];
      }
    }
    return x;
  }

  List<String> notes() {
    return notes;
  }
}
