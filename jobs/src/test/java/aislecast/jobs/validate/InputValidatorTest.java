package aislecast.jobs.validate;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.apache.spark.sql.functions.lit;

import aislecast.jobs.config.RunConfig;
import aislecast.jobs.io.InputException;
import aislecast.jobs.spark.SparkSessions;
import java.nio.file.Files;
import java.nio.file.Path;
import java.sql.Date;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;
import java.util.TreeSet;
import java.util.function.Consumer;
import java.util.stream.Stream;
import org.apache.spark.sql.Dataset;
import org.apache.spark.sql.Row;
import org.apache.spark.sql.SparkSession;
import org.apache.spark.sql.types.DataTypes;
import org.apache.spark.sql.types.StructType;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.Arguments;
import org.junit.jupiter.params.provider.MethodSource;

/** Input validation on small CSV and Parquet inputs built here; one Spark session per class. */
class InputValidatorTest {

  private static SparkSessions.Handle handle;
  private static SparkSession spark;

  @TempDir Path tmp;

  @BeforeAll
  static void startSpark() {
    handle = SparkSessions.open("local[2]", "InputValidatorTest");
    spark = handle.spark();
  }

  @AfterAll
  static void stopSpark() {
    handle.close();
  }

  /**
   * One malformed input per reject reason (some put the fault in several tables at once): the
   * mutation, and every (table:row:reason) the rejects table must hold, no more.
   */
  static Stream<Arguments> oneFaultPerReason() {
    List<Arguments> cases = new ArrayList<>();
    add(cases, "negative_units", in -> in.set("sales", 2, "units", "-3"), in -> List.of(
        "sales:2:negative_units"));
    add(cases, "non_integer_units", in -> in.set("sales", 3, "units", "3.5"), in -> List.of(
        "sales:3:non_integer_units"));
    // 3 of the 4 volume_l values still read as numbers, so the column stays an attribute.
    add(cases, "malformed_number", in -> in.set("sales", 4, "units", "abc")
        .set("products", 4, "volume_l", "1 litre"), in -> List.of(
        "sales:4:malformed_number", "products:4:malformed_number"));
    add(cases, "missing_price", in -> in.set("sales", 5, "price", ""), in -> List.of(
        "sales:5:missing_price"));
    add(cases, "non_positive_price", in -> in.set("sales", 6, "price", "-1.25"), in -> List.of(
        "sales:6:non_positive_price"));
    add(cases, "non_finite_value", in -> in.set("sales", 7, "price", "NaN")
        .set("sales", 8, "on_display", "Infinity")
        .set("products", 4, "volume_l", "-inf")
        .set("shopper_draws", 2, "nu1", "nan"), in -> List.of(
        "sales:7:non_finite_value", "sales:8:non_finite_value", "products:4:non_finite_value",
        "shopper_draws:2:non_finite_value"));
    add(cases, "missing_value", in -> in.set("sales", 9, "store_id", "")
        .set("products", 4, "owner", ""), in -> List.of(
        "sales:9:missing_value", "products:4:missing_value"));
    add(cases, "malformed_week", in -> in.set("sales", 10, "week", "2024-02-30"), in -> List.of(
        "sales:10:malformed_week"));
    add(cases, "non_positive_cost_shifter", in -> in.set("sales", 11, "unit_cost", "0"),
        in -> List.of("sales:11:non_positive_cost_shifter"));
    add(cases, "duplicate_key", in -> {
      in.append("sales", in.row("sales", 1));
      in.append("products", in.row("products", 4));
    }, in -> List.of("sales:1:duplicate_key", "sales:13:duplicate_key",
        "products:4:duplicate_key", "products:5:duplicate_key"));
    add(cases, "unknown_product", in -> in.set("sales", 12, "product_id", "P9"), in -> List.of(
        "sales:12:unknown_product"));
    add(cases, "unknown_store", in -> {
      in.set("sales", 1, "store_id", "S9");
      in.append("traffic", "S9,2024-01-01,50");
      in.append("shopper_draws", "S9,0,0.1,0.2");
    }, in -> List.of("sales:1:unknown_store", "traffic:3:unknown_store",
        "shopper_draws:5:unknown_store"));
    // S2 week 1 has no traffic row: its market size is stores.shoppers = 800. S1 week 1 has a
    // traffic row (900) that overrides stores.shoppers (1000).
    add(cases, "units_above_market_size", in -> in.set("sales", 7, "units", "790")
        .set("sales", 1, "units", "880"), in -> {
          List<String> e = tagged("sales", in.salesRows("S2", "2024-01-01"),
              "units_above_market_size");
          e.addAll(tagged("sales", in.salesRows("S1", "2024-01-01"), "units_above_market_size"));
          return e;
        });
    add(cases, "non_positive_market_size", in -> in.set("stores", 2, "shoppers", "0"), in -> {
      List<String> e = tagged("sales", in.salesRows("S2", null), "unknown_store");
      e.add("stores:2:non_positive_market_size");
      e.add("traffic:2:unknown_store");
      e.add("shopper_draws:3:unknown_store");
      e.add("shopper_draws:4:unknown_store");
      return e;
    });
    add(cases, "non_integer_market_size", in -> in.set("traffic", 1, "shoppers", "900.5"),
        in -> {
          List<String> e = tagged("sales", in.salesRows("S1", "2024-01-01"),
              "market_size_unavailable");
          e.add("traffic:1:non_integer_market_size");
          return e;
        });
    add(cases, "market_size_unavailable", in -> in.set("traffic", 2, "shoppers", "-5"), in -> {
      List<String> e = tagged("sales", in.salesRows("S2", "2024-01-08"),
          "market_size_unavailable");
      e.add("traffic:2:non_positive_market_size");
      return e;
    });
    add(cases, "market_without_products", in -> in.append("traffic", "S1,2024-01-15,900"),
        in -> List.of("traffic:3:market_without_products"));
    add(cases, "store_without_markets", in -> in.append("stores", "S3,Fernvale,300,40.0"),
        in -> List.of("stores:3:store_without_markets"));
    add(cases, "invalid_draw_index", in -> in.set("shopper_draws", 1, "draw", "1.5"),
        in -> List.of("shopper_draws:1:invalid_draw_index"));
    return cases.stream();
  }

  /** Every reason code has its case above. */
  @Test
  void everyReasonHasACase() {
    TreeSet<String> names = new TreeSet<>();
    oneFaultPerReason().forEach(a -> names.add((String) a.get()[0]));
    TreeSet<String> codes = new TreeSet<>();
    for (RejectReason r : RejectReason.values()) {
      codes.add(r.code());
    }
    assertEquals(codes, names);
  }

  private static void add(List<Arguments> cases, String name, Consumer<SampleInput> mutate,
      java.util.function.Function<SampleInput, List<String>> expected) {
    cases.add(Arguments.of(name, mutate, expected));
  }

  private static List<String> tagged(String table, List<Integer> rows, String reason) {
    List<String> out = new ArrayList<>();
    for (int r : rows) {
      out.add(table + ":" + r + ":" + reason);
    }
    return out;
  }

  @ParameterizedTest(name = "{0}")
  @MethodSource("oneFaultPerReason")
  void eachFaultIsRejectedWithItsReasonAndNothingIsLost(String name,
      Consumer<SampleInput> mutate,
      java.util.function.Function<SampleInput, List<String>> expected) {
    SampleInput in = new SampleInput();
    mutate.accept(in);
    Path input = in.writeCsv(tmp.resolve("in"));
    Path runDir = tmp.resolve("run");
    try (ValidatedInput v = InputValidator.run(spark, RunConfig.defaults(), input.toString(),
        runDir.toString())) {
      Dataset<Row> rejects = spark.read().parquet(runDir + "/validation/rejects");
      TreeSet<String> got = new TreeSet<>();
      for (Row r : rejects.collectAsList()) {
        got.add(r.getAs("table") + ":" + r.getAs("row_number") + ":" + r.getAs("reason"));
        assertTrue(((String) r.getAs("message")).length() > 10, "message is informative");
      }
      assertEquals(new TreeSet<>(expected.apply(in)), got, "rejected rows and reasons");
      assertNothingLost(in, v, rejects);
    }
  }

  /** accepted + rejected = input rows, per table, counted independently of the summary. */
  private static void assertNothingLost(SampleInput in, ValidatedInput v, Dataset<Row> rejects) {
    Map<String, Long> rejected = new TreeMap<>();
    for (Row r : rejects.groupBy("table").count().collectAsList()) {
      rejected.put(r.getString(0), r.getLong(1));
    }
    Dataset<Row> all = v.sales().select(lit("sales").as("t"))
        .unionAll(v.products().select(lit("products").as("t")))
        .unionAll(v.stores().select(lit("stores").as("t")))
        .unionAll(v.traffic().orElseThrow().select(lit("traffic").as("t")))
        .unionAll(v.shopperDraws().orElseThrow().select(lit("shopper_draws").as("t")));
    Map<String, Long> accepted = new TreeMap<>();
    for (String t : in.tables.keySet()) {
      accepted.put(t, 0L);
    }
    for (Row r : all.groupBy("t").count().collectAsList()) {
      accepted.put(r.getString(0), r.getLong(1));
    }
    for (String table : accepted.keySet()) {
      long input = in.rows(table);
      assertEquals(input, accepted.get(table) + rejected.getOrDefault(table, 0L),
          "accepted + rejected rows of " + table);
      ValidationSummary.TableCounts c = v.summary().table(table);
      assertEquals(input, c.inputRows(), table + " input rows in summary");
      assertEquals(accepted.get(table), c.acceptedRows(), table + " accepted rows in summary");
      assertEquals(rejected.getOrDefault(table, 0L), c.rejectedRows(), table + " rejected");
    }
  }

  @Test
  void validInputPassesUntouched() {
    SampleInput in = new SampleInput();
    Path input = in.writeCsv(tmp.resolve("in"));
    Path runDir = tmp.resolve("run");
    try (ValidatedInput v = InputValidator.run(spark, RunConfig.defaults(), input.toString(),
        runDir.toString())) {
      assertEquals(0, spark.read().parquet(runDir + "/validation/rejects").count());
      assertEquals(0, v.summary().rejectedRows());
      assertNothingLost(in, v, spark.read().parquet(runDir + "/validation/rejects"));
      assertEquals(List.of("on_display"), v.columns().demandShifters());
      assertEquals(List.of("unit_cost"), v.columns().costShifters());
      assertEquals(List.of("sugar_free", "volume_l"), v.columns().attributes());
      assertEquals(List.of("median_income"), v.columns().demographics());
      assertEquals(List.of("nu0", "nu1"), v.columns().drawColumns());

      // Every accepted sales value equals the CSV text it came from.
      List<Row> sales = v.sales().orderBy("store_id", "week", "product_id").collectAsList();
      List<String> lines = in.tables.get("sales");
      for (int i = 1; i < lines.size(); i++) {
        String[] f = lines.get(i).split(",");
        Row r = sales.get(i - 1);
        assertEquals(f[0], r.getAs("store_id"));
        assertEquals(Date.valueOf(f[1]), r.getAs("week"));
        assertEquals(f[2], r.getAs("product_id"));
        assertEquals(Long.parseLong(f[3]), (long) r.getAs("units"));
        assertEquals(Double.parseDouble(f[4]), (double) r.getAs("price"));
        assertEquals(Double.parseDouble(f[5]), (double) r.getAs("on_display"));
        assertEquals(Double.parseDouble(f[6]), (double) r.getAs("unit_cost"));
        long expectedSize = f[0].equals("S1") && f[1].equals("2024-01-01") ? 900
            : f[0].equals("S2") && f[1].equals("2024-01-08") ? 700
            : f[0].equals("S1") ? 1000 : 800;
        assertEquals(expectedSize, (long) r.getAs("market_size"), "market size of row " + i);
      }
      Row p4 = v.products().filter("product_id = 'P4'").first();
      assertEquals("Harrow Springs", p4.getAs("owner"));
      assertEquals(1.0, (double) p4.getAs("volume_l"));
      Row s2 = v.stores().filter("store_id = 'S2'").first();
      assertEquals(800L, (long) s2.getAs("shoppers"));
      assertEquals(47.25, (double) s2.getAs("median_income"));
      Row d = v.shopperDraws().orElseThrow().filter("store_id = 'S1' AND draw = 1").first();
      assertEquals(-0.7, (double) d.getAs("nu0"));
      assertTrue(Files.exists(runDir.resolve("validation/summary.txt")));
      assertEquals(5, spark.read().parquet(runDir + "/validation/summary").count(),
          "one accepted row per table, no rejected rows");
    }
  }

  @Test
  void optionalTablesMayBeAbsent() {
    SampleInput in = new SampleInput().drop("traffic").drop("shopper_draws");
    Path input = in.writeCsv(tmp.resolve("in"));
    try (ValidatedInput v = InputValidator.run(spark, RunConfig.defaults(), input.toString(),
        tmp.resolve("run").toString())) {
      assertTrue(v.traffic().isEmpty());
      assertTrue(v.shopperDraws().isEmpty());
      assertEquals(0, v.summary().rejectedRows());
      // Without traffic every market's size is the store's shoppers.
      assertEquals(0, v.sales().filter("market_size <> 1000 AND store_id = 'S1'").count());
    }
  }

  @Test
  void parquetInputWithTypedColumnsIsReadAndChecked() {
    SampleInput in = new SampleInput();
    Path csv = in.writeCsv(tmp.resolve("csv"));
    Path input = tmp.resolve("pq");
    // Re-write each table as Parquet with real types: sales as a dataset folder, the others
    // as <name>.parquet.
    Dataset<Row> sales = spark.read().option("header", "true").csv(csv + "/sales.csv")
        .selectExpr("store_id", "CAST(week AS DATE) AS week", "product_id",
            "CAST(units AS BIGINT) AS units",
            "CASE WHEN product_id = 'P2' AND store_id = 'S2' AND week = '2024-01-08'"
                + " THEN CAST('NaN' AS DOUBLE) ELSE CAST(price AS DOUBLE) END AS price",
            "CAST(on_display AS BOOLEAN) AS on_display", "CAST(unit_cost AS DOUBLE) AS unit_cost");
    sales.write().parquet(input.resolve("sales").toString());
    for (String t : List.of("products", "stores", "traffic", "shopper_draws")) {
      Dataset<Row> d = spark.read().option("header", "true").option("inferSchema", "true")
          .csv(csv + "/" + t + ".csv");
      d.write().parquet(input.resolve(t + ".parquet").toString());
    }
    Path runDir = tmp.resolve("run");
    try (ValidatedInput v = InputValidator.run(spark, RunConfig.defaults(), input.toString(),
        runDir.toString())) {
      List<Row> rejects = spark.read().parquet(runDir + "/validation/rejects").collectAsList();
      assertEquals(1, rejects.size());
      assertEquals("non_finite_value", rejects.get(0).getAs("reason"));
      assertEquals("P2", rejects.get(0).getAs("product_id"));
      assertEquals("2024-01-08", rejects.get(0).getAs("week"));
      assertEquals(in.rows("sales") - 1, v.sales().count());
      // Booleans read as 0/1; dates survive; inferred integer ids become text.
      assertEquals(0, v.sales().filter("on_display NOT IN (0.0, 1.0)").count());
      assertEquals(DataTypes.DateType, v.sales().schema().apply("week").dataType());
      assertEquals(4, v.products().count());
    }
  }

  @Test
  void missingRequiredColumnFailsAtOnceNamingTableAndColumn() {
    SampleInput in = new SampleInput();
    // stores without its "region" column.
    in.tables.put("stores", new ArrayList<>(List.of(
        "store_id,shoppers,median_income", "S1,1000,51.5", "S2,800,47.25")));
    Path input = in.writeCsv(tmp.resolve("in"));
    Path runDir = tmp.resolve("run");
    InputException e = assertThrows(InputException.class, () -> InputValidator.run(spark,
        RunConfig.defaults(), input.toString(), runDir.toString()));
    assertTrue(e.getMessage().contains("table stores"), e.getMessage());
    assertTrue(e.getMessage().contains("'region'"), e.getMessage());
    assertEquals(2, e.exitCode());
    assertTrue(!Files.exists(runDir.resolve("validation")), "nothing written on schema errors");
  }

  @Test
  void parquetColumnOfUnusableTypeFailsNamingTableAndColumn() {
    SampleInput in = new SampleInput();
    Path input = in.writeCsv(tmp.resolve("in"));
    StructType schema = DataTypes.createStructType(List.of(
        DataTypes.createStructField("product_id", DataTypes.StringType, false),
        DataTypes.createStructField("owner", DataTypes.StringType, false),
        DataTypes.createStructField("volume_l", DataTypes.StringType, false)));
    List<Row> rows = List.of(org.apache.spark.sql.RowFactory.create("P1", "O", "0.33"));
    // owner as an array: no usable reading.
    spark.createDataFrame(rows, schema)
        .selectExpr("product_id", "array(owner) AS owner", "volume_l")
        .write().parquet(input.resolve("products").toString());
    try {
      Files.delete(input.resolve("products.csv"));
    } catch (java.io.IOException ex) {
      throw new java.io.UncheckedIOException(ex);
    }
    InputException e = assertThrows(InputException.class, () -> InputValidator.run(spark,
        RunConfig.defaults(), input.toString(), tmp.resolve("run").toString()));
    assertTrue(e.getMessage().contains("table products"), e.getMessage());
    assertTrue(e.getMessage().contains("'owner' has type array<string>"), e.getMessage());
  }

  @Test
  void missingOrAmbiguousTableIsAnInputError() throws Exception {
    SampleInput in = new SampleInput();
    Path input = in.writeCsv(tmp.resolve("in"));
    Files.delete(input.resolve("products.csv"));
    InputException missing = assertThrows(InputException.class, () -> InputValidator.run(spark,
        RunConfig.defaults(), input.toString(), tmp.resolve("run1").toString()));
    assertTrue(missing.getMessage().contains("table products is missing"), missing.getMessage());

    in.writeCsv(input);
    Files.writeString(input.resolve("products.parquet"), "not parquet");
    InputException ambiguous = assertThrows(InputException.class, () -> InputValidator.run(spark,
        RunConfig.defaults(), input.toString(), tmp.resolve("run2").toString()));
    assertTrue(ambiguous.getMessage().contains("ambiguous"), ambiguous.getMessage());
  }
}
