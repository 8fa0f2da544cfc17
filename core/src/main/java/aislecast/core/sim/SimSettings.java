package aislecast.core.sim;

import java.time.DayOfWeek;
import java.time.LocalDate;
import java.util.ArrayList;
import java.util.List;

/**
 * Sizes, true parameters and seed of a simulated data set (DESIGN section 4 model).
 *
 * <p>{@link #demo()} holds the documented defaults: the chilled-drinks demo scenario (60
 * convenience stores, 3 regions, 26 weeks, 24 products from 4 owners, Kx = 3 attributes, R = 200
 * shopper draws per store). Every other constructor use goes through {@link #validate()}.
 *
 * <p>How the true parameters are built from these settings (all draws from seeded streams):
 *
 * <ul>
 *   <li>{@code psi_s ~ N(Gamma' d_s, V_psi)}, {@code d_s = (1, standardised median_income)};
 *       the intercept row of Gamma ({@code psibar}) is {@code a = priceSensitivityLog, log sigma =
 *       log(priceSensitivitySpread), log L_kk = log(tasteSd), L_{k,k-1} = tasteCrossLoading},
 *       other off-diagonals 0; the median_income row moves only {@code a}, by {@code
 *       incomeOnPriceSensitivity}. {@code V_psi} is diagonal with sd {@code psiSd} (log-scale and
 *       {@code a} components) and {@code psiOffDiagonalSd} (off-diagonals of L), except
 *       corr(a, log sigma) = {@code psiCorrelation}.
 *   <li>Each product has a typical price {@code P_j ~ U(priceMin, priceMax)}, a base unit cost
 *       {@code C_j = P_j * U(costShareMin, costShareMax)} and a base log-odds against the outside
 *       option {@code b_j ~ U(logOddsMin, logOddsMax)}; {@code kappabar_j = b_j + E[alpha] P_j}
 *       with {@code E[alpha] = exp(a + sigma^2 / 2)} at mean income, and {@code pi0_j = log P_j -
 *       pi log C_j}, so prices centre on {@code P_j} and shares on {@code exp(b_j)} times the
 *       outside share.
 *   <li>{@code unit_cost = C_j exp(f_rw + costNoiseSd * n)} with a region-week freight shock
 *       {@code f_rw ~ N(0, regionCostSd^2)}.
 * </ul>
 *
 * @param seed run seed: every random stream is keyed by it
 * @param stores number of stores (>= 2, so median_income can be standardised)
 * @param weeks number of weeks
 * @param products number of products (>= 2, so attributes can be standardised)
 * @param owners number of owners (firms); owner 0 is the user's own portfolio
 * @param regions number of regions; store s is in region s mod regions
 * @param attributes Kx, numeric product attributes in the model (sugar_free, caffeine_mg,
 *     volume_l, then extra ones)
 * @param draws R, shopper draws per store
 * @param shoppersMin smallest weekly market size of a store
 * @param shoppersMax largest weekly market size of a store
 * @param firstWeek first day of the first week (a Monday)
 * @param stockProbability probability that a store stocks a product in the first week
 * @param assortmentChurn weekly probability that a store lists or delists a product
 * @param displayProbability probability that a stocked product is on display in a week
 * @param priceSensitivityLog {@code a} of psibar: log price sensitivity at mean income
 * @param incomeOnPriceSensitivity Gamma entry (median_income, a): change of {@code a} per sd of
 *     income
 * @param priceSensitivitySpread sigma of psibar (sd of log alpha over shoppers)
 * @param tasteSd L_kk of psibar (sd of attribute tastes)
 * @param tasteCrossLoading L_{k,k-1} of psibar
 * @param psiSd sd of psi_s around Gamma' d_s for a, log sigma, log L_kk
 * @param psiOffDiagonalSd sd of psi_s for the off-diagonal elements of L
 * @param psiCorrelation correlation of a and log sigma across stores
 * @param logOddsMin smallest product base log-odds (see above)
 * @param logOddsMax largest product base log-odds
 * @param tau sd of kappa_sj around kappabar_j
 * @param displayEffect gamma, the utility effect of on_display
 * @param sigmaXi sd of xi_jt
 * @param priceMin smallest typical product price
 * @param priceMax largest typical product price
 * @param costShareMin smallest base cost as a share of the typical price
 * @param costShareMax largest base cost as a share of the typical price
 * @param costNoiseSd sd of the store-week-product log cost noise
 * @param regionCostSd sd of the region-week log freight shock
 * @param costPassThrough pi, the coefficient of log(unit_cost) in the price equation
 * @param lambda coefficient of xi in the price equation (> 0: prices are endogenous)
 * @param sigmaP sd of the price-equation noise e_jt
 * @param drawDecimals decimals of the shopper draws; the simulation uses the rounded draws, so
 *     shopper_draws.csv holds exactly the draws used
 */
public record SimSettings(
    long seed,
    int stores,
    int weeks,
    int products,
    int owners,
    int regions,
    int attributes,
    int draws,
    int shoppersMin,
    int shoppersMax,
    LocalDate firstWeek,
    double stockProbability,
    double assortmentChurn,
    double displayProbability,
    double priceSensitivityLog,
    double incomeOnPriceSensitivity,
    double priceSensitivitySpread,
    double tasteSd,
    double tasteCrossLoading,
    double psiSd,
    double psiOffDiagonalSd,
    double psiCorrelation,
    double logOddsMin,
    double logOddsMax,
    double tau,
    double displayEffect,
    double sigmaXi,
    double priceMin,
    double priceMax,
    double costShareMin,
    double costShareMax,
    double costNoiseSd,
    double regionCostSd,
    double costPassThrough,
    double lambda,
    double sigmaP,
    int drawDecimals) {

  /** Seed of the bundled sample in data-samples/chilled-drinks. */
  public static final long DEMO_SEED = 20261201L;

  public SimSettings {
    List<String> problems = problems(
        stores, weeks, products, owners, regions, attributes, draws, shoppersMin, shoppersMax,
        firstWeek, stockProbability, assortmentChurn, displayProbability, priceSensitivitySpread,
        tasteSd, psiSd, psiOffDiagonalSd, psiCorrelation, logOddsMin, logOddsMax, tau, sigmaXi,
        priceMin, priceMax, costShareMin, costShareMax, costNoiseSd, regionCostSd, sigmaP,
        drawDecimals, new double[] {priceSensitivityLog, incomeOnPriceSensitivity,
            tasteCrossLoading, displayEffect, costPassThrough, lambda});
    if (!problems.isEmpty()) {
      throw new IllegalArgumentException("invalid simulation settings: " + String.join("; ", problems));
    }
  }

  /** The chilled-drinks demo scenario: the documented defaults. */
  public static SimSettings demo() {
    return new SimSettings(
        DEMO_SEED,
        60, 26, 24, 4, 3, 3, 200,
        2000, 8000,
        LocalDate.of(2026, 1, 5),
        0.8, 0.02, 0.12,
        0.20, -0.10, 0.30, 0.50, 0.15,
        0.15, 0.08, 0.30,
        -5.8, -3.1,
        0.30, 0.60, 0.25,
        1.50, 3.00, 0.45, 0.60,
        0.06, 0.05,
        0.70, 0.50, 0.08,
        6);
  }

  /** Number of components of psi_s. */
  public int psiDim() {
    return 2 + attributes + attributes * (attributes - 1) / 2;
  }

  public SimSettings withSeed(long newSeed) {
    return with(newSeed, stores, weeks, products, owners, attributes, draws, shoppersMin, shoppersMax);
  }

  /** Copy with other sizes (the command-line overridable ones). */
  public SimSettings withSizes(int newStores, int newWeeks, int newProducts, int newOwners,
      int newAttributes, int newDraws) {
    return with(seed, newStores, newWeeks, newProducts, newOwners, newAttributes, newDraws,
        shoppersMin, shoppersMax);
  }

  public SimSettings withShoppers(int min, int max) {
    return with(seed, stores, weeks, products, owners, attributes, draws, min, max);
  }

  private SimSettings with(long s, int st, int w, int p, int o, int kx, int r, int mMin, int mMax) {
    return new SimSettings(s, st, w, p, o, regions, kx, r, mMin, mMax, firstWeek,
        stockProbability, assortmentChurn, displayProbability, priceSensitivityLog,
        incomeOnPriceSensitivity, priceSensitivitySpread, tasteSd, tasteCrossLoading, psiSd,
        psiOffDiagonalSd, psiCorrelation, logOddsMin, logOddsMax, tau, displayEffect, sigmaXi,
        priceMin, priceMax, costShareMin, costShareMax, costNoiseSd, regionCostSd,
        costPassThrough, lambda, sigmaP, drawDecimals);
  }

  private static List<String> problems(
      int stores, int weeks, int products, int owners, int regions, int attributes, int draws,
      int shoppersMin, int shoppersMax, LocalDate firstWeek, double stockProbability,
      double assortmentChurn, double displayProbability, double priceSensitivitySpread,
      double tasteSd, double psiSd, double psiOffDiagonalSd, double psiCorrelation,
      double logOddsMin, double logOddsMax, double tau, double sigmaXi, double priceMin,
      double priceMax, double costShareMin, double costShareMax, double costNoiseSd,
      double regionCostSd, double sigmaP, int drawDecimals, double[] finite) {
    List<String> out = new ArrayList<>();
    range(out, "stores", stores, 2, 100_000);
    range(out, "weeks", weeks, 1, 10_000);
    range(out, "products", products, 2, 10_000);
    range(out, "owners", owners, 1, Math.max(1, products));
    range(out, "regions", regions, 1, 1000); // more regions than stores: some stay empty
    range(out, "attributes", attributes, 0, 20);
    range(out, "draws", draws, 1, 100_000);
    range(out, "shoppersMin", shoppersMin, 1, Integer.MAX_VALUE);
    if (shoppersMax < shoppersMin) {
      out.add("shoppersMax (" + shoppersMax + ") must be >= shoppersMin (" + shoppersMin + ")");
    }
    if (firstWeek == null || firstWeek.getDayOfWeek() != DayOfWeek.MONDAY) {
      out.add("firstWeek must be a Monday, got " + firstWeek);
    }
    probability(out, "stockProbability", stockProbability, false);
    probability(out, "assortmentChurn", assortmentChurn, true);
    probability(out, "displayProbability", displayProbability, true);
    positive(out, "priceSensitivitySpread", priceSensitivitySpread);
    positive(out, "tasteSd", tasteSd);
    positive(out, "psiSd", psiSd);
    positive(out, "psiOffDiagonalSd", psiOffDiagonalSd);
    if (!(Math.abs(psiCorrelation) < 1.0)) {
      out.add("psiCorrelation must be in (-1, 1), got " + psiCorrelation);
    }
    if (!(logOddsMin <= logOddsMax) || !Double.isFinite(logOddsMin) || !Double.isFinite(logOddsMax)) {
      out.add("need finite logOddsMin <= logOddsMax");
    }
    positive(out, "tau", tau);
    positive(out, "sigmaXi", sigmaXi);
    positive(out, "priceMin", priceMin);
    if (!(priceMax >= priceMin) || !Double.isFinite(priceMax)) {
      out.add("need finite priceMax >= priceMin");
    }
    if (!(costShareMin > 0 && costShareMin <= costShareMax && costShareMax < 10)) {
      out.add("need 0 < costShareMin <= costShareMax < 10");
    }
    nonNegative(out, "costNoiseSd", costNoiseSd);
    nonNegative(out, "regionCostSd", regionCostSd);
    positive(out, "sigmaP", sigmaP);
    range(out, "drawDecimals", drawDecimals, 2, 15);
    for (double v : finite) {
      if (!Double.isFinite(v)) {
        out.add("every location parameter must be finite, got " + v);
      }
    }
    return out;
  }

  private static void range(List<String> out, String name, int v, int lo, int hi) {
    if (v < lo || v > hi) {
      out.add(name + " must be in [" + lo + ", " + hi + "], got " + v);
    }
  }

  private static void probability(List<String> out, String name, double v, boolean zeroOk) {
    if (!(v <= 1.0 && (zeroOk ? v >= 0.0 : v > 0.0))) {
      out.add(name + " must be in " + (zeroOk ? "[0, 1]" : "(0, 1]") + ", got " + v);
    }
  }

  private static void positive(List<String> out, String name, double v) {
    if (!(v > 0.0) || !Double.isFinite(v)) {
      out.add(name + " must be finite and > 0, got " + v);
    }
  }

  private static void nonNegative(List<String> out, String name, double v) {
    if (!(v >= 0.0) || !Double.isFinite(v)) {
      out.add(name + " must be finite and >= 0, got " + v);
    }
  }
}
