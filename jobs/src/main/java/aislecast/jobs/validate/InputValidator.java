package aislecast.jobs.validate;

import static org.apache.spark.sql.functions.broadcast;
import static org.apache.spark.sql.functions.coalesce;
import static org.apache.spark.sql.functions.col;
import static org.apache.spark.sql.functions.concat;
import static org.apache.spark.sql.functions.date_format;
import static org.apache.spark.sql.functions.lit;
import static org.apache.spark.sql.functions.sum;
import static org.apache.spark.sql.functions.to_date;
import static org.apache.spark.sql.functions.when;

import aislecast.jobs.config.InputConfig;
import aislecast.jobs.config.RunConfig;
import aislecast.jobs.io.InputException;
import aislecast.jobs.io.InputTables;
import aislecast.jobs.io.InputTables.Format;
import aislecast.jobs.io.InputTables.RawTable;
import java.io.IOException;
import java.io.OutputStream;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import org.apache.hadoop.fs.FileSystem;
import org.apache.hadoop.fs.Path;
import org.apache.spark.api.java.JavaRDD;
import org.apache.spark.sql.Column;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.RowFactory;
import org.apache.spark.sql.SaveMode;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.expressions.Window;
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
  private static final String FLAG = "_flag";

  private InputValidator() {}

  /**
   * Validates the tables in {@code inputDir} and writes {@code validation/rejects},
   * {@code validation/summary} (Parquet) and {@code validation/summary.txt} under {@code runDir}
   * (a staging folder the caller publishes). It does not enforce the reject share: call
   * {@link ValidatedInput#requireRejectShareAtMost} after publishing.
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

    List<Dataset<Row>> persisted = new ArrayList<>();
    List<Dataset<Row>> intermediate = new ArrayList<>();
    Map<String, Dataset<Row>> parsedByTable = new HashMap<>();

    Dataset<Row> products = rejectDuplicates(parse(spark, productsRaw, productsSpec, intermediate, parsedByTable),
        "product_id");
    products = keep(products, persisted);
    Dataset<Row> acceptedProducts = accepted(products);

    Dataset<Row> storesChecked =
        keep(rejectDuplicates(parse(spark, storesRaw, storesSpec, intermediate, parsedByTable), "store_id"),
            intermediate);
    Dataset<Row> knownStores = accepted(storesChecked);

    Dataset<Row> sales = parse(spark, salesRaw, salesSpec, intermediate, parsedByTable);
    Dataset<Row> salesKeys = sales.filter(col("store_id").isNotNull()).select("store_id", "week");

    Dataset<Row> traffic = null;
    if (trafficSpec != null) {
      traffic = parse(spark, trafficRaw.get(), trafficSpec, intermediate, parsedByTable);
      traffic = rejectDuplicates(traffic, "store_id", "week");
      traffic = flagByMatch(traffic, knownStores.select("store_id"), false,
          RejectReason.UNKNOWN_STORE,
          concat(lit("store_id '"), col("store_id"), lit("' is not among the accepted stores")),
          true, "store_id");
      traffic = flagByMatch(traffic, salesKeys, false, RejectReason.MARKET_WITHOUT_PRODUCTS,
          concat(lit("store_id '"), col("store_id"), lit("' week "), col("week"),
              lit(" has no sales rows (no products on the shelf)")),
          false, "store_id", "week");
      traffic = keep(traffic, persisted);
    }

    sales = rejectDuplicates(sales, "store_id", "week", "product_id");
    sales = flagByMatch(sales, knownStores.select("store_id"), false, RejectReason.UNKNOWN_STORE,
        concat(lit("store_id '"), col("store_id"),
            lit("' is not among the accepted stores (absent from stores or rejected there)")),
        true, "store_id");
    sales = flagByMatch(sales, acceptedProducts.select("product_id"), false,
        RejectReason.UNKNOWN_PRODUCT,
        concat(lit("product_id '"), col("product_id"),
            lit("' is not among the accepted products (absent from products or rejected there)")),
        true, "product_id");
    Column trafficSize = lit(null).cast(DataTypes.LongType);
    if (traffic != null) {
      Dataset<Row> rejectedTraffic =
          traffic.filter(col(R).isNotNull().and(col("store_id").isNotNull())
              .and(col("week").isNotNull())).select("store_id", "week");
      sales = flagByMatch(sales, rejectedTraffic, true, RejectReason.MARKET_SIZE_UNAVAILABLE,
          concat(lit("the traffic row for store_id '"), col("store_id"), lit("' week "),
              col("week"), lit(" was rejected, so the market size is unknown")),
          true, "store_id", "week");
      Dataset<Row> t = accepted(traffic).select(col("store_id").as("_t_store"),
          col("week").as("_t_week"), col("shoppers").as("_t_size"));
      sales = sales.join(broadcast(t), col("store_id").equalTo(col("_t_store"))
          .and(col("week").equalTo(col("_t_week"))), "left").drop("_t_store", "_t_week");
      trafficSize = col("_t_size");
    }
    Dataset<Row> storeSizes =
        knownStores.select(col("store_id").as("_s_store"), col("shoppers").as("_s_size"));
    sales = sales.join(broadcast(storeSizes), col("store_id").equalTo(col("_s_store")), "left")
        .drop("_s_store");
    if (traffic == null) {
      sales = sales.withColumn("_t_size", trafficSize);
    }
    sales = sales.withColumn(MARKET_SIZE, coalesce(col("_t_size"), col("_s_size")))
        .withColumn("_size_source",
            when(col("_t_size").isNotNull(), lit("traffic.shoppers"))
                .otherwise(lit("stores.shoppers")));
    Column marketUnits = sum(when(col(R).isNull(), col("units"))).over(
        Window.partitionBy(col("store_id"), col("week")));
    sales = sales.withColumn("_market_units", marketUnits);
    sales = flag(sales, col("_market_units").gt(col(MARKET_SIZE)),
        RejectReason.UNITS_ABOVE_MARKET_SIZE,
        concat(lit("units of store_id '"), col("store_id"), lit("' week "), col("week"),
            lit(" sum to "), col("_market_units").cast("string"), lit(", above the market size "),
            col(MARKET_SIZE).cast("string"), lit(" ("), col("_size_source"),
            lit("); every row of this market is rejected")));
    sales = sales.drop("_t_size", "_s_size", "_size_source", "_market_units");
    sales = keep(sales, persisted);
    Dataset<Row> acceptedSales = accepted(sales);

    Dataset<Row> stores = flagByMatch(storesChecked, salesKeys.select("store_id"), false,
        RejectReason.STORE_WITHOUT_MARKETS,
        concat(lit("store_id '"), col("store_id"),
            lit("' has no sales rows, so it has no market to estimate")),
        false, "store_id");
    stores = keep(stores, persisted);

    Dataset<Row> draws = null;
    if (drawsSpec != null) {
      draws = parse(spark, drawsRaw.get(), drawsSpec, intermediate, parsedByTable);
      draws = rejectDuplicates(draws, "store_id", "draw");
      draws = flagByMatch(draws, accepted(stores).select("store_id"), false,
          RejectReason.UNKNOWN_STORE,
          concat(lit("store_id '"), col("store_id"),
              lit("' is not among the accepted stores (draw "), col("draw").cast("string"),
              lit(")")),
          true, "store_id");
      draws = keep(draws, persisted);
    }

    Map<String, Dataset<Row>> finals = new LinkedHashMap<>();
    finals.put(SALES, sales);
    finals.put(PRODUCTS, products);
    finals.put(STORES, stores);
    if (traffic != null) {
      finals.put(TRAFFIC, traffic);
    }
    if (draws != null) {
      finals.put(SHOPPER_DRAWS, draws);
    }
    ValidationSummary summary = count(finals, parsedByTable);
    if (summary.table(SALES).inputRows() == 0) {
      unpersistAll(persisted);
      unpersistAll(intermediate);
      throw new InputException("table sales (" + salesRaw.location() + ") has no rows");
    }

    writeOutputs(spark, finals, summary, config.validation().maxRejectShare(), runDir);
    unpersistAll(intermediate);

    ValidatedInput.Columns columns = new ValidatedInput.Columns(
        salesSpec.names(FieldKind.NUMBER),
        salesSpec.names(FieldKind.POSITIVE_NUMBER),
        productsSpec.names(FieldKind.NUMBER),
        storesSpec.names(FieldKind.NUMBER),
        drawsSpec == null ? List.of() : drawsSpec.names(FieldKind.NUMBER));
    return new ValidatedInput(
        output(acceptedSales, salesSpec, MARKET_SIZE),
        output(accepted(products), productsSpec),
        output(accepted(stores), storesSpec),
        traffic == null ? null : output(accepted(traffic), trafficSpec),
        draws == null ? null : output(accepted(draws), drawsSpec),
        columns, summary, notes, persisted);
  }

  /** Reads raw rows into the parsed schema, numbering rows 1.. in file order. */
  private static Dataset<Row> parse(SparkSession spark, RawTable raw, TableSpec spec,
      List<Dataset<Row>> persisted, Map<String, Dataset<Row>> byTable) {
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
    RowParser parser = new RowParser(spec);
    JavaRDD<Row> rows = raw.rows().select(select.toArray(new Column[0])).javaRDD()
        .zipWithIndex()
        .map(t -> parser.parse(t._1(), t._2()));
    Dataset<Row> parsed = keep(spark.createDataFrame(rows, spec.parsedSchema()), persisted);
    byTable.put(spec.table(), parsed);
    return parsed;
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

  /** Sets reason and message on rows not yet rejected for which {@code cond} holds. */
  private static Dataset<Row> flag(
      Dataset<Row> d, Column cond, RejectReason reason, Column message) {
    return d.withColumn(FLAG, col(R).isNull().and(coalesce(cond, lit(false))))
        .withColumn(M, when(col(FLAG), message).otherwise(col(M)))
        .withColumn(R, when(col(FLAG), lit(reason.code())).otherwise(col(R)))
        .drop(FLAG);
  }

  /** Rejects every copy of a key held by more than one not-yet-rejected row. */
  private static Dataset<Row> rejectDuplicates(Dataset<Row> d, String... keys) {
    Column[] k = new Column[keys.length];
    List<Column> describe = new ArrayList<>();
    for (int i = 0; i < keys.length; i++) {
      k[i] = col(keys[i]);
      describe.add(lit((i == 0 ? "" : ", ") + keys[i] + " '"));
      describe.add(col(keys[i]).cast("string"));
      describe.add(lit("'"));
    }
    d = d.withColumn("_copies",
        sum(when(col(R).isNull(), lit(1L)).otherwise(lit(0L))).over(Window.partitionBy(k)));
    describe.add(lit(" appears in "));
    describe.add(col("_copies").cast("string"));
    describe.add(lit(" rows; every copy is rejected"));
    return flag(d, col("_copies").gt(1), RejectReason.DUPLICATE_KEY,
        concat(describe.toArray(new Column[0]))).drop("_copies");
  }

  /**
   * Flags rows whose keys are absent from {@code keys} ({@code whenMatched} false) or present in
   * it ({@code whenMatched} true). {@code keys} holds exactly the key columns.
   */
  private static Dataset<Row> flagByMatch(Dataset<Row> d, Dataset<Row> keys, boolean whenMatched,
      RejectReason reason, Column message, boolean small, String... keyNames) {
    List<Column> renamed = new ArrayList<>();
    Column on = lit(true);
    for (String k : keyNames) {
      renamed.add(col(k).as("_m_" + k));
      on = on.and(col(k).equalTo(col("_m_" + k)));
    }
    renamed.add(lit(true).as("_m"));
    Dataset<Row> right = keys.distinct().select(renamed.toArray(new Column[0]));
    // Key sets of stores, products and traffic are small: broadcast them rather than shuffle
    // the sales table.
    Dataset<Row> joined = d.join(small ? broadcast(right) : right, on, "left");
    Column cond = whenMatched ? col("_m").isNotNull() : col("_m").isNull();
    Dataset<Row> out = flag(joined, cond, reason, message).drop("_m");
    for (String k : keyNames) {
      out = out.drop("_m_" + k);
    }
    return out;
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
   * row parser maps rows one to one), so a row lost or duplicated by a join or window fails the
   * run instead of going unnoticed.
   */
  private static ValidationSummary count(
      Map<String, Dataset<Row>> finals, Map<String, Dataset<Row>> parsed) {
    Dataset<Row> read = null;
    for (String table : finals.keySet()) {
      Dataset<Row> part = parsed.get(table).select(lit(table).as("table"));
      read = read == null ? part : read.unionAll(part);
    }
    Map<String, Long> inputRows = new HashMap<>();
    for (Row r : read.groupBy("table").count().collectAsList()) {
      inputRows.put(r.getString(0), r.getLong(1));
    }
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
