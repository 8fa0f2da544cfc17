package aislecast.core.sim;

/**
 * Invented names of the chilled-drinks demo: owners, their brands, regions and flavours. Owner 0
 * is the user's own portfolio. Beyond the lists, names are numbered.
 */
public final class DemoNames {
  private DemoNames() {}

  private static final String[] OWNERS = {
    "Brightwater Beverages", "Kestrel Drinks Co", "Oakhollow Bottlers", "Lumen Soft Drinks",
    "Saltmarsh Refreshments", "Northgate Beverage Group"
  };
  private static final String[] BRANDS = {"Glint", "Swoop", "Hollow Root", "Ray", "Brine", "Gatehouse"};
  private static final String[] REGIONS = {
    "Kingsmoor", "Ashdale Coast", "Greyford Valley", "Linden Flats", "Marrow Point", "Westerhythe"
  };
  private static final String[] FLAVOURS = {
    "Cola", "Lemon Lime", "Blood Orange", "Energy", "Peach Iced Tea", "Ginger Fizz", "Cloudy Apple",
    "Berry Sparkle"
  };

  /** Owner name; owner 0 is the user's own portfolio. */
  public static String owner(int o) {
    return o < OWNERS.length ? OWNERS[o] : "Owner " + (o + 1);
  }

  public static String brand(int o) {
    return o < BRANDS.length ? BRANDS[o] : "Brand " + (o + 1);
  }

  public static String region(int r) {
    return r < REGIONS.length ? REGIONS[r] : "Region " + (r + 1);
  }

  public static String flavour(int f) {
    return FLAVOURS[Math.floorMod(f, FLAVOURS.length)];
  }

  /** Store id, zero-padded to a width that fits {@code count}. */
  public static String storeId(int s, int count) {
    return "CS" + pad(s + 1, count);
  }

  /** Product id, zero-padded to a width that fits {@code count}. */
  public static String productId(int j, int count) {
    return "CD" + pad(j + 1, count);
  }

  private static String pad(int n, int count) {
    int width = Math.max(3, Integer.toString(count).length());
    String s = Integer.toString(n);
    return "0".repeat(Math.max(0, width - s.length())) + s;
  }
}
