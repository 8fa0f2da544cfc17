package aislecast.jobs.scenario;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import aislecast.core.model.ProductCatalog;
import aislecast.core.scenario.Response;
import aislecast.jobs.config.ConfigException;
import java.util.List;
import org.junit.jupiter.api.Test;

/** Scenario files resolved against a hand-made catalog of 4 products and 3 stores (no Spark). */
class ScenarioResolverTest {
  private static final ProductCatalog CATALOG = new ProductCatalog(
      new String[] {"A1", "A2", "B1", "B2"}, new String[] {"Own", "Own", "Rival", "Rival"},
      new String[] {"sugar_free", "volume_l"}, new double[] {0, 0.5, 1, 1.0, 0, 0.33, 1, 0.5});

  private static StoreWork store(String id, String region, String[] products, double[] units) {
    int j = products.length;
    String[] owners = new String[j];
    double[] x = new double[j * 2];
    for (int q = 0; q < j; q++) {
      int p = CATALOG.indexOf(products[q]);
      owners[q] = CATALOG.owner(p);
      System.arraycopy(CATALOG.x(), p * 2, x, q * 2, 2);
    }
    double[] price = new double[j];
    java.util.Arrays.fill(price, 2.0);
    return new StoreWork(id, region, products, owners, 2, x, price, units, 1000, new double[3],
        1, List.of("Own"), new int[0], new int[0], new double[0][], List.of(),
        null);
  }

  private static final List<StoreWork> STORES = List.of(
      store("S1", "North", new String[] {"A1", "A2", "B1"}, new double[] {10, 30, 5}),
      store("S2", "North", new String[] {"A1", "A2", "B2"}, new double[] {40, 5, 5}),
      store("S3", "South", new String[] {"A1", "B1", "B2"}, new double[] {99, 5, 5}));

  private static ScenarioResolver.Result resolve(String yaml) {
    ScenarioFile f = ScenarioFile.parse(yaml, "t.yaml");
    return ScenarioResolver.resolve(ScenarioFile.merge(List.of(f), List.of("t.yaml")), CATALOG,
        STORES);
  }

  @Test
  void topSellerIsChosenOverTheStoresInScopeOnly() {
    // North: A1 sells 10 + 40 = 50, A2 30 + 5 = 35 -> A1 (South's 99 does not count)
    ScenarioResolver.Result r = resolve("settings: {portfolio: [Own]}\nscenarios:\n"
        + "  - name: cut\n    responses: [hold, nash]\n    price_changes:\n"
        + "      - {owners: [portfolio], top_seller: true, regions: [North], percent: -5}\n");
    assertEquals(List.of("cut-hold", "cut-nash"), r.scenarioNames());
    StoreScenario s1 = r.stores().get(0).scenarios().get(1);
    assertEquals(Response.NASH, s1.response());
    assertArrayEquals(new String[] {"A1"}, s1.changeIds());
    assertEquals(-5.0, s1.changeAmounts()[0]);
    assertEquals(0, r.stores().get(2).scenarios().get(0).changeIds().length);
  }

  @Test
  void attributeSelectionAndLaunchAttributesUseRawValues() {
    ScenarioResolver.Result r = resolve("settings: {portfolio: [Own]}\nscenarios:\n"
        + "  - name: s\n    price_changes:\n      - {where: {sugar_free: 1}, add: 0.1}\n"
        + "    launches:\n      - {product_id: N1, owner: Own, like: A2, price: 2.2,"
        + " attributes: {volume_l: 0.5}, regions: [North]}\n");
    StoreScenario s2 = r.stores().get(1).scenarios().get(0);
    assertArrayEquals(new String[] {"A2", "B2"}, s2.changeIds());
    // A2 is stocked in both North stores: the launch lands there, never in South
    assertEquals(1, r.stores().get(0).scenarios().get(0).launches().length);
    assertEquals(0, r.stores().get(2).scenarios().get(0).launches().length);
    double[] x = r.stores().get(0).scenarios().get(0).launches()[0].x();
    // sugar_free copied from A2 (1), volume 0.5 standardised with the catalog's mean and sd
    int a2 = CATALOG.indexOf("A2");
    assertEquals(CATALOG.x()[a2 * 2], x[0], 1e-15);
    assertEquals((0.5 - CATALOG.rawMean()[1]) / CATALOG.rawSd()[1], x[1], 1e-15);
  }

  @Test
  void unknownReferencesAreConfigurationErrors() {
    String head = "settings: {portfolio: [Own]}\nscenarios:\n  - name: s\n";
    assertTrue(assertThrows(ConfigException.class, () -> resolve(head
        + "    price_changes:\n      - {products: [NOPE], percent: 1}\n")).getMessage()
        .contains("unknown product 'NOPE'"));
    assertTrue(assertThrows(ConfigException.class, () -> resolve(head
        + "    delist:\n      - {owners: [Nobody]}\n")).getMessage()
        .contains("unknown owner 'Nobody'"));
    assertTrue(assertThrows(ConfigException.class, () -> resolve(head
        + "    delist:\n      - {owners: [Own], regions: [East]}\n")).getMessage()
        .contains("unknown region 'East'"));
    assertTrue(assertThrows(ConfigException.class, () -> resolve(head
        + "    price_changes:\n      - {products: [A1], percent: 1}\n"
        + "      - {owners: [Own], percent: 2}\n")).getMessage()
        .contains("two price changes select A1"));
    assertTrue(assertThrows(ConfigException.class, () -> ScenarioFile.parse(head
        + "    price_changes:\n      - {products: [A1], percent: 1, add: 2}\n", "t.yaml"))
        .getMessage().contains("exactly one of percent, add, set_to"));
    assertTrue(assertThrows(ConfigException.class, () -> ScenarioFile.parse(head
        + "    responses: [later]\n", "t.yaml")).getMessage().contains("response 'later'"));
    // delisting the whole shelf of a store is caught before any Spark task runs
    assertTrue(assertThrows(ConfigException.class, () -> resolve(head
        + "    delist:\n      - {products: [A1, B1, B2]}\n")).getMessage()
        .contains("every product is delisted"));
  }

  @Test
  void settingsOfSeveralFilesMustAgree() {
    ScenarioFile a = ScenarioFile.parse("settings: {portfolio: [Own], draws: 100}\n"
        + "scenarios:\n  - name: a\n", "a.yaml");
    ScenarioFile b = ScenarioFile.parse("settings: {portfolio: [Own], draws: 200}\n"
        + "scenarios:\n  - name: b\n", "b.yaml");
    assertTrue(assertThrows(ConfigException.class,
        () -> ScenarioFile.merge(List.of(a, b), List.of("a.yaml", "b.yaml"))).getMessage()
        .contains("settings.draws = 200 disagrees"));
    ScenarioFile.Resolved ok = ScenarioFile.merge(List.of(a), List.of("a.yaml"));
    assertEquals(1, ok.baseWeeks());
    assertEquals(100, ok.draws());
  }
}
