package aislecast.core.sim;

/**
 * A data set simulated by {@link DemandSimulator}: the tables, the true parameters and the
 * per-row truth, in flat arrays (row-major). Rows are the stocked store-week-products, ordered by
 * store, week, then product index. Arrays are shared, not copied: treat them as read-only.
 */
public final class SimulatedData {
  public final SimSettings settings;

  // products (J of them) and attributes (Kx)
  public final String[] productIds;
  public final String[] productNames;
  public final int[] productOwner;
  public final String[] ownerNames;
  public final String[] attributeNames;
  /** Decimals the raw attribute values are generated (and written) with. */
  public final int[] attributeDecimals;
  /** Raw attributes as in products.csv, J x Kx. */
  public final double[] xRaw;
  /** Standardised attributes used in the model, J x Kx. */
  public final double[] xStd;
  public final double[] xMean;
  public final double[] xSd;
  public final double[] typicalPrice;
  public final double[] baseCost;
  public final double[] kappabar;
  public final double[] pi0;

  // stores (S of them)
  public final String[] storeIds;
  public final String[] regionNames;
  public final int[] storeRegion;
  public final int[] shoppers;
  public final double[] medianIncome;
  public final double incomeMean;
  public final double incomeSd;
  /** Gamma, 2 x Kpsi: row 0 is psibar (intercept), row 1 the median_income effect. */
  public final double[] gamma;
  /** V_psi, Kpsi x Kpsi. */
  public final double[] vPsi;
  /** psi per store, S x Kpsi. */
  public final double[] psi;
  /** kappa per store and product, S x J (drawn for every pair, stocked or not). */
  public final double[] kappa;
  /** Whether store s stocked product j in any week, S x J. */
  public final boolean[] everStocked;
  /** Shopper draws per store, each R x (1 + Kx), exactly as written and used. */
  public final double[][] draws;
  /** First day of each week, ISO format. */
  public final String[] weekDates;

  // rows
  public final int rows;
  public final int[] rowStore;
  public final int[] rowWeek;
  public final int[] rowProduct;
  public final long[] units;
  public final double[] price;
  public final int[] onDisplay;
  public final double[] unitCost;
  public final double[] xi;
  public final double[] delta;
  /** Model share of the row's product in its market (the multinomial probability). */
  public final double[] share;
  /** Own-price elasticity at the row's prices, {@code (ds_j/dp_j) p_j / s_j}. */
  public final double[] ownElasticity;

  SimulatedData(SimSettings settings, String[] productIds, String[] productNames,
      int[] productOwner, String[] ownerNames, String[] attributeNames, int[] attributeDecimals,
      double[] xRaw, double[] xStd, double[] xMean, double[] xSd, double[] typicalPrice,
      double[] baseCost, double[] kappabar, double[] pi0, String[] storeIds, String[] regionNames,
      int[] storeRegion, int[] shoppers, double[] medianIncome, double incomeMean, double incomeSd,
      double[] gamma, double[] vPsi, double[] psi, double[] kappa, boolean[] everStocked,
      double[][] draws, String[] weekDates, int rows, int[] rowStore, int[] rowWeek,
      int[] rowProduct, long[] units, double[] price, int[] onDisplay, double[] unitCost,
      double[] xi, double[] delta, double[] share, double[] ownElasticity) {
    this.settings = settings;
    this.productIds = productIds;
    this.productNames = productNames;
    this.productOwner = productOwner;
    this.ownerNames = ownerNames;
    this.attributeNames = attributeNames;
    this.attributeDecimals = attributeDecimals;
    this.xRaw = xRaw;
    this.xStd = xStd;
    this.xMean = xMean;
    this.xSd = xSd;
    this.typicalPrice = typicalPrice;
    this.baseCost = baseCost;
    this.kappabar = kappabar;
    this.pi0 = pi0;
    this.storeIds = storeIds;
    this.regionNames = regionNames;
    this.storeRegion = storeRegion;
    this.shoppers = shoppers;
    this.medianIncome = medianIncome;
    this.incomeMean = incomeMean;
    this.incomeSd = incomeSd;
    this.gamma = gamma;
    this.vPsi = vPsi;
    this.psi = psi;
    this.kappa = kappa;
    this.everStocked = everStocked;
    this.draws = draws;
    this.weekDates = weekDates;
    this.rows = rows;
    this.rowStore = rowStore;
    this.rowWeek = rowWeek;
    this.rowProduct = rowProduct;
    this.units = units;
    this.price = price;
    this.onDisplay = onDisplay;
    this.unitCost = unitCost;
    this.xi = xi;
    this.delta = delta;
    this.share = share;
    this.ownElasticity = ownElasticity;
  }

  public int stores() {
    return storeIds.length;
  }

  public int products() {
    return productIds.length;
  }

  public int kx() {
    return attributeNames.length;
  }

  /** Names of the psi components: a, log_sigma, log_L11.., L21, L31, L32, ... */
  public String[] psiNames() {
    int kx = kx();
    String[] names = new String[settings.psiDim()];
    names[0] = "a";
    names[1] = "log_sigma";
    for (int k = 0; k < kx; k++) {
      names[2 + k] = "log_" + element(kx, k, k);
    }
    int p = 2 + kx;
    for (int row = 1; row < kx; row++) {
      for (int col = 0; col < row; col++) {
        names[p++] = element(kx, row, col);
      }
    }
    return names;
  }

  // L21 style, as in the reference data; with more than 9 attributes L10_2 keeps names unique
  private static String element(int kx, int row, int col) {
    return "L" + (row + 1) + (kx > 9 ? "_" : "") + (col + 1);
  }
}
