package aislecast.core.scenario;

/**
 * A direct price change on one product; the product then keeps this price under either response.
 *
 * @param productId the product
 * @param kind how {@code amount} applies to the base price
 * @param amount percent, currency amount, or new price (see {@link Kind})
 */
public record PriceChange(String productId, Kind kind, double amount) {
  public enum Kind {
    /** new price = base * (1 + amount / 100) */
    PERCENT,
    /** new price = base + amount */
    ABSOLUTE,
    /** new price = amount */
    SET
  }

  public PriceChange {
    if (productId == null || productId.isEmpty()) {
      throw new IllegalArgumentException("price change without a product id");
    }
    if (kind == null) {
      throw new IllegalArgumentException("price change on " + productId + " without a kind");
    }
    if (!Double.isFinite(amount)) {
      throw new IllegalArgumentException("price change on " + productId + ": amount " + amount);
    }
  }

  public static PriceChange percent(String productId, double percent) {
    return new PriceChange(productId, Kind.PERCENT, percent);
  }

  public static PriceChange absolute(String productId, double amount) {
    return new PriceChange(productId, Kind.ABSOLUTE, amount);
  }

  public static PriceChange set(String productId, double price) {
    return new PriceChange(productId, Kind.SET, price);
  }

  /** The changed price given the base price. */
  public double apply(double basePrice) {
    return switch (kind) {
      case PERCENT -> basePrice * (1.0 + amount / 100.0);
      case ABSOLUTE -> basePrice + amount;
      case SET -> amount;
    };
  }
}
