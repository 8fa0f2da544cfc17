package aislecast.jobs.validate;

import static org.apache.spark.sql.functions.col;
import static org.apache.spark.sql.functions.date_format;
import static org.apache.spark.sql.functions.lit;
import static org.apache.spark.sql.functions.to_date;

import aislecast.jobs.config.InputConfig;
import aislecast.jobs.config.RunConfig;
import aislecast.jobs.io.InputException;
import aislecast.jobs.io.InputTables;
import aislecast.jobs.io.InputTables.Format;
import aislecast.jobs.io.InputTables.RawTable;
import java.io.IOException;
import java.io.OutputStream;
import java.io.Serializable;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashMap;
import java.util.HashSet;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.Set;
import org.apache.hadoop.fs.FileSystem;
import org.apache.hadoop.fs.Path;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.api.java.JavaSparkContext;
import org.apache.spark.broadcast.Broadcast;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.RowFactory;
import org.apache.spark.sql.SaveMode;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.types.BooleanType;
import org.apache.spark.sql.types.DataType;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.DateType;
import org.apache.spark.sql.types.StructType;
import org.apache.spark.sql.types.TimestampNTZType;
import org.apache.spark.sql.types.TimestampType;
import org.apache.spark.storage.StorageLevel;

/**
 * Reads and validates the input tables (DESIGN section 3): every row is either accepted or
 * written to {@code <runDir>/validation/rejects} with a {@link RejectReason} code and a message;
 * nothing is dropped silently. Reused by every job that reads input.
 *
 * <p>Order of checks (a row keeps the first reason it gets):
 *
 * <ol>
 *   <li>per field, in column order: missing, malformed, non-finite, range (see {@link FieldKind});
 *   <li>products, stores: duplicate key (every copy rejected);
 *   <li>traffic: duplicate store-week, unknown store, store-week without any sales row
 *       ({@code market_without_products});
 *   <li>sales: duplicate store-week-product, unknown store, unknown product, rejected traffic row
 *       for the store-week ({@code market_size_unavailable}), then units summed over the
 *       store-week's remaining rows above the market size ({@code units_above_market_size}: every
 *       row of that market is rejected, because dropping some products would distort the others'
 *       shares);
 *   <li>stores without any sales row ({@code store_without_markets});
 *   <li>shopper_draws: duplicate store-draw, store not accepted.
 * </ol>
 *
 * <p>"Without products" and "without markets" look at every sales row with a key, accepted or
 * not: a traffic or store row is rejected only for its own fault, never because the sales of its
 * market were rejected for theirs. So an accepted store or traffic row may have no accepted sales;
 * jobs drive from the accepted sales and simply do not see it.
 *
 * <p>The market size of a store-week is the accepted traffic row's shoppers if there is one,
 * else the store's shoppers. Products without sales are kept (they may be used in scenarios).
 */
public final class InputValidator {

  public static final String SALES = "sales";
  public static final String PRODUCTS = "products";
  public static final String STORES = "stores";
  public static final String TRAFFIC = "traffic";
  public static final String SHOPPER_DRAWS = "shopper_draws";
  /** Column added to accepted sales: the store-week's market size. */
  public static final String MARKET_SIZE = "market_size";
  /** Sub-folders of the run folder written here. */
  public static final String REJECTS_DIR = "validation/rejects";
  public static final String SUMMARY_DIR = "validation/summary";
  public static final String SUMMARY_TEXT = "validation/summary.txt";

  /** Schema of {@code validation/rejects}. */
  public static final StructType REJECTS_SCHEMA =
      DataTypes.createStructType(
          List.of(
              DataTypes.createStructField("table", DataTypes.StringType, false),
              DataTypes.createStructField("row_number", DataTypes.LongType, false),
              DataTypes.createStructField("store_id", DataTypes.StringType, true),
              DataTypes.createStructField("week", DataTypes.StringType, true),
              DataTypes.createStructField("product_id", DataTypes.StringType, true),
              DataTypes.createStructField("reason", DataTypes.StringType, false),
              DataTypes.createStructField("message", DataTypes.StringType, false)));

  /** Schema of {@code validation/summary}. */
  public static final StructType SUMMARY_SCHEMA =
      DataTypes.createStructType(
          List.of(
              DataTypes.createStructField("table", DataTypes.StringType, false),
              DataTypes.createStructField("outcome", DataTypes.StringType, false),
              DataTypes.createStructField("reason", DataTypes.StringType, true),
              DataTypes.createStructField("rows", DataTypes.LongType, false)));

  private static final String R = TableSpec.REASON;
  private static final String M = TableSpec.MESSAGE;

  private InputValidator() {}

  /**
   * Validates the tables in {@code inputDir} and writes {@code validation/rejects},
   * {@code validation/summary} (Parquet) and {@code validation/summary.txt} under {@code runDir}
   * (a staging folder the caller publishes). It does not enforce the reject share: call
   * {@link ValidatedInput#requireRejectShareAtMost} after publishing.
   *
   * <p>products, stores and traffic are checked on the driver (they hold one row per product,
   * store or store-week, and their keys were always broadcast to the sales check anyway); sales
   * and shopper_draws are checked in one grouped pass each (per store-week and per store), so a
   * validation runs a handful of small Spark jobs rather than a long chain of joins and windows.
   *
   * @throws InputException (exit 2) when a table is missing, its schema is wrong, or sales is
   *     empty; nothing is written then
   */
  public static ValidatedInput run(
      SparkSession spark, RunConfig config, String inputDir, String runDir) {
    InputConfig in = config.input();
    RawTable salesRaw = InputTables.read(spark, inputDir, SALES, in.sales().name(), true).get();
    RawTable productsRaw =
        InputTables.read(spark, inputDir, PRODUCTS, in.products().name(), true).get();
    RawTable storesRaw = InputTables.read(spark, inputDir, STORES, in.stores().name(), true).get();
    Optional<RawTable> trafficRaw =
        InputTables.read(spark, inputDir, TRAFFIC, in.traffic().name(), false);
    Optional<RawTable> drawsRaw =
        InputTables.read(spark, inputDir, SHOPPER_DRAWS, in.shopperDraws().name(), false);

    // Every schema check happens before any row is parsed, so a wrong schema fails at once.
    TableSpec salesSpec = TableSpecs.sales(salesRaw, in.sales());
    TableSpec productsSpec = TableSpecs.products(productsRaw, in.products());
    TableSpec storesSpec = TableSpecs.stores(storesRaw, in.stores());
    TableSpec trafficSpec = trafficRaw.map(t -> TableSpecs.traffic(t, in.traffic())).orElse(null);
    TableSpec drawsSpec =
        drawsRaw.map(t -> TableSpecs.shopperDraws(t, in.shopperDraws())).orElse(null);

    List<String> notes = new ArrayList<>();
    for (TableSpec s : new TableSpec[] {salesSpec, productsSpec, storesSpec, trafficSpec,
        drawsSpec}) {
      if (s != null && !s.ignoredColumns().isEmpty()) {
        notes.add(s.table() + ": columns not used: " + String.join(", ", s.ignoredColumns()));
      }
    }

    JavaSparkContext jsc = JavaSparkContext.fromSparkContext(spark.sparkContext());
    List<Dataset<Row>> persisted = new ArrayList<>();
    List<JavaRDD<Row>> intermediate = new ArrayList<>();
    Map<String, Long> inputRows = new HashMap<>();

    SmallTable products = SmallTable.read(productsRaw, productsSpec);
    products.checks.rejectDuplicates(products.rows, "product_id");
    Set<String> acceptedProducts = new HashSet<>();
    for (Object[] p : products.accepted()) {
      acceptedProducts.add((String) p[products.checks.at("product_id")]);
    }

    SmallTable stores = SmallTable.read(storesRaw, storesSpec);
    stores.checks.rejectDuplicates(stores.rows, "store_id");
    int storeId = stores.checks.at("store_id");
    Map<String, Long> storeSizes = new HashMap<>();
    for (Object[] s : stores.accepted()) {
      storeSizes.put((String) s[storeId], (Long) s[stores.checks.at("shoppers")]);
    }

    JavaRDD<Row> salesParsed = parse(salesRaw, salesSpec, intermediate);
    RowChecks salesChecks = new RowChecks(salesSpec, 1);
    int salesStore = salesChecks.at("store_id");
    int salesWeek = salesChecks.at("week");
    // Store-weeks of every sales row with a store, accepted or not (see the class comment).
    Set<List<Object>> salesMarkets = new HashSet<>();
    for (List<List<Object>> part : salesParsed.mapPartitions(rows -> {
      Set<List<Object>> keys = new HashSet<>();
      rows.forEachRemaining(r -> {
        if (!r.isNullAt(salesStore)) {
          keys.add(Arrays.asList(r.get(salesStore), r.get(salesWeek)));
        }
      });
      return List.of(List.copyOf(keys)).iterator();
    }).collect()) {
      salesMarkets.addAll(part);
    }
    Set<Object> salesStores = new HashSet<>();
    for (List<Object> m : salesMarkets) {
      salesStores.add(m.get(0));
    }

    SmallTable traffic = null;
    Set<List<Object>> rejectedTraffic = new HashSet<>();
    Map<List<Object>, Long> trafficSizes = new HashMap<>();
    if (trafficSpec != null) {
      traffic = SmallTable.read(trafficRaw.get(), trafficSpec);
      RowChecks c = traffic.checks;
      c.rejectDuplicates(traffic.rows, "store_id", "week");
      int store = c.at("store_id");
      int week = c.at("week");
      for (Object[] t : traffic.rows) {
        if (c.open(t) && !storeSizes.containsKey(t[store])) {
          c.reject(t, RejectReason.UNKNOWN_STORE,
              "store_id '" + t[store] + "' is not among the accepted stores");
        }
        if (c.open(t) && !salesMarkets.contains(Arrays.asList(t[store], t[week]))) {
          c.reject(t, RejectReason.MARKET_WITHOUT_PRODUCTS, "store_id '" + t[store] + "' week "
              + t[week] + " has no sales rows (no products on the shelf)");
        }
        List<Object> key = Arrays.asList(t[store], t[week]);
        if (c.open(t)) {
          trafficSizes.put(key, (Long) t[c.at("shoppers")]);
        } else if (t[store] != null && t[week] != null) {
          rejectedTraffic.add(key);
        }
      }
    }

    Broadcast<MarketKeys> keys = jsc.broadcast(
        new MarketKeys(storeSizes, acceptedProducts, rejectedTraffic, trafficSizes));
    JavaRDD<Row> salesChecked = salesParsed
        .groupBy(r -> Arrays.asList(r.get(salesStore), r.get(salesWeek)))
        .flatMap(market -> checkMarket(market._2(), salesChecks, keys.value()).iterator());
    StructType salesSchema = salesSpec.parsedSchema()
        .add(DataTypes.createStructField(MARKET_SIZE, DataTypes.LongType, true));
    Dataset<Row> sales = keep(spark.createDataFrame(salesChecked, salesSchema), persisted);
    Dataset<Row> acceptedSales = accepted(sales);

    for (Object[] s : stores.rows) {
      if (!salesStores.contains(s[storeId])) {
        stores.checks.reject(s, RejectReason.STORE_WITHOUT_MARKETS, "store_id '" + s[storeId]
            + "' has no sales rows, so it has no market to estimate");
      }
    }
    Set<String> acceptedStores = new HashSet<>();
    for (Object[] s : stores.accepted()) {
      acceptedStores.add((String) s[storeId]);
    }

    Dataset<Row> draws = null;
    JavaRDD<Row> drawsParsed = null;
    if (drawsSpec != null) {
      drawsParsed = parse(drawsRaw.get(), drawsSpec, intermediate);
      RowChecks drawChecks = new RowChecks(drawsSpec, 0);
      int drawStore = drawChecks.at("store_id");
      Broadcast<Set<String>> known = jsc.broadcast(acceptedStores);
      JavaRDD<Row> drawsChecked = drawsParsed
          .groupBy(r -> Arrays.asList(r.get(drawStore)))
          .flatMap(store -> checkDraws(store._2(), drawChecks, known.value()).iterator());
      draws = keep(spark.createDataFrame(drawsChecked, drawsSpec.parsedSchema()), persisted);
    }

    Map<String, Dataset<Row>> finals = new LinkedHashMap<>();
    finals.put(SALES, sales);
    finals.put(PRODUCTS, products.toDataset(spark));
    finals.put(STORES, stores.toDataset(spark));
    inputRows.put(PRODUCTS, (long) products.rows.size());
    inputRows.put(STORES, (long) stores.rows.size());
    if (traffic != null) {
      finals.put(TRAFFIC, traffic.toDataset(spark));
      inputRows.put(TRAFFIC, (long) traffic.rows.size());
    }
    if (draws != null) {
      finals.put(SHOPPER_DRAWS, draws);
    }
    inputRows.put(SALES, salesParsed.count());
    if (drawsParsed != null) {
      inputRows.put(SHOPPER_DRAWS, drawsParsed.count());
    }
    ValidationSummary summary = count(finals, inputRows);
    if (summary.table(SALES).inputRows() == 0) {
      unpersistAll(persisted);
      intermediate.forEach(r -> r.unpersist(false));
      throw new InputException("table sales (" + salesRaw.location() + ") has no rows");
    }

    writeOutputs(spark, finals, summary, config.validation().maxRejectShare(), runDir);
    intermediate.forEach(r -> r.unpersist(false));

    ValidatedInput.Columns columns = new ValidatedInput.Columns(
        salesSpec.names(FieldKind.NUMBER),
        salesSpec.names(FieldKind.POSITIVE_NUMBER),
        productsSpec.names(FieldKind.NUMBER),
        storesSpec.names(FieldKind.NUMBER),
        drawsSpec == null ? List.of() : drawsSpec.names(FieldKind.NUMBER));
    return new ValidatedInput(
        output(acceptedSales, salesSpec, MARKET_SIZE),
        output(accepted(finals.get(PRODUCTS)), productsSpec),
        output(accepted(finals.get(STORES)), storesSpec),
        traffic == null ? null : output(accepted(finals.get(TRAFFIC)), trafficSpec),
        draws == null ? null : output(accepted(draws), drawsSpec),
        columns, summary, notes, persisted);
  }

  /** Keys the sales check looks up; built on the driver and broadcast. */
  private record MarketKeys(Map<String, Long> storeSizes, Set<String> products,
      Set<List<Object>> rejectedTraffic, Map<List<Object>, Long> trafficSizes)
      implements Serializable {}

  /**
   * Checks the sales rows of one store-week (the parse rejects come with the rows): duplicate
   * store-week-product, unknown store, unknown product, rejected traffic row, then units above the
   * market size. Each row also gets its market size (last column).
   */
  private static List<Row> checkMarket(Iterable<Row> rows, RowChecks c, MarketKeys k) {
    List<Object[]> market = new ArrayList<>();
    for (Row r : rows) {
      market.add(c.widen(values(r)));
    }
    c.rejectDuplicates(market, "store_id", "week", "product_id");
    int storeAt = c.at("store_id");
    int weekAt = c.at("week");
    int productAt = c.at("product_id");
    int unitsAt = c.at("units");
    int sizeAt = c.width() - 1;
    Long units = null;
    for (Object[] a : market) {
      Object store = a[storeAt];
      Object week = a[weekAt];
      if (c.open(a) && !k.storeSizes().containsKey(store)) {
        c.reject(a, RejectReason.UNKNOWN_STORE, "store_id '" + store
            + "' is not among the accepted stores (absent from stores or rejected there)");
      }
      if (c.open(a) && !k.products().contains(a[productAt])) {
        c.reject(a, RejectReason.UNKNOWN_PRODUCT, "product_id '" + a[productAt]
            + "' is not among the accepted products (absent from products or rejected there)");
      }
      List<Object> key = Arrays.asList(store, week);
      if (c.open(a) && k.rejectedTraffic().contains(key)) {
        c.reject(a, RejectReason.MARKET_SIZE_UNAVAILABLE, "the traffic row for store_id '"
            + store + "' week " + week + " was rejected, so the market size is unknown");
      }
      Long fromTraffic = k.trafficSizes().get(key);
      a[sizeAt] = fromTraffic != null ? fromTraffic : k.storeSizes().get(store);
      if (c.open(a)) {
        units = (units == null ? 0L : units) + (Long) a[unitsAt];
      }
    }
    List<Row> out = new ArrayList<>(market.size());
    for (Object[] a : market) {
      Long size = (Long) a[sizeAt];
      if (c.open(a) && size != null && units > size) {
        List<Object> key = Arrays.asList(a[storeAt], a[weekAt]);
        String source =
            k.trafficSizes().containsKey(key) ? "traffic.shoppers" : "stores.shoppers";
        c.reject(a, RejectReason.UNITS_ABOVE_MARKET_SIZE, "units of store_id '" + a[storeAt]
            + "' week " + a[weekAt] + " sum to " + units + ", above the market size " + size
            + " (" + source + "); every row of this market is rejected");
      }
      out.add(RowFactory.create(a));
    }
    return out;
  }

  /** Checks the shopper draws of one store: duplicate store-draw, then store not accepted. */
  private static List<Row> checkDraws(Iterable<Row> rows, RowChecks c, Set<String> stores) {
    List<Object[]> draws = new ArrayList<>();
    for (Row r : rows) {
      draws.add(values(r));
    }
    c.rejectDuplicates(draws, "store_id", "draw");
    int storeAt = c.at("store_id");
    List<Row> out = new ArrayList<>(draws.size());
    for (Object[] a : draws) {
      if (c.open(a) && !stores.contains(a[storeAt])) {
        c.reject(a, RejectReason.UNKNOWN_STORE, "store_id '" + a[storeAt]
            + "' is not among the accepted stores (draw " + a[c.at("draw")] + ")");
      }
      out.add(RowFactory.create(a));
    }
    return out;
  }

  private static Object[] values(Row r) {
    Object[] a = new Object[r.length()];
    for (int i = 0; i < a.length; i++) {
      a[i] = r.get(i);
    }
    return a;
  }

  /** A small table's parsed rows, held on the driver in file order. */
  private static final class SmallTable {
    final TableSpec spec;
    final RowChecks checks;
    final List<Object[]> rows;

    private SmallTable(TableSpec spec, List<Object[]> rows) {
      this.spec = spec;
      this.checks = new RowChecks(spec, 0);
      this.rows = rows;
    }

    static SmallTable read(RawTable raw, TableSpec spec) {
      RowParser parser = new RowParser(spec);
      List<Row> source = sourceColumns(raw, spec).collectAsList();
      List<Object[]> rows = new ArrayList<>(source.size());
      for (int i = 0; i < source.size(); i++) {
        rows.add(parser.values(source.get(i), i));
      }
      return new SmallTable(spec, rows);
    }

    List<Object[]> accepted() {
      return rows.stream().filter(checks::open).toList();
    }

    Dataset<Row> toDataset(SparkSession spark) {
      List<Row> out = new ArrayList<>(rows.size());
      for (Object[] r : rows) {
        out.add(RowFactory.create(r));
      }
      return spark.createDataFrame(out, spec.parsedSchema());
    }
  }

  /** The spec's source columns of a raw table, in field order, in the parser's input types. */
  private static Dataset<Row> sourceColumns(RawTable raw, TableSpec spec) {
    StructType rawSchema = raw.rows().schema();
    List<Column> select = new ArrayList<>();
    for (TableSpec.Field f : spec.fields()) {
      Column c = col("`" + f.source() + "`");
      DataType t = rawSchema.apply(f.source()).dataType();
      if (raw.format() == Format.PARQUET) {
        if (f.kind() == FieldKind.WEEK && (t instanceof DateType || t instanceof TimestampType
            || t instanceof TimestampNTZType)) {
          c = date_format(c, "yyyy-MM-dd");
        } else if (t instanceof BooleanType) {
          c = c.cast(DataTypes.IntegerType);
        }
      }
      select.add(c);
    }
    return raw.rows().select(select.toArray(new Column[0]));
  }

  /** Parses a large table's rows on the executors, numbering rows 1.. in file order. */
  private static JavaRDD<Row> parse(RawTable raw, TableSpec spec, List<JavaRDD<Row>> persisted) {
    RowParser parser = new RowParser(spec);
    JavaRDD<Row> rows = sourceColumns(raw, spec).javaRDD()
        .zipWithIndex()
        .map(t -> RowFactory.create(parser.values(t._1(), t._2())))
        .persist(StorageLevel.MEMORY_AND_DISK());
    persisted.add(rows);
    return rows;
  }

  private static Dataset<Row> keep(Dataset<Row> d, List<Dataset<Row>> list) {
    Dataset<Row> p = d.persist(StorageLevel.MEMORY_AND_DISK());
    list.add(p);
    return p;
  }

  private static void unpersistAll(List<Dataset<Row>> list) {
    for (Dataset<Row> d : list) {
      d.unpersist(false);
    }
  }

  private static Dataset<Row> accepted(Dataset<Row> d) {
    return d.filter(col(R).isNull());
  }

  /** Accepted rows with canonical names and types (week as a date). */
  private static Dataset<Row> output(Dataset<Row> accepted, TableSpec spec, String... extra) {
    List<Column> cols = new ArrayList<>();
    for (TableSpec.Field f : spec.fields()) {
      Column c = col("`" + f.name() + "`");
      cols.add(f.kind() == FieldKind.WEEK ? to_date(c).as(f.name()) : c);
    }
    for (String e : extra) {
      cols.add(col(e));
    }
    return accepted.select(cols.toArray(new Column[0]));
  }

  /**
   * Counts outcomes per table and checks them against a separate count of the rows as read (the
   * row parser maps rows one to one), so a row lost or duplicated by a check fails the run
   * instead of going unnoticed.
   */
  private static ValidationSummary count(
      Map<String, Dataset<Row>> finals, Map<String, Long> inputRows) {
    Dataset<Row> all = null;
    for (Map.Entry<String, Dataset<Row>> e : finals.entrySet()) {
      Dataset<Row> part = e.getValue().select(lit(e.getKey()).as("table"), col(R));
      all = all == null ? part : all.unionAll(part);
    }
    List<Row> rows = all.groupBy(col("table"), col(R)).count().collectAsList();
    Map<String, long[]> accepted = new HashMap<>();
    Map<String, Map<String, Long>> rejected = new HashMap<>();
    for (Row r : rows) {
      String table = r.getString(0);
      long n = r.getLong(2);
      if (r.isNullAt(1)) {
        accepted.computeIfAbsent(table, t -> new long[1])[0] += n;
      } else {
        rejected.computeIfAbsent(table, t -> new HashMap<>()).merge(r.getString(1), n, Long::sum);
      }
    }
    List<ValidationSummary.TableCounts> tables = new ArrayList<>();
    for (String table : finals.keySet()) {
      long acc = accepted.getOrDefault(table, new long[1])[0];
      Map<String, Long> rej = rejected.getOrDefault(table, Map.of());
      long rejTotal = rej.values().stream().mapToLong(Long::longValue).sum();
      long input = inputRows.getOrDefault(table, 0L);
      if (acc + rejTotal != input) {
        throw new IllegalStateException("validation of table " + table + " accounted for "
            + (acc + rejTotal) + " rows (" + acc + " accepted, " + rejTotal + " rejected) but "
            + "the input has " + input);
      }
      tables.add(new ValidationSummary.TableCounts(table, input, acc, rej));
    }
    return new ValidationSummary(tables);
  }

  private static void writeOutputs(SparkSession spark, Map<String, Dataset<Row>> finals,
      ValidationSummary summary, double maxRejectShare, String runDir) {
    Dataset<Row> rejects = null;
    for (Map.Entry<String, Dataset<Row>> e : finals.entrySet()) {
      Dataset<Row> d = e.getValue();
      List<String> names = List.of(d.columns());
      Column none = lit(null).cast(DataTypes.StringType);
      Dataset<Row> part = d.filter(col(R).isNotNull()).select(
          lit(e.getKey()).as("table"),
          col(TableSpec.ROW).as("row_number"),
          (names.contains("store_id") ? col("store_id") : none).as("store_id"),
          (names.contains("week") ? col("week") : none).as("week"),
          (names.contains("product_id") ? col("product_id") : none).as("product_id"),
          col(R).as("reason"),
          col(M).as("message"));
      rejects = rejects == null ? part : rejects.unionAll(part);
    }
    Dataset<Row> typed = spark.createDataFrame(rejects.javaRDD(), REJECTS_SCHEMA);
    typed.repartition(1).sortWithinPartitions("table", "row_number")
        .write().mode(SaveMode.ErrorIfExists).parquet(runDir + "/" + REJECTS_DIR);

    List<Row> summaryRows = new ArrayList<>();
    for (ValidationSummary.TableCounts t : summary.tables()) {
      summaryRows.add(RowFactory.create(t.table(), "accepted", null, t.acceptedRows()));
      for (Map.Entry<String, Long> r : t.rejectsByReason().entrySet()) {
        summaryRows.add(RowFactory.create(t.table(), "rejected", r.getKey(), r.getValue()));
      }
    }
    spark.createDataFrame(summaryRows, SUMMARY_SCHEMA).coalesce(1)
        .write().mode(SaveMode.ErrorIfExists).parquet(runDir + "/" + SUMMARY_DIR);

    Path text = new Path(runDir + "/" + SUMMARY_TEXT);
    try {
      FileSystem fs = text.getFileSystem(spark.sparkContext().hadoopConfiguration());
      try (OutputStream out = fs.create(text, false)) {
        out.write(summary.format(maxRejectShare).getBytes(StandardCharsets.UTF_8));
      }
    } catch (IOException e) {
      throw new IllegalStateException("cannot write " + text + ": " + e.getMessage(), e);
    }
  }
}
