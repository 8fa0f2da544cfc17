package aislecast.jobs.config;

import com.fasterxml.jackson.annotation.JsonProperty;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.List;
import java.util.Set;
import java.util.regex.Pattern;

/**
 * Where the input tables are and which columns mean what (DESIGN section 3). Every key is
 * optional; an absent key takes the default documented on its record. A table's {@code name} is
 * the entry looked up in the input folder: {@code <name>.csv}, {@code <name>.parquet} or a Parquet
 * dataset folder {@code <name>/}.
 *
 * <p>Column lists that are absent (or {@code null}) are resolved from the data: see each record.
 * An explicit list (even an empty one) is used as given, and every column in it must exist.
 */
public record InputConfig(
    @JsonProperty("sales") Sales sales,
    @JsonProperty("products") Products products,
    @JsonProperty("stores") Stores stores,
    @JsonProperty("traffic") Traffic traffic,
    @JsonProperty("shopper_draws") ShopperDraws shopperDraws) {

  private static final Pattern TABLE_NAME = Pattern.compile("[A-Za-z0-9_][A-Za-z0-9_.-]*");

  public InputConfig {
    sales = sales == null ? Sales.defaults() : sales;
    products = products == null ? Products.defaults() : products;
    stores = stores == null ? Stores.defaults() : stores;
    traffic = traffic == null ? Traffic.defaults() : traffic;
    shopperDraws = shopperDraws == null ? ShopperDraws.defaults() : shopperDraws;
  }

  public static InputConfig defaults() {
    return new InputConfig(null, null, null, null, null);
  }

  /**
   * {@code sales}: one row per store, week and stocked product.
   *
   * @param demandShifters time-varying demand shifters (numeric, finite). Default (absent):
   *     {@code [on_display]} if the sales table has that column, otherwise none.
   * @param costShifters cost shifters excluded from demand (numeric, finite, > 0 because they
   *     enter the price equation in logs). Default (absent): {@code [unit_cost]} if present.
   */
  public record Sales(
      @JsonProperty("name") String name,
      @JsonProperty("columns") SalesColumns columns,
      @JsonProperty("demand_shifters") List<String> demandShifters,
      @JsonProperty("cost_shifters") List<String> costShifters) {
    public static final List<String> DEFAULT_DEMAND_SHIFTERS = List.of("on_display");
    public static final List<String> DEFAULT_COST_SHIFTERS = List.of("unit_cost");

    public Sales {
      name = tableName(name, "sales");
      columns = columns == null ? SalesColumns.defaults() : columns;
      demandShifters = columnList(demandShifters, "input.sales.demand_shifters");
      costShifters = columnList(costShifters, "input.sales.cost_shifters");
      List<String> all = new ArrayList<>(columns.all());
      if (demandShifters != null) {
        all.addAll(demandShifters);
      }
      if (costShifters != null) {
        all.addAll(costShifters);
      }
      requireDistinct(all, "input.sales");
    }

    public static Sales defaults() {
      return new Sales(null, null, null, null);
    }
  }

  /** Column names of the sales table's fixed fields; each defaults to its own key. */
  public record SalesColumns(
      @JsonProperty("store_id") String storeId,
      @JsonProperty("week") String week,
      @JsonProperty("product_id") String productId,
      @JsonProperty("units") String units,
      @JsonProperty("price") String price) {
    public SalesColumns {
      storeId = column(storeId, "store_id", "input.sales.columns.store_id");
      week = column(week, "week", "input.sales.columns.week");
      productId = column(productId, "product_id", "input.sales.columns.product_id");
      units = column(units, "units", "input.sales.columns.units");
      price = column(price, "price", "input.sales.columns.price");
    }

    public static SalesColumns defaults() {
      return new SalesColumns(null, null, null, null, null);
    }

    public List<String> all() {
      return List.of(storeId, week, productId, units, price);
    }
  }

  /**
   * {@code products}: one row per product.
   *
   * @param attributes numeric product attributes. Default (absent): every column other than the
   *     key columns whose values are numeric (Parquet: a numeric or boolean type; CSV: more than
   *     half of the non-empty values parse as numbers). Text columns (names, brands) are ignored.
   */
  public record Products(
      @JsonProperty("name") String name,
      @JsonProperty("columns") ProductsColumns columns,
      @JsonProperty("attributes") List<String> attributes) {
    public Products {
      name = tableName(name, "products");
      columns = columns == null ? ProductsColumns.defaults() : columns;
      attributes = columnList(attributes, "input.products.attributes");
      List<String> all = new ArrayList<>(columns.all());
      if (attributes != null) {
        all.addAll(attributes);
      }
      requireDistinct(all, "input.products");
    }

    public static Products defaults() {
      return new Products(null, null, null);
    }
  }

  /** Column names of the products table's fixed fields. */
  public record ProductsColumns(
      @JsonProperty("product_id") String productId, @JsonProperty("owner") String owner) {
    public ProductsColumns {
      productId = column(productId, "product_id", "input.products.columns.product_id");
      owner = column(owner, "owner", "input.products.columns.owner");
    }

    public static ProductsColumns defaults() {
      return new ProductsColumns(null, null);
    }

    public List<String> all() {
      return List.of(productId, owner);
    }
  }

  /**
   * {@code stores}: one row per store.
   *
   * @param demographics numeric store demographics. Default (absent): every numeric column other
   *     than the key columns, found as for product attributes.
   */
  public record Stores(
      @JsonProperty("name") String name,
      @JsonProperty("columns") StoresColumns columns,
      @JsonProperty("demographics") List<String> demographics) {
    public Stores {
      name = tableName(name, "stores");
      columns = columns == null ? StoresColumns.defaults() : columns;
      demographics = columnList(demographics, "input.stores.demographics");
      List<String> all = new ArrayList<>(columns.all());
      if (demographics != null) {
        all.addAll(demographics);
      }
      requireDistinct(all, "input.stores");
    }

    public static Stores defaults() {
      return new Stores(null, null, null);
    }
  }

  /** Column names of the stores table's fixed fields. */
  public record StoresColumns(
      @JsonProperty("store_id") String storeId,
      @JsonProperty("region") String region,
      @JsonProperty("shoppers") String shoppers) {
    public StoresColumns {
      storeId = column(storeId, "store_id", "input.stores.columns.store_id");
      region = column(region, "region", "input.stores.columns.region");
      shoppers = column(shoppers, "shoppers", "input.stores.columns.shoppers");
    }

    public static StoresColumns defaults() {
      return new StoresColumns(null, null, null);
    }

    public List<String> all() {
      return List.of(storeId, region, shoppers);
    }
  }

  /** Optional {@code traffic} table: weekly market size per store, overriding stores.shoppers. */
  public record Traffic(
      @JsonProperty("name") String name, @JsonProperty("columns") TrafficColumns columns) {
    public Traffic {
      name = tableName(name, "traffic");
      columns = columns == null ? TrafficColumns.defaults() : columns;
      requireDistinct(columns.all(), "input.traffic");
    }

    public static Traffic defaults() {
      return new Traffic(null, null);
    }
  }

  /** Column names of the traffic table. */
  public record TrafficColumns(
      @JsonProperty("store_id") String storeId,
      @JsonProperty("week") String week,
      @JsonProperty("shoppers") String shoppers) {
    public TrafficColumns {
      storeId = column(storeId, "store_id", "input.traffic.columns.store_id");
      week = column(week, "week", "input.traffic.columns.week");
      shoppers = column(shoppers, "shoppers", "input.traffic.columns.shoppers");
    }

    public static TrafficColumns defaults() {
      return new TrafficColumns(null, null, null);
    }

    public List<String> all() {
      return List.of(storeId, week, shoppers);
    }
  }

  /**
   * Optional {@code shopper_draws} table: standard-normal shopper draws per store.
   *
   * @param drawColumns the draw coordinates in order (nu0 is the price coefficient's). Default
   *     (absent): every column named {@code nu<k>}, ordered by k.
   */
  public record ShopperDraws(
      @JsonProperty("name") String name,
      @JsonProperty("columns") ShopperDrawsColumns columns,
      @JsonProperty("draw_columns") List<String> drawColumns) {
    public ShopperDraws {
      name = tableName(name, "shopper_draws");
      columns = columns == null ? ShopperDrawsColumns.defaults() : columns;
      drawColumns = columnList(drawColumns, "input.shopper_draws.draw_columns");
      List<String> all = new ArrayList<>(columns.all());
      if (drawColumns != null) {
        all.addAll(drawColumns);
      }
      requireDistinct(all, "input.shopper_draws");
    }

    public static ShopperDraws defaults() {
      return new ShopperDraws(null, null, null);
    }
  }

  /** Column names of the shopper_draws table's fixed fields. */
  public record ShopperDrawsColumns(
      @JsonProperty("store_id") String storeId, @JsonProperty("draw") String draw) {
    public ShopperDrawsColumns {
      storeId = column(storeId, "store_id", "input.shopper_draws.columns.store_id");
      draw = column(draw, "draw", "input.shopper_draws.columns.draw");
    }

    public static ShopperDrawsColumns defaults() {
      return new ShopperDrawsColumns(null, null);
    }

    public List<String> all() {
      return List.of(storeId, draw);
    }
  }

  private static String tableName(String value, String dflt) {
    if (value == null) {
      return dflt;
    }
    if (!TABLE_NAME.matcher(value).matches()) {
      throw new ConfigException(
          "input." + dflt + ".name: '" + value + "' is not a valid table entry name"
              + " (letters, digits, '_', '.', '-'; no folders)");
    }
    return value;
  }

  private static String column(String value, String dflt, String key) {
    if (value == null) {
      return dflt;
    }
    if (value.isBlank()) {
      throw new ConfigException(key + ": a column name must not be blank");
    }
    return value;
  }

  private static List<String> columnList(List<String> values, String key) {
    if (values == null) {
      return null;
    }
    for (String v : values) {
      if (v == null || v.isBlank()) {
        throw new ConfigException(key + ": column names must not be blank");
      }
    }
    return List.copyOf(values);
  }

  private static void requireDistinct(List<String> columns, String key) {
    Set<String> seen = new HashSet<>();
    for (String c : columns) {
      if (!seen.add(c)) {
        throw new ConfigException(
            key + ": column '" + c + "' is given more than one role; each column has one role");
      }
    }
  }
}
