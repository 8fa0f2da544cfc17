package aislecast.core.sim;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.FileAlreadyExistsException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Comparator;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.stream.Stream;

/**
 * Writes a {@link SimulatedData} as the DESIGN section 3 input tables (CSV with a header) plus
 * truth.json, into a staging folder that is renamed into place when complete: the output folder
 * appears whole or not at all.
 *
 * <p>Columns: {@code sales.csv} store_id, week, product_id, units, price, on_display, unit_cost;
 * {@code products.csv} product_id, owner, then the raw attributes; {@code stores.csv} store_id,
 * region, shoppers, median_income; {@code shopper_draws.csv} store_id, draw (1-based), nu0 ..
 * nuKx. Every number has a fixed number of decimals, so the bytes are reproducible.
 */
public final class SimWriter {
  public static final List<String> FILES =
      List.of("sales.csv", "products.csv", "stores.csv", "shopper_draws.csv", "truth.json");
  static final int MONEY_DECIMALS = 4;
  static final int TRUTH_DECIMALS = 8;

  private SimWriter() {}

  /**
   * Writes the data set into {@code output}.
   *
   * @param overwrite replace an existing non-empty {@code output}; without it such a folder is an
   *     error ({@link FileAlreadyExistsException}) and nothing is written
   * @return the files written, in {@link #FILES} order
   */
  public static List<Path> write(SimulatedData data, Path output, boolean overwrite) throws IOException {
    Path target = output.toAbsolutePath().normalize();
    if (Files.exists(target) && !overwrite && !isEmptyDirectory(target)) {
      throw new FileAlreadyExistsException(target.toString(), null,
          "output exists and is not empty (pass overwrite to replace it)");
    }
    if (Files.exists(target) && !Files.isDirectory(target)) {
      throw new FileAlreadyExistsException(target.toString(), null, "output exists and is a file");
    }
    Path parent = target.getParent();
    Files.createDirectories(parent);
    Path staging = Files.createTempDirectory(parent, "." + target.getFileName() + ".staging-");
    try {
      writeTables(data, staging);
      if (Files.exists(target)) {
        Path old = Files.createTempDirectory(parent, "." + target.getFileName() + ".old-");
        Files.delete(old);
        Files.move(target, old, StandardCopyOption.ATOMIC_MOVE);
        Files.move(staging, target, StandardCopyOption.ATOMIC_MOVE);
        deleteTree(old);
      } else {
        Files.move(staging, target, StandardCopyOption.ATOMIC_MOVE);
      }
    } catch (IOException | RuntimeException e) {
      deleteTree(staging);
      throw e;
    }
    List<Path> out = new ArrayList<>();
    for (String f : FILES) {
      out.add(target.resolve(f));
    }
    return out;
  }

  /** Writes the five files into an existing folder (no staging). */
  static void writeTables(SimulatedData d, Path dir) throws IOException {
    text(dir.resolve("sales.csv"), sales(d));
    text(dir.resolve("products.csv"), products(d));
    text(dir.resolve("stores.csv"), stores(d));
    text(dir.resolve("shopper_draws.csv"), draws(d));
    text(dir.resolve("truth.json"), Json.write(truth(d)));
  }

  static String sales(SimulatedData d) {
    StringBuilder sb = new StringBuilder(d.rows * 48 + 64);
    sb.append("store_id,week,product_id,units,price,on_display,unit_cost\n");
    for (int i = 0; i < d.rows; i++) {
      sb.append(csv(d.storeIds[d.rowStore[i]])).append(',')
          .append(d.weekDates[d.rowWeek[i]]).append(',')
          .append(csv(d.productIds[d.rowProduct[i]])).append(',')
          .append(d.units[i]).append(',')
          .append(DemandSimulator.fixed(d.price[i], MONEY_DECIMALS)).append(',')
          .append(d.onDisplay[i]).append(',')
          .append(DemandSimulator.fixed(d.unitCost[i], MONEY_DECIMALS)).append('\n');
    }
    return sb.toString();
  }

  static String products(SimulatedData d) {
    int kx = d.kx();
    StringBuilder sb = new StringBuilder();
    sb.append("product_id,owner");
    for (String a : d.attributeNames) {
      sb.append(',').append(a);
    }
    sb.append('\n');
    for (int j = 0; j < d.products(); j++) {
      sb.append(csv(d.productIds[j])).append(',').append(csv(d.ownerNames[d.productOwner[j]]));
      for (int k = 0; k < kx; k++) {
        sb.append(',').append(DemandSimulator.fixed(d.xRaw[j * kx + k], d.attributeDecimals[k]));
      }
      sb.append('\n');
    }
    return sb.toString();
  }

  static String stores(SimulatedData d) {
    StringBuilder sb = new StringBuilder();
    sb.append("store_id,region,shoppers,median_income\n");
    for (int s = 0; s < d.stores(); s++) {
      sb.append(csv(d.storeIds[s])).append(',').append(csv(d.regionNames[d.storeRegion[s]]))
          .append(',').append(d.shoppers[s]).append(',')
          .append(DemandSimulator.fixed(d.medianIncome[s], 1)).append('\n');
    }
    return sb.toString();
  }

  static String draws(SimulatedData d) {
    int dims = 1 + d.kx();
    int places = d.settings.drawDecimals();
    StringBuilder sb = new StringBuilder(d.stores() * d.settings.draws() * dims * (places + 5));
    sb.append("store_id,draw");
    for (int k = 0; k < dims; k++) {
      sb.append(",nu").append(k);
    }
    sb.append('\n');
    for (int s = 0; s < d.stores(); s++) {
      double[] nu = d.draws[s];
      for (int r = 0; r < d.settings.draws(); r++) {
        sb.append(csv(d.storeIds[s])).append(',').append(r + 1);
        for (int k = 0; k < dims; k++) {
          sb.append(',').append(DemandSimulator.fixed(nu[r * dims + k], places));
        }
        sb.append('\n');
      }
    }
    return sb.toString();
  }

  /** The truth.json tree. */
  static Map<String, Object> truth(SimulatedData d) {
    SimSettings st = d.settings;
    int kx = d.kx();
    int kPsi = st.psiDim();
    int nJ = d.products();
    String[] psiNames = d.psiNames();
    Map<String, Object> t = new LinkedHashMap<>();
    t.put("generator", map("name", "aislecast generate", "version", DemandSimulator.VERSION));
    t.put("scenario", "Chilled-drinks distributor supplying convenience stores (invented data)");
    t.put("seed", st.seed());
    t.put("settings", settings(st));
    List<Object> owners = new ArrayList<>();
    for (int o = 0; o < d.ownerNames.length; o++) {
      List<Object> ids = new ArrayList<>();
      for (int j = 0; j < nJ; j++) {
        if (d.productOwner[j] == o) {
          ids.add(d.productIds[j]);
        }
      }
      owners.add(map("owner", d.ownerNames[o], "own_portfolio", o == 0, "products", ids));
    }
    t.put("own_portfolio", d.ownerNames[0]);
    t.put("owners", owners);
    Map<String, Object> names = new LinkedHashMap<>();
    for (int j = 0; j < nJ; j++) {
      names.put(d.productIds[j], d.productNames[j]);
    }
    t.put("product_names", names);

    Map<String, Object> tr = new LinkedHashMap<>();
    tr.put("x", "attribute columns of products.csv (all numeric columns, in file order), "
        + "standardised over products: (x - mean) / sd, sd with n-1");
    tr.put("x_mean", named(d.attributeNames, d.xMean));
    tr.put("x_sd", named(d.attributeNames, d.xSd));
    tr.put("d", "(1, (median_income - mean) / sd) over stores, sd with n-1");
    tr.put("d_mean", map("median_income", d.incomeMean));
    tr.put("d_sd", map("median_income", d.incomeSd));
    tr.put("z", "on_display (0/1), as is");
    tr.put("c", "log(unit_cost)");
    tr.put("price", "price enters utility as is; log(price) in the price equation");
    tr.put("draws", "shopper_draws.csv: ShopperDraws (Sobol, per-store random shift, normal "
        + "inverse CDF) rounded to " + st.drawDecimals() + " decimals; the sales were simulated "
        + "from exactly these rounded draws");
    t.put("transforms", tr);

    t.put("psi_names", Arrays.asList((Object[]) psiNames));
    t.put("psi_layout", "psi_s = (a_s, log sigma_s, log diag(L_s) [L11, L22, ...], lower "
        + "off-diagonals of L_s row by row [L21, L31, L32, ...]); alpha_i = exp(a + sigma nu_i0), "
        + "beta_i = L nu_i[1..Kx]");
    t.put("demographics", List.of("intercept", "median_income"));
    double[] row0 = Arrays.copyOfRange(d.gamma, 0, kPsi);
    double[] row1 = Arrays.copyOfRange(d.gamma, kPsi, 2 * kPsi);
    t.put("Gamma", map("intercept", named(psiNames, row0), "median_income", named(psiNames, row1)));
    t.put("psibar", named(psiNames, row0));
    List<Object> v = new ArrayList<>();
    for (int p = 0; p < kPsi; p++) {
      List<Object> row = new ArrayList<>();
      for (int q = 0; q < kPsi; q++) {
        row.add(d.vPsi[p * kPsi + q]);
      }
      v.add(row);
    }
    t.put("V_psi", v);
    List<Object> psi = new ArrayList<>();
    for (int s = 0; s < d.stores(); s++) {
      Map<String, Object> m = new LinkedHashMap<>();
      m.put("store_id", d.storeIds[s]);
      for (int p = 0; p < kPsi; p++) {
        m.put(psiNames[p], d.psi[s * kPsi + p]);
      }
      psi.add(m);
    }
    t.put("psi", psi);
    t.put("kappabar", named(d.productIds, d.kappabar));
    t.put("tau", st.tau());
    t.put("tau2", st.tau() * st.tau());
    List<Object> kappa = new ArrayList<>();
    for (int s = 0; s < d.stores(); s++) {
      for (int j = 0; j < nJ; j++) {
        if (d.everStocked[s * nJ + j]) {
          kappa.add(map("store_id", d.storeIds[s], "product_id", d.productIds[j],
              "value", d.kappa[s * nJ + j]));
        }
      }
    }
    t.put("kappa", kappa);
    t.put("gamma", map("on_display", st.displayEffect()));
    t.put("sigma_xi", st.sigmaXi());
    t.put("sigma_xi2", st.sigmaXi() * st.sigmaXi());
    t.put("pi0", named(d.productIds, d.pi0));
    t.put("pi", map("log_unit_cost", st.costPassThrough()));
    t.put("lambda", st.lambda());
    t.put("sigma_p", st.sigmaP());
    t.put("sigma_p2", st.sigmaP() * st.sigmaP());
    t.put("typical_price", named(d.productIds, d.typicalPrice));
    t.put("base_unit_cost", named(d.productIds, d.baseCost));

    List<Object> rows = new ArrayList<>(d.rows);
    for (int i = 0; i < d.rows; i++) {
      rows.add(List.of(d.storeIds[d.rowStore[i]], d.weekDates[d.rowWeek[i]],
          d.productIds[d.rowProduct[i]], new Json.Fixed(d.delta[i], TRUTH_DECIMALS),
          new Json.Fixed(d.xi[i], TRUTH_DECIMALS)));
    }
    t.put("delta", map("columns", List.of("store_id", "week", "product_id", "delta", "xi"),
        "decimals", TRUTH_DECIMALS, "rows", rows));
    t.put("summary", summary(d));
    return t;
  }

  /** Distribution of the simulated rows: what the scenario produced. */
  public static Map<String, Object> summary(SimulatedData d) {
    long zeros = 0;
    long inBand = 0;
    double[] units = new double[d.rows];
    for (int i = 0; i < d.rows; i++) {
      zeros += d.units[i] == 0 ? 1 : 0;
      inBand += d.share[i] >= 0.002 && d.share[i] <= 0.05 ? 1 : 0;
      units[i] = d.units[i];
    }
    Map<String, Object> m = new LinkedHashMap<>();
    m.put("rows", d.rows);
    m.put("markets", d.stores() * d.settings.weeks());
    m.put("zero_unit_rows", zeros);
    m.put("share_of_rows_with_model_share_in_0.002_0.05", round6((double) inBand / d.rows));
    m.put("model_share_quantiles", quantiles(d.share));
    m.put("price_quantiles", quantiles(d.price));
    m.put("own_price_elasticity_quantiles", quantiles(d.ownElasticity));
    m.put("units_quantiles", quantiles(units));
    return m;
  }

  private static Map<String, Object> quantiles(double[] values) {
    double[] sorted = values.clone();
    Arrays.sort(sorted);
    Map<String, Object> m = new LinkedHashMap<>();
    double[] probs = {0.0, 0.05, 0.25, 0.5, 0.75, 0.95, 1.0};
    String[] names = {"min", "q05", "q25", "median", "q75", "q95", "max"};
    for (int i = 0; i < probs.length; i++) {
      // nearest-rank quantile: a value that occurs in the data
      int idx = (int) Math.min(sorted.length - 1, Math.max(0, Math.ceil(probs[i] * sorted.length) - 1));
      m.put(names[i], round6(sorted[idx]));
    }
    return m;
  }

  private static double round6(double v) {
    return DemandSimulator.round(v, 6);
  }

  private static Map<String, Object> settings(SimSettings st) {
    Map<String, Object> m = new LinkedHashMap<>();
    for (var c : SimSettings.class.getRecordComponents()) {
      try {
        Object value = c.getAccessor().invoke(st);
        m.put(c.getName(), value instanceof Number || value instanceof Boolean ? value
            : String.valueOf(value));
      } catch (ReflectiveOperationException e) {
        throw new IllegalStateException(e);
      }
    }
    return m;
  }

  private static Map<String, Object> named(String[] names, double[] values) {
    Map<String, Object> m = new LinkedHashMap<>();
    for (int i = 0; i < names.length; i++) {
      m.put(names[i], values[i]);
    }
    return m;
  }

  private static Map<String, Object> map(Object... kv) {
    Map<String, Object> m = new LinkedHashMap<>();
    for (int i = 0; i < kv.length; i += 2) {
      m.put((String) kv[i], kv[i + 1]);
    }
    return m;
  }

  /** RFC 4180 quoting, only where needed. */
  static String csv(String s) {
    if (s.indexOf(',') < 0 && s.indexOf('"') < 0 && s.indexOf('\n') < 0 && s.indexOf('\r') < 0) {
      return s;
    }
    return '"' + s.replace("\"", "\"\"") + '"';
  }

  private static void text(Path p, String s) throws IOException {
    Files.write(p, s.getBytes(StandardCharsets.UTF_8));
  }

  private static boolean isEmptyDirectory(Path p) throws IOException {
    if (!Files.isDirectory(p)) {
      return false;
    }
    try (Stream<Path> s = Files.list(p)) {
      return s.findAny().isEmpty();
    }
  }

  /** Best effort: a leftover staging or old folder must not mask the error being reported. */
  static void deleteTree(Path root) {
    if (!Files.exists(root)) {
      return;
    }
    try (Stream<Path> walk = Files.walk(root)) {
      for (Path p : walk.sorted(Comparator.reverseOrder()).toList()) {
        Files.deleteIfExists(p);
      }
    } catch (IOException | UncheckedIOException e) {
      System.err.println("warning: could not remove " + root + ": " + e.getMessage());
    }
  }
}
