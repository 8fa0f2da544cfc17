package aislecast.core.model;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;
import java.util.TreeSet;

/**
 * Loads the outside reference set {@code ../shared/reference/small} (CSV tables and the JSON test
 * vectors) into the project's data structures, with plain Java parsing so this check does not
 * depend on the project's own input readers.
 */
final class ReferenceSet {
  static final Path DIR = locate();

  final ProductCatalog catalog;
  final List<StoreData> stores = new ArrayList<>();
  final JsonNode check;

  private static Path locate() {
    for (String p : new String[] {"../shared/reference/small", "../../shared/reference/small"}) {
      Path d = Path.of(p);
      if (Files.isDirectory(d)) {
        return d;
      }
    }
    throw new IllegalStateException("reference set ../shared/reference/small not found");
  }

  ReferenceSet() throws IOException {
    List<String[]> products = csv(DIR.resolve("products.csv"));
    String[] head = products.get(0);
    int kx = head.length - 2;
    TreeMap<String, String[]> byId = new TreeMap<>();
    for (String[] row : products.subList(1, products.size())) {
      byId.put(row[0], row);
    }
    String[] ids = byId.keySet().toArray(new String[0]);
    String[] owners = new String[ids.length];
    double[] raw = new double[ids.length * kx];
    for (int p = 0; p < ids.length; p++) {
      String[] row = byId.get(ids[p]);
      owners[p] = row[1];
      for (int k = 0; k < kx; k++) {
        raw[p * kx + k] = Double.parseDouble(row[2 + k]);
      }
    }
    String[] attrs = java.util.Arrays.copyOfRange(head, 2, head.length);
    catalog = new ProductCatalog(ids, owners, attrs, raw);

    Map<String, Long> shoppers = new HashMap<>();
    for (String[] row : csv(DIR.resolve("stores.csv")).subList(1, 7)) {
      shoppers.put(row[0], Long.parseLong(row[2]));
    }
    Map<String, List<double[]>> draws = new TreeMap<>();
    for (String[] row : tail(csv(DIR.resolve("shopper_draws.csv")))) {
      double[] nu = new double[1 + kx];
      for (int k = 0; k <= kx; k++) {
        nu[k] = Double.parseDouble(row[2 + k]);
      }
      draws.computeIfAbsent(row[0], s -> new ArrayList<>()).add(nu);
    }
    // sales: store_id, week, product_id, units, price, on_display, unit_cost
    TreeMap<String, TreeMap<String, TreeMap<Integer, String[]>>> sales = new TreeMap<>();
    for (String[] row : tail(csv(DIR.resolve("sales.csv")))) {
      sales.computeIfAbsent(row[0], s -> new TreeMap<>())
          .computeIfAbsent(row[1], w -> new TreeMap<>())
          .put(catalog.indexOf(row[2]), row);
    }
    int storeIndex = 0;
    for (var store : sales.entrySet()) {
      String sid = store.getKey();
      List<double[]> nuRows = draws.get(sid);
      double[] nu = new double[nuRows.size() * (1 + kx)];
      for (int i = 0; i < nuRows.size(); i++) {
        System.arraycopy(nuRows.get(i), 0, nu, i * (1 + kx), 1 + kx);
      }
      TreeSet<Integer> stocked = new TreeSet<>();
      store.getValue().values().forEach(m -> stocked.addAll(m.keySet()));
      int weeks = store.getValue().size();
      String[] weekIds = new String[weeks];
      long[] size = new long[weeks];
      int[] rowStart = new int[weeks + 1];
      List<String[]> rows = new ArrayList<>();
      int t = 0;
      for (var week : store.getValue().entrySet()) {
        weekIds[t] = week.getKey();
        size[t] = shoppers.get(sid);
        rowStart[t] = rows.size();
        rows.addAll(week.getValue().values());
        t++;
      }
      rowStart[weeks] = rows.size();
      int n = rows.size();
      int[] product = new int[n];
      long[] units = new long[n];
      double[] price = new double[n];
      double[] z = new double[n];
      double[] c = new double[n];
      for (int i = 0; i < n; i++) {
        String[] row = rows.get(i);
        product[i] = catalog.indexOf(row[2]);
        units[i] = Long.parseLong(row[3]);
        price[i] = Double.parseDouble(row[4]);
        z[i] = Double.parseDouble(row[5]);
        c[i] = Math.log(Double.parseDouble(row[6]));
      }
      stores.add(new StoreData(sid, storeIndex++, new double[] {1.0}, nu, nuRows.size(),
          stocked.stream().mapToInt(Integer::intValue).toArray(), weekIds, size, rowStart,
          product, units, price, 1, z, 1, c));
    }
    check = new ObjectMapper().readTree(DIR.resolve("logdensity_check.json").toFile());
  }

  /** The parameter values of one test point, in the project's layout. */
  final class Point {
    final LocalParams params;
    final double[] psibar;
    final double[] vPsi;
    final Map<String, double[]> psi = new HashMap<>();
    final Map<String, double[]> kappa = new HashMap<>();
    final Map<String, double[]> delta = new HashMap<>();
    final JsonNode node;

    Point(String name) {
      node = check.path("points").path(name);
      JsonNode pt = node.path("point");
      psibar = doubles(pt.path("psibar"));
      int kpsi = psibar.length;
      vPsi = new double[kpsi * kpsi];
      for (int i = 0; i < kpsi; i++) {
        for (int k = 0; k < kpsi; k++) {
          vPsi[i * kpsi + k] = pt.path("V_psi").get(i).get(k).asDouble();
        }
      }
      int j = catalog.size();
      double[] kappabar = new double[j];
      double[] pi0 = new double[j];
      for (int p = 0; p < j; p++) {
        kappabar[p] = pt.path("kappabar").path(catalog.id(p)).asDouble();
        pi0[p] = pt.path("pi0").path(catalog.id(p)).asDouble();
      }
      params = LocalParams.of(kpsi, psibar, vPsi, kappabar, pt.path("tau2").asDouble(),
          new double[] {pt.path("gamma").path("on_display").asDouble()},
          pt.path("sigma_xi2").asDouble(), pi0,
          new double[] {pt.path("pi").path("log_unit_cost").asDouble()},
          pt.path("lambda").asDouble(), pt.path("sigma_p2").asDouble());
      String[] psiNames = {"a", "log_sigma", "log_L11", "log_L22", "L21"};
      for (JsonNode s : pt.path("psi")) {
        double[] v = new double[kpsi];
        for (int k = 0; k < kpsi; k++) {
          v[k] = s.path(psiNames[k]).asDouble();
        }
        psi.put(s.path("store_id").asText(), v);
      }
      for (StoreData d : stores) {
        kappa.put(d.storeId, new double[d.products.length]);
        delta.put(d.storeId, new double[d.rows()]);
      }
      for (JsonNode k : pt.path("kappa")) {
        StoreData d = store(k.path("store_id").asText());
        int l = java.util.Arrays.binarySearch(d.products,
            catalog.indexOf(k.path("product_id").asText()));
        kappa.get(d.storeId)[l] = k.path("value").asDouble();
      }
      for (JsonNode e : pt.path("delta")) {
        StoreData d = store(e.path("store_id").asText());
        int t = java.util.Arrays.asList(d.weeks).indexOf(e.path("week").asText());
        int p = catalog.indexOf(e.path("product_id").asText());
        int row = -1;
        for (int i = d.rowStart[t]; i < d.rowStart[t + 1]; i++) {
          if (d.product[i] == p) {
            row = i;
          }
        }
        delta.get(d.storeId)[row] = e.path("value").asDouble();
      }
    }
  }

  StoreData store(String id) {
    return stores.stream().filter(s -> s.storeId.equals(id)).findFirst().orElseThrow();
  }

  static double[] doubles(JsonNode arr) {
    double[] v = new double[arr.size()];
    for (int i = 0; i < v.length; i++) {
      v[i] = arr.get(i).asDouble();
    }
    return v;
  }

  private static List<String[]> tail(List<String[]> rows) {
    return rows.subList(1, rows.size());
  }

  private static List<String[]> csv(Path p) throws IOException {
    List<String[]> out = new ArrayList<>();
    for (String line : Files.readAllLines(p)) {
      if (line.isBlank()) {
        continue;
      }
      String[] f = line.split(",", -1);
      for (int i = 0; i < f.length; i++) {
        f[i] = f[i].replace("\"", "");
      }
      out.add(f);
    }
    return out;
  }
}
