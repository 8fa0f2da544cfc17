package aislecast.core.scenario;

import aislecast.core.equilibrium.EquilibriumSettings;
import aislecast.core.equilibrium.EquilibriumSolver;
import aislecast.core.equilibrium.MarketModel;
import aislecast.core.equilibrium.SolveInfo;
import java.util.ArrayList;
import java.util.List;
import org.apache.commons.math3.analysis.MultivariateFunction;
import org.apache.commons.math3.analysis.UnivariateFunction;
import org.apache.commons.math3.optim.InitialGuess;
import org.apache.commons.math3.optim.MaxEval;
import org.apache.commons.math3.exception.TooManyEvaluationsException;
import org.apache.commons.math3.optim.SimpleBounds;
import org.apache.commons.math3.optim.nonlinear.scalar.GoalType;
import org.apache.commons.math3.optim.nonlinear.scalar.ObjectiveFunction;
import org.apache.commons.math3.optim.nonlinear.scalar.noderiv.BOBYQAOptimizer;
import org.apache.commons.math3.optim.univariate.BrentOptimizer;
import org.apache.commons.math3.optim.univariate.SearchInterval;
import org.apache.commons.math3.optim.univariate.UnivariateObjectiveFunction;
import org.apache.commons.math3.stat.descriptive.rank.Percentile;

/**
 * Price recommendation for one store (DESIGN section 6): the user's portfolio prices, within
 * guard-rails, that maximise the posterior mean (or a quantile) of the change in portfolio margin
 * against the base, with the competitors' response.
 *
 * <p>Objective at candidate portfolio prices {@code p_own}: for every posterior draw d, the
 * portfolio margin {@code sum_{j in own} (p_j - c_dj) s_dj M} minus the draw's base portfolio
 * margin, where rivals keep their base prices ({@code hold}) or re-set them to the Bertrand-Nash
 * equilibrium given {@code p_own} ({@code nash}: the portfolio moves first and rivals respond, so
 * the optimum is a leader's, not a simultaneous-move, price). The objective is the mean of those
 * changes, or their quantile at a given level (type-7 interpolation, commons-math3 {@link
 * Percentile}).
 *
 * <p>Guard-rails: each price stays within {@code current x (1 +- maxMove)} and at or above the
 * posterior mean of its marginal cost; a product whose cost floor is above its upper bound stays
 * at the upper bound. Costs are those of {@link BaseDraw} (first-order conditions at base prices,
 * or known). Draws whose costs could not be recovered are left out and counted. A rival solve that
 * fails counts with the rivals at their last equilibrium prices for that draw, and is counted.
 *
 * <p>Search: commons-math3's BOBYQA (bound-constrained, derivative-free; Powell 2009) over the
 * relative moves {@code p / current - 1}, or Brent's method when one price is free. Every rival
 * solve starts from that draw's previous equilibrium, so late evaluations take few iterations.
 *
 * <p>One instance per thread; it allocates per call (per store), not per evaluation.
 */
public final class PortfolioPricer {

  /**
   * @param maxMove largest relative price move, e.g. 0.10 for +-10%
   * @param quantile NaN to maximise the mean change, else the quantile level in (0, 1)
   * @param response the competitors' response
   * @param equilibrium convergence settings of the rivals' solves
   * @param maxEvaluations objective evaluations before the search stops
   */
  public record Settings(double maxMove, double quantile, Response response,
      EquilibriumSettings equilibrium, int maxEvaluations) {
    public Settings {
      if (!(maxMove > 0) || !(maxMove < 1)) {
        throw new IllegalArgumentException("max move must be in (0, 1), got " + maxMove);
      }
      if (!Double.isNaN(quantile) && !(quantile > 0 && quantile < 1)) {
        throw new IllegalArgumentException("quantile must be in (0, 1) or NaN, got " + quantile);
      }
      if (response == null || equilibrium == null) {
        throw new IllegalArgumentException("response and equilibrium settings are required");
      }
      if (maxEvaluations < 10) {
        throw new IllegalArgumentException("need at least 10 evaluations, got " + maxEvaluations);
      }
    }

    public static Settings of(double maxMove, double quantile, Response response) {
      return new Settings(maxMove, quantile, response, EquilibriumSettings.defaults(), 2000);
    }
  }

  /**
   * A recommendation.
   *
   * @param productIds the portfolio's products in this store
   * @param current their base prices
   * @param recommended recommended prices
   * @param lower lower guard-rail per product
   * @param upper upper guard-rail per product
   * @param meanCost posterior mean marginal cost per product
   * @param marginChange per used draw: portfolio margin at the recommended prices minus base
   * @param revenueChange per used draw, likewise
   * @param unitsChange per used draw, likewise
   * @param draws draws used
   * @param skippedDraws draws left out because their costs could not be recovered
   * @param failedSolves rival solves that failed at the recommended prices
   * @param evaluations objective evaluations of the search
   */
  public record Result(String[] productIds, double[] current, double[] recommended,
      double[] lower, double[] upper, double[] meanCost, double[] marginChange,
      double[] revenueChange, double[] unitsChange, int draws, int skippedDraws,
      int failedSolves, int evaluations) {}

  private final EquilibriumSolver solver;

  public PortfolioPricer(int maxShoppers, int maxProducts) {
    this.solver = new EquilibriumSolver(maxShoppers, maxProducts);
  }

  /**
   * Recommends portfolio prices for one store.
   *
   * @param draws base draws of the same store (from {@link ScenarioEvaluator#base})
   * @throws IllegalArgumentException when the draws are of different stores or none is usable
   */
  public Result recommend(List<BaseDraw> draws, Settings settings) {
    if (draws.isEmpty()) {
      throw new IllegalArgumentException("no posterior draws");
    }
    BaseMarket market = draws.get(0).market();
    List<BaseDraw> used = new ArrayList<>();
    for (BaseDraw b : draws) {
      if (b.market() != market) {
        throw new IllegalArgumentException("draws of stores " + market.storeId() + " and "
            + b.market().storeId() + " mixed");
      }
      if (b.costInfo().solved()) {
        used.add(b);
      }
    }
    int j = market.products();
    List<Integer> ownList = new ArrayList<>();
    for (int p = 0; p < j; p++) {
      if (market.inPortfolio(market.owner(p))) {
        ownList.add(p);
      }
    }
    int n = ownList.size();
    String[] ids = new String[n];
    double[] current = new double[n];
    for (int q = 0; q < n; q++) {
      ids[q] = market.productId(ownList.get(q));
      current[q] = market.price(ownList.get(q));
    }
    if (used.isEmpty()) {
      throw new IllegalArgumentException("store " + market.storeId()
          + ": no draw with recovered marginal costs");
    }
    Problem problem = new Problem(market, used, ownList, settings);
    double[] meanCost = new double[n];
    for (BaseDraw b : used) {
      for (int q = 0; q < n; q++) {
        meanCost[q] += b.cost()[ownList.get(q)] / used.size();
      }
    }
    // guard-rails in relative moves
    double m = settings.maxMove();
    double[] lo = new double[n];
    double[] hi = new double[n];
    List<Integer> searched = new ArrayList<>();
    double[] move = new double[n];
    for (int q = 0; q < n; q++) {
      hi[q] = m;
      lo[q] = Math.max(-m, meanCost[q] / current[q] - 1);
      if (lo[q] > hi[q] - 1e-9) {
        lo[q] = hi[q];
        move[q] = hi[q];
      } else {
        searched.add(q);
      }
    }
    problem.objective(move); // the current prices (clamped): the reference point
    if (!searched.isEmpty()) {
      int k = searched.size();
      int[] idx = searched.stream().mapToInt(Integer::intValue).toArray();
      try {
        if (k == 1) {
          int q = idx[0];
          UnivariateFunction f = x -> {
            double[] trial = move.clone();
            trial[q] = x;
            return problem.objective(trial);
          };
          new BrentOptimizer(1e-10, 1e-9).optimize(new MaxEval(settings.maxEvaluations()),
              new UnivariateObjectiveFunction(f), GoalType.MAXIMIZE,
              new SearchInterval(lo[q], hi[q], Math.min(hi[q], Math.max(lo[q], 0.0))));
        } else {
          double[] l = new double[k];
          double[] h = new double[k];
          double[] x0 = new double[k];
          double minGap = Double.POSITIVE_INFINITY;
          for (int i = 0; i < k; i++) {
            l[i] = lo[idx[i]];
            h[i] = hi[idx[i]];
            x0[i] = Math.min(h[i], Math.max(l[i], 0.0));
            minGap = Math.min(minGap, h[i] - l[i]);
          }
          MultivariateFunction f = x -> {
            double[] trial = move.clone();
            for (int i = 0; i < k; i++) {
              trial[idx[i]] = Math.min(h[i], Math.max(l[i], x[i]));
            }
            return problem.objective(trial);
          };
          double radius = Math.min(0.25 * minGap, 0.02);
          new BOBYQAOptimizer(2 * k + 1, radius, 1e-7).optimize(
              new MaxEval(settings.maxEvaluations()), new ObjectiveFunction(f),
              GoalType.MAXIMIZE, new InitialGuess(x0), new SimpleBounds(l, h));
        }
      } catch (TooManyEvaluationsException e) {
        // the best point seen so far stands; the evaluation count says the budget ran out
      }
    }
    System.arraycopy(problem.bestMove, 0, move, 0, n);
    double[] recommended = new double[n];
    double[] lower = new double[n];
    double[] upper = new double[n];
    for (int q = 0; q < n; q++) {
      recommended[q] = current[q] * (1 + move[q]);
      lower[q] = current[q] * (1 + lo[q]);
      upper[q] = current[q] * (1 + hi[q]);
    }
    int evaluations = problem.evaluations;
    problem.evaluate(move);
    return new Result(ids, current, recommended, lower, upper, meanCost,
        problem.margin.clone(), problem.revenue.clone(), problem.units.clone(), used.size(),
        draws.size() - used.size(), problem.failures, evaluations);
  }

  /** The objective's state: one loaded market and one warm start per draw. */
  private final class Problem {
    final BaseMarket market;
    final List<BaseDraw> draws;
    final int[] own;
    final Settings settings;
    final MarketModel[] models;
    final double[][] warm;
    final boolean[] free;
    final double[] price;
    final double[] margin;
    final double[] revenue;
    final double[] units;
    final Percentile percentile = new Percentile().withEstimationType(
        Percentile.EstimationType.R_7);
    int failures;
    int evaluations;
    double bestValue = Double.NEGATIVE_INFINITY;
    double[] bestMove;

    Problem(BaseMarket market, List<BaseDraw> draws, List<Integer> own, Settings settings) {
      this.market = market;
      this.draws = draws;
      this.own = own.stream().mapToInt(Integer::intValue).toArray();
      this.settings = settings;
      int j = market.products();
      int d = draws.size();
      models = new MarketModel[d];
      warm = new double[d][];
      for (int i = 0; i < d; i++) {
        BaseDraw b = draws.get(i);
        models[i] = new MarketModel(market.shoppers(), j);
        models[i].load(b.psi(), market.kx(), market.nuView(), market.shoppers(), market.xView(),
            j, b.delta(), market.firmView());
        warm[i] = market.prices();
      }
      free = new boolean[j];
      for (int p = 0; p < j; p++) {
        free[p] = settings.response() == Response.NASH;
      }
      for (int q : this.own) {
        free[q] = false;
      }
      price = new double[j];
      margin = new double[d];
      revenue = new double[d];
      units = new double[d];
    }

    /** Fills the per-draw changes at relative moves {@code move} of the own products. */
    void evaluate(double[] move) {
      evaluations++;
      failures = 0;
      int j = market.products();
      double size = market.marketSize();
      for (int i = 0; i < draws.size(); i++) {
        BaseDraw b = draws.get(i);
        System.arraycopy(warm[i], 0, price, 0, j);
        for (int q = 0; q < own.length; q++) {
          price[own[q]] = market.price(own[q]) * (1 + move[q]);
        }
        if (settings.response() == Response.NASH) {
          SolveInfo info = solver.solve(models[i], b.cost(), free, price, settings.equilibrium());
          if (info.converged()) {
            System.arraycopy(price, 0, warm[i], 0, j);
          } else {
            failures++;
            System.arraycopy(warm[i], 0, price, 0, j);
            for (int q = 0; q < own.length; q++) {
              price[own[q]] = market.price(own[q]) * (1 + move[q]);
            }
            solver.evaluate(models[i], price);
          }
        } else {
          solver.evaluate(models[i], price);
        }
        double[] s = solver.shares();
        double mg = 0;
        double rv = 0;
        double un = 0;
        for (int q : own) {
          double u = s[q] * size;
          un += u;
          rv += price[q] * u;
          mg += (price[q] - b.cost()[q]) * u;
        }
        MarketOutcome base = b.outcome();
        margin[i] = mg - base.portfolioMargin();
        revenue[i] = rv - base.portfolioRevenue();
        units[i] = un - base.portfolioUnits();
      }
    }

    /** The objective at {@code move}; remembers the best point evaluated. */
    double objective(double[] move) {
      evaluate(move);
      double value;
      if (Double.isNaN(settings.quantile())) {
        double sum = 0;
        for (double v : margin) {
          sum += v;
        }
        value = sum / margin.length;
      } else {
        value = percentile.evaluate(margin, 100 * settings.quantile());
      }
      if (value > bestValue || bestMove == null) {
        bestValue = value;
        bestMove = move.clone();
      }
      return value;
    }
  }

}
