package aislecast.core.scenario;

/**
 * A new product. Its price is set by the scenario and held under either response.
 *
 * <p>Mean utility: either given ({@code delta}), or "like product X": X's mean utility in the same
 * store and draw plus {@code deltaShift}. In the model (DESIGN section 4) attributes enter utility
 * only through the zero-mean random tastes {@code x' L nu}; their average value sits inside the
 * store-product intercept. So a launch "like X" with changed attributes keeps X's mean utility
 * (unless shifted) and the changed attributes move only whom it attracts: which products it takes
 * share from. A launch at a price other than X's gets more or less demand through {@code -alpha p}.
 * Callers wanting an intercept from the hierarchy pass it as {@code delta}.
 *
 * <p>Cost: given, or (when NaN) the cost of the like product in the same draw.
 *
 * @param productId new product id (must not be stocked in the store)
 * @param owner firm that sets its price (may be a new firm)
 * @param x standardised attributes, length Kx (standardise raw values with the catalog's mean and
 *     sd)
 * @param price its price
 * @param likeProductId product whose mean utility (and, if {@code cost} is NaN, cost) it takes;
 *     null when {@code delta} is given
 * @param deltaShift added to the like product's mean utility
 * @param delta explicit mean utility (price excluded), or NaN to use the like product's
 * @param cost marginal cost, or NaN to use the like product's
 */
public record Launch(String productId, String owner, double[] x, double price,
    String likeProductId, double deltaShift, double delta, double cost) {

  public Launch {
    if (productId == null || productId.isEmpty() || owner == null || owner.isEmpty()) {
      throw new IllegalArgumentException("a launch needs a product id and an owner");
    }
    if (x == null) {
      throw new IllegalArgumentException("launch " + productId + ": no attributes");
    }
    for (double v : x) {
      if (!Double.isFinite(v)) {
        throw new IllegalArgumentException("launch " + productId + ": attribute " + v);
      }
    }
    if (!(price > 0) || !Double.isFinite(price)) {
      throw new IllegalArgumentException("launch " + productId + ": price must be > 0, got " + price);
    }
    if (Double.isNaN(delta) && likeProductId == null) {
      throw new IllegalArgumentException(
          "launch " + productId + ": give a mean utility or a product it is like");
    }
    if (Double.isNaN(cost) && likeProductId == null) {
      throw new IllegalArgumentException(
          "launch " + productId + ": give a cost or a product it is like");
    }
    if (!Double.isFinite(deltaShift) || Double.isInfinite(delta) || Double.isInfinite(cost)) {
      throw new IllegalArgumentException("launch " + productId + ": non-finite utility or cost");
    }
    x = x.clone();
  }

  /** A launch like {@code likeProductId}: its mean utility and cost, new attributes and price. */
  public static Launch like(String productId, String owner, String likeProductId, double[] x,
      double price) {
    return new Launch(productId, owner, x, price, likeProductId, 0.0, Double.NaN, Double.NaN);
  }

  /** A launch with explicit mean utility and cost. */
  public static Launch of(String productId, String owner, double[] x, double price, double delta,
      double cost) {
    return new Launch(productId, owner, x, price, null, 0.0, delta, cost);
  }

  @Override
  public double[] x() {
    return x.clone();
  }
}
