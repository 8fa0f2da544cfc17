package aislecast.core.scenario;

import aislecast.core.equilibrium.EquilibriumSettings;
import aislecast.core.equilibrium.EquilibriumSolver;
import aislecast.core.equilibrium.MarketModel;
import aislecast.core.equilibrium.SolveInfo;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;

/**
 * Price recommendation for one store's portfolio (DESIGN section 6): the portfolio prices within
 * guard-rails that maximise the expected portfolio margin over posterior draws (or a quantile of
 * it), with the other products responding by {@code nash} (they re-set to the Bertrand-Nash
 * equilibrium given the portfolio's prices: the portfolio leads) or {@code hold}.
 *
 * <p>Per draw, costs are those of its {@link BaseDraw}: from the first-order conditions at current
 * prices, with known costs (e.g. the user's own) in their place. Draws whose costs could not be
 * recovered are left out and counted. Note that with every portfolio cost taken from the
 * first-order conditions the current prices are, by construction, the portfolio's best reply under
 * {@code hold}; recommendations then come from the leader's advantage under {@code nash}, from
 * known costs, or from the posterior spread.
 *
 * <p>Search: compass (coordinate pattern) search, derivative-free because the competitors'
 * equilibrium makes the objective's gradient costly and a quantile objective is not smooth (so
 * model-based searches such as BOBYQA, whose quadratic models assume smoothness, are not used).
 * From the current prices (clamped to the guard-rails), each product's price is tried a step {@code
 * h} up and down (as a fraction of its current price); an improvement is kept at once; a sweep over
 * all products without one halves {@code h}. {@code h} starts at half the maximum move and the
 * search stops below {@code minStepPercent} or at {@code maxEvaluations}. Every evaluation uses the
 * same draws (common random numbers), so the objective is a deterministic function of the prices;
 * each draw's competitor prices are warm-started from its last equilibrium. The result is a local
 * optimum within the box, never worse than the current prices. A candidate for which an equilibrium
 * fails in any draw is rejected (and counted), so every reported figure comes from converged
 * equilibria.
 *
 * <p>One instance per thread (owns its buffers).
 */
public final class PriceRecommender {
  private final MarketModel model;
  private final EquilibriumSolver solver;
  private final ScenarioEvaluator bases;
  private final double[] price;
  private final boolean[] free;

  public PriceRecommender(int maxShoppers, int maxProducts) {
    model = new MarketModel(maxShoppers, maxProducts);
    solver = new EquilibriumSolver(maxShoppers, maxProducts);
    bases = new ScenarioEvaluator(maxShoppers, maxProducts, EquilibriumSettings.defaults(), false);
    price = new double[maxProducts];
    free = new boolean[maxProducts];
  }

  /**
   * Builds each draw's base (costs recovered at current prices, known costs kept) with {@link
   * ScenarioEvaluator#base} and recommends from those draws.
   *
   * @param market the store (current prices are its base prices)
   * @param psi heterogeneity draws, D x Kpsi
   * @param delta mean utilities per draw, D x J (store's product order)
   */
  public Recommendation recommend(BaseMarket market, double[][] psi, double[][] delta,
      RecommendSettings settings) {
    if (psi.length != delta.length || psi.length == 0) {
      throw new IllegalArgumentException("store " + market.storeId() + ": " + psi.length
          + " psi draws and " + delta.length + " delta draws");
    }
    List<BaseDraw> draws = new ArrayList<>(psi.length);
    for (int d = 0; d < psi.length; d++) {
      draws.add(bases.base(market, psi[d], delta[d]));
    }
    return recommend(draws, settings);
  }

  /**
   * @param draws base draws of one store (from {@link ScenarioEvaluator#base}); draws whose costs
   *     could not be recovered are left out and counted
   */
  public Recommendation recommend(List<BaseDraw> draws, RecommendSettings settings) {
    if (draws.isEmpty()) {
      throw new IllegalArgumentException("no posterior draws");
    }
    BaseMarket market = draws.get(0).market();
    int[] portfolio = portfolio(market);
    if (portfolio.length == 0) {
      throw new IllegalArgumentException("store " + market.storeId()
          + " stocks no product of the portfolio " + market.portfolioOwners());
    }
    List<String> notes = new ArrayList<>();
    Work w = new Work(market, portfolio, settings);
    int dropped = 0;
    int nonPositive = 0;
    List<BaseDraw> used = new ArrayList<>();
    List<Integer> usedAt = new ArrayList<>();
    for (int d = 0; d < draws.size(); d++) {
      BaseDraw b = draws.get(d);
      if (b.market() != market) {
        throw new IllegalArgumentException("draws of stores " + market.storeId() + " and "
            + b.market().storeId() + " mixed");
      }
      if (!b.costInfo().solved()) {
        dropped++;
        notes.add("draw " + d + " left out: " + b.costInfo().failure());
        continue;
      }
      nonPositive += b.nonPositiveCosts();
      used.add(b);
      usedAt.add(d);
    }
    int k = portfolio.length;
    String[] ids = new String[k];
    double[] current = new double[k];
    double[] lower = new double[k];
    double[] upper = new double[k];
    double[] floor = new double[k];
    double[] meanCost = new double[k];
    int n = used.size();
    for (int q = 0; q < k; q++) {
      int p = portfolio[q];
      ids[q] = market.productId(p);
      current[q] = market.price(p);
      double[] cs = new double[n];
      for (int u = 0; u < n; u++) {
        cs[u] = used.get(u).cost()[p];
        meanCost[q] += cs[u] / n;
      }
      Arrays.sort(cs);
      floor[q] = n == 0 ? Double.NaN : Bands.quantile(cs, settings.costFloorQuantile());
      meanCost[q] = n == 0 ? Double.NaN : meanCost[q];
      upper[q] = current[q] * (1 + settings.maxMovePercent() / 100);
      lower[q] = Math.max(current[q] * (1 - settings.maxMovePercent() / 100), floor[q]);
      if (lower[q] > upper[q]) {
        notes.add(ids[q] + ": cost floor " + floor[q] + " is above the guard-rail "
            + upper[q] + "; held at the guard-rail");
        lower[q] = upper[q];
      }
    }
    if (n == 0) {
      notes.add("no draw with recoverable costs: current prices kept");
      return new Recommendation(market.storeId(), ids, current, current.clone(), lower, upper,
          floor, meanCost, Double.NaN, Double.NaN, Bands.of(new double[0], 0),
          Bands.of(new double[0], 0),
          emptyBands(k), Recommendation.PerDraw.NONE, 0, dropped, nonPositive, 0, 0, false, notes);
    }
    w.init(used);

    // current prices (the reference) and the search start (current, clamped to the rails)
    double[] x = current.clone();
    Eval atCurrent = w.evaluate(x);
    if (atCurrent == null) {
      notes.add("an equilibrium failed at current prices: " + w.lastFailure);
      return new Recommendation(market.storeId(), ids, current, current.clone(), lower, upper,
          floor, meanCost, Double.NaN, Double.NaN, Bands.of(new double[0], 0),
          Bands.of(new double[0], 0),
          emptyBands(k), Recommendation.PerDraw.NONE, n, dropped, nonPositive, w.evaluations, 1, false, notes);
    }
    boolean clamped = false;
    for (int q = 0; q < k; q++) {
      double c = Math.min(upper[q], Math.max(lower[q], x[q]));
      clamped |= c != x[q];
      x[q] = c;
    }
    Eval best = clamped ? w.evaluate(x) : atCurrent;
    if (best == null) {
      notes.add("an equilibrium failed at the clamped start: " + w.lastFailure);
      best = atCurrent; // cannot happen unless the rails are extreme; keep current prices
      x = current.clone();
    }
    double h = settings.maxMovePercent() / 200;
    double minStep = settings.minStepPercent() / 100;
    boolean converged = false;
    int rejected = 0;
    search:
    while (true) {
      if (h < minStep) {
        converged = true;
        break;
      }
      boolean improved = false;
      for (int q = 0; q < k && !improved; q++) {
        for (int dir = 1; dir >= -1; dir -= 2) {
          if (w.evaluations >= settings.maxEvaluations()) {
            break search;
          }
          double cand = Math.min(upper[q], Math.max(lower[q], x[q] + dir * h * current[q]));
          if (cand == x[q]) {
            continue;
          }
          double keep = x[q];
          x[q] = cand;
          Eval e = w.evaluate(x);
          if (e == null) {
            rejected++;
            x[q] = keep;
            continue;
          }
          if (e.objective > best.objective + 1e-12 * Math.abs(best.objective)) {
            best = e;
            improved = true;
            break;
          }
          x[q] = keep;
        }
      }
      if (!improved) {
        h /= 2;
      }
    }
    if (rejected > 0) {
      notes.add(rejected + " candidate price sets rejected: an equilibrium failed ("
          + w.lastFailure + ")");
    }
    double[] dm = new double[n];
    double[] dr = new double[n];
    for (int u = 0; u < n; u++) {
      dm[u] = best.margin[u] - atCurrent.margin[u];
      dr[u] = best.revenue[u] - atCurrent.revenue[u];
    }
    Bands[] unitsChange = new Bands[k];
    double[] du = new double[n];
    double[] duTotal = new double[n];
    for (int q = 0; q < k; q++) {
      for (int u = 0; u < n; u++) {
        du[u] = best.units[u * k + q] - atCurrent.units[u * k + q];
        duTotal[u] += du[u];
      }
      unitsChange[q] = Bands.of(du, n);
    }
    int[] at = new int[n];
    for (int u = 0; u < n; u++) {
      at[u] = usedAt.get(u);
    }
    return new Recommendation(market.storeId(), ids, current, x.clone(), lower, upper, floor,
        meanCost, atCurrent.objective, best.objective, Bands.of(dm, n), Bands.of(dr, n),
        unitsChange, new Recommendation.PerDraw(at, dm, dr, duTotal), n, dropped, nonPositive,
        w.evaluations, rejected, converged, notes);
  }

  private static Bands[] emptyBands(int k) {
    Bands[] b = new Bands[k];
    Arrays.fill(b, Bands.of(new double[0], 0));
    return b;
  }

  private static int[] portfolio(BaseMarket market) {
    int count = 0;
    for (int p = 0; p < market.products(); p++) {
      count += market.inPortfolio(market.owner(p)) ? 1 : 0;
    }
    int[] out = new int[count];
    int q = 0;
    for (int p = 0; p < market.products(); p++) {
      if (market.inPortfolio(market.owner(p))) {
        out[q++] = p;
      }
    }
    return out;
  }

  private void load(BaseMarket market, double[] psi, double[] delta) {
    model.load(psi, market.kx(), market.nuView(), market.shoppers(), market.xView(),
        market.products(), delta, market.firmView());
  }

  /** Per-draw figures of one candidate and its objective. */
  private record Eval(double objective, double[] margin, double[] revenue, double[] units) {}

  /** The objective over draws, with per-draw warm starts of the competitors' prices. */
  private final class Work {
    final BaseMarket market;
    final int[] portfolio;
    final RecommendSettings settings;
    BaseDraw[] draws;
    double[][] warm;
    int evaluations;
    String lastFailure;

    Work(BaseMarket market, int[] portfolio, RecommendSettings settings) {
      this.market = market;
      this.portfolio = portfolio;
      this.settings = settings;
    }

    void init(List<BaseDraw> used) {
      this.draws = used.toArray(new BaseDraw[0]);
      this.warm = new double[draws.length][];
      for (int u = 0; u < draws.length; u++) {
        warm[u] = market.prices();
      }
    }

    /** Objective at portfolio prices x, or null when an equilibrium failed in some draw. */
    Eval evaluate(double[] x) {
      evaluations++;
      int j = market.products();
      int n = draws.length;
      int k = portfolio.length;
      double m = market.marketSize();
      double[] margin = new double[n];
      double[] revenue = new double[n];
      double[] units = new double[n * k];
      Arrays.fill(free, 0, j, settings.response() == Response.NASH);
      for (int q = 0; q < k; q++) {
        free[portfolio[q]] = false;
      }
      for (int u = 0; u < n; u++) {
        BaseDraw b = draws[u];
        double[] cost = b.cost();
        load(market, b.psi(), b.delta());
        System.arraycopy(warm[u], 0, price, 0, j);
        for (int q = 0; q < k; q++) {
          price[portfolio[q]] = x[q];
        }
        if (settings.response() == Response.NASH) {
          SolveInfo info = solver.solve(model, cost, free, price, settings.equilibrium());
          if (!info.converged()) {
            lastFailure = "used draw " + u + ": " + info.failure();
            return null;
          }
          System.arraycopy(price, 0, warm[u], 0, j);
        } else {
          solver.evaluate(model, price);
        }
        double[] s = solver.shares();
        double mg = 0;
        double rv = 0;
        for (int q = 0; q < k; q++) {
          int p = portfolio[q];
          double un = s[p] * m;
          units[u * k + q] = un;
          mg += (price[p] - cost[p]) * un;
          rv += price[p] * un;
        }
        margin[u] = mg;
        revenue[u] = rv;
      }
      double objective;
      if (Double.isNaN(settings.objectiveQuantile())) {
        double sum = 0;
        for (double v : margin) {
          sum += v;
        }
        objective = sum / n;
      } else {
        double[] sorted = margin.clone();
        Arrays.sort(sorted);
        objective = Bands.quantile(sorted, settings.objectiveQuantile());
      }
      return new Eval(objective, margin, revenue, units);
    }
  }
}
