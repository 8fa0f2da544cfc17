package aislecast.jobs.estimate;

import static org.apache.spark.sql.functions.col;
import static org.apache.spark.sql.functions.date_format;

import aislecast.core.draws.ShopperDraws;
import aislecast.core.model.ProductCatalog;
import aislecast.core.model.StoreAssembler;
import aislecast.core.model.StoreData;
import aislecast.jobs.config.RunFailure;
import aislecast.jobs.validate.InputValidator;
import aislecast.jobs.validate.ValidatedInput;
import java.io.Serializable;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Comparator;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.TreeMap;
import java.util.TreeSet;
import org.apache.spark.api.java.JavaPairRDD;
import org.apache.spark.api.java.JavaSparkContext;
import org.apache.spark.broadcast.Broadcast;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import scala.Tuple2;

/**
 * Turns the validated input into an {@link EstimationProblem}: the product catalog (products
 * that sold in at least one accepted row, attributes standardised), every store's demographics
 * {@code d_s = (1, standardised demographics)}, and each store's {@link StoreData}, assembled on
 * the executors from its accepted sales rows grouped by store. Demand shifters enter as they are;
 * cost shifters as logs (DESIGN section 4 data conventions).
 *
 * <p>Shopper draws come from the {@code shopper_draws} table when the input has one (every store
 * must then have draws with 1 + Kx coordinates), otherwise from {@link ShopperDraws#generate}
 * with R = {@code sampler.shopper_draws} and the run seed.
 */
public final class ProblemBuilder {
  private ProblemBuilder() {}

  /** Store-level inputs computed on the driver and broadcast to the assembling tasks. */
  private record StoreInfo(int index, double[] demographics) implements Serializable {}

  private record Shared(Map<String, Integer> productIndex, Map<String, StoreInfo> stores,
      int kz, int kc, int nuDims, long seed, int generatedDraws) implements Serializable {}

  public static EstimationProblem build(JavaSparkContext jsc, ValidatedInput in, long seed,
      int generatedDraws) {
    ValidatedInput.Columns cols = in.columns();
    List<String> notes = new ArrayList<>();
    Dataset<Row> sales = in.sales();

    // Catalog: products with at least one accepted sales row, in sorted id order.
    TreeSet<String> sold = new TreeSet<>();
    for (Row r : sales.select("product_id").distinct().collectAsList()) {
      sold.add(r.getString(0));
    }
    Map<String, Row> productRows = new HashMap<>();
    List<String> productSelect = new ArrayList<>(List.of("product_id", "owner"));
    productSelect.addAll(cols.attributes());
    for (Row r : in.products().selectExpr(quoted(productSelect)).collectAsList()) {
      productRows.put(r.getString(0), r);
    }
    int unsold = 0;
    for (String id : productRows.keySet()) {
      if (!sold.contains(id)) {
        unsold++;
      }
    }
    if (unsold > 0) {
      notes.add(unsold + " accepted product(s) have no accepted sales row and are left out of"
          + " estimation");
    }
    String[] ids = sold.toArray(new String[0]);
    int kx = cols.attributes().size();
    String[] owners = new String[ids.length];
    double[] raw = new double[ids.length * kx];
    for (int p = 0; p < ids.length; p++) {
      Row r = productRows.get(ids[p]);
      owners[p] = r.getString(1);
      for (int k = 0; k < kx; k++) {
        raw[p * kx + k] = ((Number) r.get(2 + k)).doubleValue();
      }
    }
    ProductCatalog catalog;
    try {
      catalog = new ProductCatalog(ids, owners, cols.attributes().toArray(new String[0]), raw);
    } catch (IllegalArgumentException e) {
      throw new RunFailure(RunFailure.BAD_INPUT, "products: " + e.getMessage()
          + " (set input.products.attributes to the attributes to use)");
    }

    // Stores: those with accepted sales, in sorted id order; demographics standardised over them.
    TreeSet<String> storeIds = new TreeSet<>();
    for (Row r : sales.select("store_id").distinct().collectAsList()) {
      storeIds.add(r.getString(0));
    }
    List<String> demoCols = cols.demographics();
    List<String> storeSelect = new ArrayList<>(List.of("store_id"));
    storeSelect.addAll(demoCols);
    Map<String, double[]> rawDemo = new HashMap<>();
    for (Row r : in.stores().selectExpr(quoted(storeSelect)).collectAsList()) {
      if (storeIds.contains(r.getString(0))) {
        double[] v = new double[demoCols.size()];
        for (int k = 0; k < v.length; k++) {
          v[k] = ((Number) r.get(1 + k)).doubleValue();
        }
        rawDemo.put(r.getString(0), v);
      }
    }
    List<String> usedDemo = new ArrayList<>();
    List<double[]> meanSd = new ArrayList<>();
    for (int k = 0; k < demoCols.size(); k++) {
      double m = 0;
      for (double[] v : rawDemo.values()) {
        m += v[k];
      }
      m /= rawDemo.size();
      double ss = 0;
      for (double[] v : rawDemo.values()) {
        ss += (v[k] - m) * (v[k] - m);
      }
      double sd = rawDemo.size() > 1 ? Math.sqrt(ss / (rawDemo.size() - 1)) : 0.0;
      if (sd > 0) {
        usedDemo.add(demoCols.get(k));
        meanSd.add(new double[] {k, m, sd});
      } else {
        notes.add("stores: demographic " + demoCols.get(k)
            + " does not vary over the estimated stores and is left out of the hierarchy");
      }
    }
    Map<String, StoreInfo> infos = new HashMap<>();
    int index = 0;
    for (String id : storeIds) {
      double[] rawV = rawDemo.get(id);
      double[] d = new double[1 + usedDemo.size()];
      d[0] = 1.0;
      for (int u = 0; u < meanSd.size(); u++) {
        double[] ms = meanSd.get(u);
        d[1 + u] = (rawV[(int) ms[0]] - ms[1]) / ms[2];
      }
      infos.put(id, new StoreInfo(index++, d));
    }

    Map<String, Integer> productIndex = new HashMap<>();
    for (int p = 0; p < ids.length; p++) {
      productIndex.put(ids[p], p);
    }
    Optional<Dataset<Row>> drawsTable = in.shopperDraws();
    String drawsSource;
    if (drawsTable.isPresent()) {
      int dims = cols.drawColumns().size();
      if (dims != 1 + kx) {
        throw new RunFailure(RunFailure.BAD_INPUT, "shopper_draws has " + dims
            + " draw columns (" + String.join(", ", cols.drawColumns()) + ") but the model needs"
            + " 1 + Kx = " + (1 + kx) + " (price sensitivity, then one per product attribute: "
            + String.join(", ", cols.attributes()) + ")");
      }
      TreeSet<String> withDraws = new TreeSet<>();
      for (Row r : drawsTable.get().select("store_id").distinct().collectAsList()) {
        withDraws.add(r.getString(0));
      }
      List<String> missing = new ArrayList<>();
      for (String id : storeIds) {
        if (!withDraws.contains(id)) {
          missing.add(id);
        }
      }
      if (!missing.isEmpty()) {
        throw new RunFailure(RunFailure.BAD_INPUT, missing.size() + " store(s) with sales have no"
            + " accepted shopper_draws rows, e.g. " + String.join(", ",
                missing.subList(0, Math.min(5, missing.size())))
            + "; give every store draws or remove the shopper_draws table to generate them");
      }
      drawsSource = "shopper_draws table";
    } else {
      drawsSource = "generated quasi-random (Sobol), R = " + generatedDraws;
    }

    Shared shared = new Shared(productIndex, infos, cols.demandShifters().size(),
        cols.costShifters().size(), 1 + kx, seed, generatedDraws);
    Broadcast<Shared> bc = jsc.broadcast(shared);
    int parts = Math.max(1, Math.min(storeIds.size(), jsc.defaultParallelism() * 2));

    List<Column> salesCols = new ArrayList<>(List.of(col("store_id"),
        date_format(col("week"), "yyyy-MM-dd").as("week"), col("product_id"), col("units"),
        col("price")));
    for (String z : cols.demandShifters()) {
      salesCols.add(col(quote(z)));
    }
    for (String c : cols.costShifters()) {
      salesCols.add(col(quote(c)));
    }
    salesCols.add(col(InputValidator.MARKET_SIZE));
    JavaPairRDD<String, Iterable<Row>> salesByStore = sales.select(salesCols.toArray(new Column[0]))
        .javaRDD().groupBy(r -> r.getString(0), parts);

    JavaPairRDD<String, Tuple2<Iterable<Row>, org.apache.spark.api.java.Optional<Iterable<Row>>>>
        joined;
    if (drawsTable.isPresent()) {
      List<String> drawSelect = new ArrayList<>(List.of("store_id", "draw"));
      drawSelect.addAll(cols.drawColumns());
      JavaPairRDD<String, Iterable<Row>> drawsByStore = drawsTable.get()
          .selectExpr(quoted(drawSelect)).javaRDD().groupBy(r -> r.getString(0), parts);
      joined = salesByStore.leftOuterJoin(drawsByStore, parts);
    } else {
      joined = salesByStore.mapValues(
          rows -> new Tuple2<>(rows, org.apache.spark.api.java.Optional.<Iterable<Row>>empty()));
    }
    List<StoreData> stores = new ArrayList<>(joined
        .map(t -> assemble(t._1(), t._2()._1(), t._2()._2(), bc.value()))
        .collect());
    bc.destroy();
    stores.sort(Comparator.comparingInt(d -> d.storeIndex));
    return new EstimationProblem(catalog, stores, usedDemo, cols.demandShifters(),
        cols.costShifters(), drawsSource, notes);
  }

  private static StoreData assemble(String storeId, Iterable<Row> rows,
      org.apache.spark.api.java.Optional<Iterable<Row>> drawRows, Shared sh) {
    StoreInfo info = sh.stores().get(storeId);
    int kz = sh.kz();
    int kc = sh.kc();
    List<StoreAssembler.Row> list = new ArrayList<>();
    Map<String, Long> size = new HashMap<>();
    for (Row r : rows) {
      double[] z = new double[kz];
      for (int k = 0; k < kz; k++) {
        z[k] = ((Number) r.get(5 + k)).doubleValue();
      }
      double[] c = new double[kc];
      for (int k = 0; k < kc; k++) {
        c[k] = Math.log(((Number) r.get(5 + kz + k)).doubleValue());
      }
      String week = r.getString(1);
      list.add(new StoreAssembler.Row(week, sh.productIndex().get(r.getString(2)),
          ((Number) r.get(3)).longValue(), ((Number) r.get(4)).doubleValue(), z, c));
      size.put(week, ((Number) r.get(5 + kz + kc)).longValue());
    }
    double[] nu;
    int shoppers;
    if (drawRows.isPresent()) {
      // draw index order, whatever order the rows arrived in
      TreeMap<Long, double[]> byDraw = new TreeMap<>();
      for (Row r : drawRows.get()) {
        double[] v = new double[sh.nuDims()];
        for (int k = 0; k < v.length; k++) {
          v[k] = ((Number) r.get(2 + k)).doubleValue();
        }
        byDraw.put(((Number) r.get(1)).longValue(), v);
      }
      shoppers = byDraw.size();
      nu = new double[shoppers * sh.nuDims()];
      int i = 0;
      for (double[] v : byDraw.values()) {
        System.arraycopy(v, 0, nu, i * v.length, v.length);
        i++;
      }
    } else {
      shoppers = sh.generatedDraws();
      nu = ShopperDraws.generate(sh.seed(), storeId, shoppers, sh.nuDims());
    }
    return StoreAssembler.assemble(storeId, info.index(), info.demographics(), nu, shoppers,
        list, size, kz, kc);
  }

  private static String quote(String name) {
    return "`" + name.replace("`", "``") + "`";
  }

  private static String[] quoted(List<String> names) {
    return names.stream().map(ProblemBuilder::quote).toArray(String[]::new);
  }

  static String describe(EstimationProblem p) {
    return p.stores().size() + " stores, " + p.catalog().size() + " products, " + p.rows()
        + " store-week-product rows; Kx = " + p.kx() + " (" + String.join(", ",
            Arrays.asList(p.catalog().attributeNames())) + "), d_s = (1"
        + (p.demographicNames().isEmpty() ? "" : ", " + String.join(", ", p.demographicNames()))
        + "), z = [" + String.join(", ", p.demandShifters()) + "], c = log ["
        + String.join(", ", p.costShifters()) + "]; shopper draws: " + p.drawsSource();
  }
}
