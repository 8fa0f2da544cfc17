package aislecast.jobs.validate;

/**
 * Why a row was rejected. The code is what {@code validation/rejects.reason} holds. A row gets
 * one reason: the first check it fails, in this order: per-field checks in column order, then
 * duplicates, unknown store/product, markets without products, market-size checks, stores
 * without markets; see {@link InputValidator} for the exact order.
 */
public enum RejectReason {
  MISSING_VALUE("missing_value", "a required value is empty"),
  MALFORMED_NUMBER("malformed_number", "a numeric field does not hold a number"),
  NON_FINITE_VALUE("non_finite_value", "a numeric field is NaN or infinite"),
  MALFORMED_WEEK("malformed_week", "week is not a date written yyyy-MM-dd"),
  NEGATIVE_UNITS("negative_units", "units is below zero"),
  NON_INTEGER_UNITS("non_integer_units", "units is not a whole number"),
  MISSING_PRICE("missing_price", "price is empty"),
  NON_POSITIVE_PRICE("non_positive_price", "price is zero or negative"),
  NON_POSITIVE_COST_SHIFTER(
      "non_positive_cost_shifter", "a cost shifter is zero or negative (it enters in logs)"),
  NON_POSITIVE_MARKET_SIZE("non_positive_market_size", "shoppers is zero or negative"),
  NON_INTEGER_MARKET_SIZE("non_integer_market_size", "shoppers is not a whole number"),
  INVALID_DRAW_INDEX("invalid_draw_index", "draw is not a whole number >= 0"),
  DUPLICATE_KEY(
      "duplicate_key", "another row has the same key (every copy is rejected: none is trusted)"),
  UNKNOWN_STORE("unknown_store", "store_id is not among the accepted stores"),
  UNKNOWN_PRODUCT("unknown_product", "product_id is not among the accepted products"),
  MARKET_SIZE_UNAVAILABLE(
      "market_size_unavailable",
      "the traffic row for this store-week was rejected, so the market size is unknown"),
  UNITS_ABOVE_MARKET_SIZE(
      "units_above_market_size",
      "units of the store-week sum above its market size (every row of that market is rejected)"),
  MARKET_WITHOUT_PRODUCTS(
      "market_without_products", "traffic row for a store-week that has no sales rows at all"),
  STORE_WITHOUT_MARKETS("store_without_markets", "store that has no sales rows at all");

  private final String code;
  private final String description;

  RejectReason(String code, String description) {
    this.code = code;
    this.description = description;
  }

  /** lower_snake_case code written to the rejects table. */
  public String code() {
    return code;
  }

  /** One-line explanation for documentation and summaries. */
  public String description() {
    return description;
  }
}
