package aislecast.core.sim;

import aislecast.core.demand.Heterogeneity;
import aislecast.core.demand.ShareKernel;
import aislecast.core.draws.ShopperDraws;
import aislecast.core.rng.SplitMix64;
import aislecast.core.rng.Streams;
import java.math.BigDecimal;
import java.math.RoundingMode;
import java.util.Arrays;
import org.apache.commons.math3.linear.CholeskyDecomposition;
import org.apache.commons.math3.linear.MatrixUtils;
import org.apache.commons.math3.linear.RealMatrix;

/**
 * Simulates store-week sales from the full DESIGN section 4 model with known parameters.
 *
 * <p>Every random number comes from a {@link Streams} stream keyed by (seed, purpose,
 * coordinates), e.g. (seed, market shocks, store, week), and every value that reaches a table is
 * rounded to its written decimals before the model uses it (prices, costs, attributes, incomes,
 * shopper draws). So the output is a pure function of the settings, byte for byte, and the tables
 * hold exactly the inputs the sales were simulated from.
 *
 * <p>Per market t = (s, w) and stocked product j: {@code z_jt ~ Bernoulli(displayProbability)},
 * {@code xi_jt ~ N(0, sigma_xi^2)}, {@code delta_jt = kappa_sj + gamma z_jt + xi_jt}, {@code log
 * p_jt = pi0_j + pi log(unit_cost_jt) + lambda xi_jt + e_jt}, shares by the simulated-share model
 * over the store's R shopper draws ({@link ShopperDraws}), and units ~ Multinomial(M_s, shares).
 */
public final class DemandSimulator {
  /** Bumped whenever the same settings would produce different bytes. */
  public static final String VERSION = "aislecast-sim 1";

  // purposes: the first coordinate of every stream key
  private static final long PRODUCTS = 1;
  private static final long STORES = 2;
  private static final long PSI = 3;
  private static final long KAPPA = 4;
  private static final long ASSORTMENT = 5;
  private static final long FREIGHT = 6;
  private static final long MARKET = 7;
  private static final long UNITS = 8;

  static final String[] BASE_ATTRIBUTES = {"sugar_free", "caffeine_mg", "volume_l"};
  private static final int[] BASE_DECIMALS = {0, 0, 2};
  private static final double[] CAFFEINE_MG = {0, 0, 20, 32, 80, 160};
  private static final double[] VOLUME_L = {0.25, 0.33, 0.5, 0.5, 1.0, 1.5};
  private static final double SUGAR_FREE_SHARE = 0.4;
  private static final double INCOME_MEAN = 45.0; // thousands per household and year
  private static final double INCOME_SD = 9.0;
  private static final double INCOME_FLOOR = 15.0;
  private static final double MIN_MONEY = 1e-4; // smallest price or cost at 4 decimals

  private DemandSimulator() {}

  public static SimulatedData simulate(SimSettings st) {
    final long seed = st.seed();
    final int nS = st.stores();
    final int nW = st.weeks();
    final int nJ = st.products();
    final int kx = st.attributes();
    final int nR = st.draws();
    final int kPsi = st.psiDim();

    // --- products ---
    String[] productIds = new String[nJ];
    String[] productNames = new String[nJ];
    int[] owner = new int[nJ];
    double[] base = new double[nJ * 3]; // sugar_free, caffeine_mg, volume_l, always generated
    double[] extra = new double[nJ * Math.max(0, kx - 3)];
    double[] typicalPrice = new double[nJ];
    double[] baseCost = new double[nJ];
    double[] logOdds = new double[nJ];
    for (int j = 0; j < nJ; j++) {
      SplitMix64 rng = Streams.stream(seed, PRODUCTS, j);
      productIds[j] = DemoNames.productId(j, nJ);
      owner[j] = j % st.owners();
      base[j * 3] = rng.nextDouble() < SUGAR_FREE_SHARE ? 1 : 0;
      base[j * 3 + 1] = CAFFEINE_MG[rng.nextInt(CAFFEINE_MG.length)];
      base[j * 3 + 2] = VOLUME_L[rng.nextInt(VOLUME_L.length)];
      typicalPrice[j] = uniform(rng, st.priceMin(), st.priceMax());
      baseCost[j] = typicalPrice[j] * uniform(rng, st.costShareMin(), st.costShareMax());
      logOdds[j] = uniform(rng, st.logOddsMin(), st.logOddsMax());
      for (int k = 3; k < kx; k++) {
        extra[j * (kx - 3) + (k - 3)] = round(rng.nextGaussian(), 3);
      }
    }
    ensureVaries(base, nJ);
    java.util.Set<String> usedNames = new java.util.HashSet<>();
    for (int j = 0; j < nJ; j++) {
      // consecutive flavours within an owner's range keep names distinct; the suffix is a backstop
      String name = DemoNames.brand(owner[j]) + " " + DemoNames.flavour(j / st.owners() + 3 * owner[j])
          + (base[j * 3] == 1 ? " Zero" : "") + " " + fixed(base[j * 3 + 2], 2) + " l";
      String unique = name;
      for (int n = 2; !usedNames.add(unique); n++) {
        unique = name + " #" + n;
      }
      productNames[j] = unique;
    }
    String[] attributeNames = new String[kx];
    int[] attributeDecimals = new int[kx];
    double[] xRaw = new double[nJ * kx];
    for (int k = 0; k < kx; k++) {
      attributeNames[k] = k < 3 ? BASE_ATTRIBUTES[k] : "attr" + (k + 1);
      attributeDecimals[k] = k < 3 ? BASE_DECIMALS[k] : 3;
      for (int j = 0; j < nJ; j++) {
        xRaw[j * kx + k] = k < 3 ? base[j * 3 + k] : extra[j * (kx - 3) + (k - 3)];
      }
    }
    double[] xMean = new double[kx];
    double[] xSd = new double[kx];
    double[] xStd = new double[nJ * kx];
    for (int k = 0; k < kx; k++) {
      double[] col = new double[nJ];
      for (int j = 0; j < nJ; j++) {
        col[j] = xRaw[j * kx + k];
      }
      xMean[k] = mean(col);
      xSd[k] = sdSample(col, xMean[k]);
      if (!(xSd[k] > 0)) {
        throw new IllegalStateException("attribute " + attributeNames[k] + " is constant over products");
      }
      for (int j = 0; j < nJ; j++) {
        xStd[j * kx + k] = (col[j] - xMean[k]) / xSd[k];
      }
    }

    // --- hierarchy: Gamma (2 x Kpsi), V_psi ---
    double[] gamma = new double[2 * kPsi];
    gamma[0] = st.priceSensitivityLog();
    gamma[1] = Math.log(st.priceSensitivitySpread());
    for (int k = 0; k < kx; k++) {
      gamma[2 + k] = Math.log(st.tasteSd());
    }
    for (int k = 1; k < kx; k++) {
      gamma[Heterogeneity.offDiagonalIndex(kx, k, k - 1)] = st.tasteCrossLoading();
    }
    gamma[kPsi] = st.incomeOnPriceSensitivity();
    double[] vPsi = new double[kPsi * kPsi];
    for (int p = 0; p < kPsi; p++) {
      double sd = p < 2 + kx ? st.psiSd() : st.psiOffDiagonalSd();
      vPsi[p * kPsi + p] = sd * sd;
    }
    vPsi[1] = vPsi[kPsi] = st.psiCorrelation() * st.psiSd() * st.psiSd();
    RealMatrix cholV = new CholeskyDecomposition(
        MatrixUtils.createRealMatrix(reshape(vPsi, kPsi))).getL();

    // mean alpha at mean income, to centre kappabar on the intended log-odds
    double meanAlpha = Math.exp(gamma[0] + 0.5 * st.priceSensitivitySpread() * st.priceSensitivitySpread());
    double[] kappabar = new double[nJ];
    double[] pi0 = new double[nJ];
    for (int j = 0; j < nJ; j++) {
      kappabar[j] = logOdds[j] + meanAlpha * typicalPrice[j];
      pi0[j] = Math.log(typicalPrice[j]) - st.costPassThrough() * Math.log(baseCost[j]);
    }

    // --- stores ---
    String[] storeIds = new String[nS];
    int[] region = new int[nS];
    int[] shoppers = new int[nS];
    double[] income = new double[nS];
    for (int s = 0; s < nS; s++) {
      SplitMix64 rng = Streams.stream(seed, STORES, s);
      storeIds[s] = DemoNames.storeId(s, nS);
      region[s] = s % st.regions();
      long span = (long) st.shoppersMax() - st.shoppersMin() + 1;
      shoppers[s] = (int) (st.shoppersMin() + (long) Math.floor(rng.nextDouble() * span));
      income[s] = round(Math.max(INCOME_FLOOR, INCOME_MEAN + INCOME_SD * rng.nextGaussian()), 1);
    }
    String[] regionNames = new String[st.regions()];
    for (int r = 0; r < regionNames.length; r++) {
      regionNames[r] = DemoNames.region(r);
    }
    double incomeMean = mean(income);
    double incomeSd = sdSample(income, incomeMean);
    double[] psi = new double[nS * kPsi];
    double[] kappa = new double[nS * nJ];
    double[] zPsi = new double[kPsi];
    for (int s = 0; s < nS; s++) {
      double d1 = incomeSd > 0 ? (income[s] - incomeMean) / incomeSd : 0.0;
      SplitMix64 rng = Streams.stream(seed, PSI, s);
      for (int p = 0; p < kPsi; p++) {
        zPsi[p] = rng.nextGaussian();
      }
      for (int p = 0; p < kPsi; p++) {
        double v = gamma[p] + gamma[kPsi + p] * d1;
        for (int q = 0; q <= p; q++) {
          v += cholV.getEntry(p, q) * zPsi[q];
        }
        psi[s * kPsi + p] = v;
      }
      SplitMix64 rk = Streams.stream(seed, KAPPA, s);
      for (int j = 0; j < nJ; j++) {
        kappa[s * nJ + j] = kappabar[j] + st.tau() * rk.nextGaussian();
      }
    }

    // region-week freight shocks shared by the stores of a region
    double[] freight = new double[st.regions() * nW];
    for (int r = 0; r < st.regions(); r++) {
      for (int w = 0; w < nW; w++) {
        freight[r * nW + w] = st.regionCostSd() * Streams.stream(seed, FREIGHT, r, w).nextGaussian();
      }
    }
    String[] weekDates = new String[nW];
    for (int w = 0; w < nW; w++) {
      weekDates[w] = st.firstWeek().plusWeeks(w).toString();
    }

    // --- markets ---
    Rows out = new Rows(Math.min(1 << 20, nS * Math.max(1, nW) * Math.min(nJ, 64)));
    boolean[] everStocked = new boolean[nS * nJ];
    double[][] draws = new double[nS][];
    double[] alpha = new double[nR];
    double[] muAll = new double[nR * nJ];
    double[] v = new double[nR * nJ];
    double[] probs = new double[nR * nJ];
    double[] deltaT = new double[nJ];
    double[] priceT = new double[nJ];
    double[] sharesT = new double[nJ];
    long[] unitsT = new long[nJ];
    int[] members = new int[nJ];
    double[] uDisplay = new double[nJ];
    double[] nCost = new double[nJ];
    double[] nXi = new double[nJ];
    double[] nE = new double[nJ];
    double[] psiS = new double[kPsi];
    for (int s = 0; s < nS; s++) {
      double[] nu = ShopperDraws.generate(seed, storeIds[s], nR, 1 + kx);
      for (int q = 0; q < nu.length; q++) {
        nu[q] = round(nu[q], st.drawDecimals());
      }
      draws[s] = nu;
      System.arraycopy(psi, s * kPsi, psiS, 0, kPsi);
      Heterogeneity.shopperTastes(psiS, kx, nu, nR, xStd, nJ, alpha, muAll);
      boolean[][] stocked = assortment(st, s);
      for (int w = 0; w < nW; w++) {
        SplitMix64 rng = Streams.stream(seed, MARKET, s, w);
        // draw for every product in a fixed order, so the assortment does not shift other draws
        for (int j = 0; j < nJ; j++) {
          uDisplay[j] = rng.nextDouble();
          nCost[j] = rng.nextGaussian();
          nXi[j] = rng.nextGaussian();
          nE[j] = rng.nextGaussian();
        }
        int jt = 0;
        for (int j = 0; j < nJ; j++) {
          if (stocked[w][j]) {
            members[jt++] = j;
          }
        }
        int first = out.size;
        for (int m = 0; m < jt; m++) {
          int j = members[m];
          everStocked[s * nJ + j] = true;
          int z = uDisplay[j] < st.displayProbability() ? 1 : 0;
          double cost = Math.max(MIN_MONEY, round(baseCost[j]
              * Math.exp(freight[region[s] * nW + w] + st.costNoiseSd() * nCost[j]), 4));
          double xiJ = st.sigmaXi() * nXi[j];
          double logP = pi0[j] + st.costPassThrough() * Math.log(cost) + st.lambda() * xiJ
              + st.sigmaP() * nE[j];
          double p = Math.max(MIN_MONEY, round(Math.exp(logP), 4));
          deltaT[m] = kappa[s * nJ + j] + st.displayEffect() * z + xiJ;
          priceT[m] = p;
          for (int r = 0; r < nR; r++) {
            v[r * jt + m] = muAll[r * nJ + j];
          }
          out.add(s, w, j, p, z, cost, xiJ, deltaT[m]);
        }
        Heterogeneity.shopperUtility(nR, jt, alpha, v, priceT, v);
        ShareKernel.shares(nR, jt, deltaT, v, sharesT, probs);
        Multinomial.sample(Streams.stream(seed, UNITS, s, w), shoppers[s], sharesT, jt, unitsT);
        for (int m = 0; m < jt; m++) {
          double slope = 0.0;
          for (int r = 0; r < nR; r++) {
            double pr = probs[r * jt + m];
            slope += alpha[r] * pr * (1.0 - pr);
          }
          double elasticity = -(slope / nR) * priceT[m] / sharesT[m];
          out.setOutcome(first + m, unitsT[m], sharesT[m], elasticity);
        }
      }
    }

    String[] ownerNames = new String[st.owners()];
    for (int o = 0; o < ownerNames.length; o++) {
      ownerNames[o] = DemoNames.owner(o);
    }
    out.trim();
    return new SimulatedData(st, productIds, productNames, owner, ownerNames, attributeNames,
        attributeDecimals, xRaw, xStd, xMean, xSd, typicalPrice, baseCost, kappabar, pi0,
        storeIds, regionNames, region, shoppers, income, incomeMean, incomeSd, gamma, vPsi, psi,
        kappa, everStocked, draws, weekDates, out.size, out.store, out.week, out.product,
        out.units, out.price, out.display, out.cost, out.xi, out.delta, out.share,
        out.elasticity);
  }

  /**
   * Weekly assortment of store s: each product stocked in week 0 with stockProbability, then
   * listed or delisted each week with assortmentChurn. A week left empty stocks one product, since
   * a market with no products is invalid input.
   */
  static boolean[][] assortment(SimSettings st, int s) {
    int nJ = st.products();
    boolean[][] stocked = new boolean[st.weeks()][nJ];
    SplitMix64 rng = Streams.stream(st.seed(), ASSORTMENT, s);
    for (int w = 0; w < st.weeks(); w++) {
      int count = 0;
      for (int j = 0; j < nJ; j++) {
        double u = rng.nextDouble();
        boolean on = w == 0 ? u < st.stockProbability() : stocked[w - 1][j] ^ (u < st.assortmentChurn());
        stocked[w][j] = on;
        count += on ? 1 : 0;
      }
      if (count == 0) {
        stocked[w][s % nJ] = true;
      }
    }
    return stocked;
  }

  /** If an attribute came out constant over products (small J), change product 1's value. */
  private static void ensureVaries(double[] base, int nJ) {
    for (int k = 0; k < 3; k++) {
      boolean varies = false;
      for (int j = 1; j < nJ && !varies; j++) {
        varies = base[j * 3 + k] != base[k];
      }
      if (!varies) {
        double v = base[3 + k];
        base[3 + k] = k == 0 ? 1 - v : k == 1 ? (v == 0 ? 32 : 0) : (v == 0.5 ? 1.0 : 0.5);
      }
    }
  }

  private static double uniform(SplitMix64 rng, double lo, double hi) {
    return lo + (hi - lo) * rng.nextDouble();
  }

  static double mean(double[] a) {
    double sum = 0.0;
    for (double v : a) {
      sum += v;
    }
    return sum / a.length;
  }

  /** Standard deviation with n - 1 (DESIGN section 4 convention). */
  static double sdSample(double[] a, double mean) {
    double ss = 0.0;
    for (double v : a) {
      ss += (v - mean) * (v - mean);
    }
    return Math.sqrt(ss / (a.length - 1));
  }

  private static double[][] reshape(double[] flat, int n) {
    double[][] m = new double[n][n];
    for (int i = 0; i < n; i++) {
      System.arraycopy(flat, i * n, m[i], 0, n);
    }
    return m;
  }

  /** Rounds half-even on the exact binary value, so the result is independent of the JDK. */
  static double round(double v, int decimals) {
    return new BigDecimal(v).setScale(decimals, RoundingMode.HALF_EVEN).doubleValue();
  }

  /** Fixed-decimal text of the exact binary value (JDK-independent, no locale). */
  static String fixed(double v, int decimals) {
    if (!Double.isFinite(v)) {
      throw new IllegalArgumentException("not finite: " + v);
    }
    return new BigDecimal(v).setScale(decimals, RoundingMode.HALF_EVEN).toPlainString();
  }

  /** Growable row columns. */
  private static final class Rows {
    int size;
    int[] store;
    int[] week;
    int[] product;
    long[] units;
    double[] price;
    int[] display;
    double[] cost;
    double[] xi;
    double[] delta;
    double[] share;
    double[] elasticity;

    Rows(int capacity) {
      resize(Math.max(16, capacity));
    }

    void add(int s, int w, int j, double p, int z, double c, double x, double d) {
      if (size == store.length) {
        resize(store.length * 2);
      }
      store[size] = s;
      week[size] = w;
      product[size] = j;
      price[size] = p;
      display[size] = z;
      cost[size] = c;
      xi[size] = x;
      delta[size] = d;
      size++;
    }

    void setOutcome(int row, long q, double sh, double e) {
      units[row] = q;
      share[row] = sh;
      elasticity[row] = e;
    }

    void trim() {
      resize(size);
    }

    private void resize(int n) {
      store = store == null ? new int[n] : Arrays.copyOf(store, n);
      week = week == null ? new int[n] : Arrays.copyOf(week, n);
      product = product == null ? new int[n] : Arrays.copyOf(product, n);
      units = units == null ? new long[n] : Arrays.copyOf(units, n);
      price = price == null ? new double[n] : Arrays.copyOf(price, n);
      display = display == null ? new int[n] : Arrays.copyOf(display, n);
      cost = cost == null ? new double[n] : Arrays.copyOf(cost, n);
      xi = xi == null ? new double[n] : Arrays.copyOf(xi, n);
      delta = delta == null ? new double[n] : Arrays.copyOf(delta, n);
      share = share == null ? new double[n] : Arrays.copyOf(share, n);
      elasticity = elasticity == null ? new double[n] : Arrays.copyOf(elasticity, n);
    }
  }
}
