package aislecast.core.scenario;

import aislecast.core.demand.ShareKernel;
import aislecast.core.equilibrium.EquilibriumSettings;
import aislecast.core.equilibrium.EquilibriumSolver;
import aislecast.core.equilibrium.MarginalCosts;
import aislecast.core.equilibrium.MarketModel;
import aislecast.core.equilibrium.SolveInfo;

/**
 * Scenario maths per (store, posterior draw) (DESIGN section 6).
 *
 * <p>Per draw: {@link #base} loads the store's market from the draw's {@code psi} and base mean
 * utilities, recovers marginal costs from the multi-product first-order conditions at base prices
 * ({@link MarginalCosts}; known costs override them) and evaluates the base. Then {@link #evaluate}
 * applies one {@link ScenarioPlan}: scenario assortment (delistings removed, launches added with
 * their mean utility and cost), planned prices, and the response: {@code hold} evaluates the
 * market at the planned prices; {@code nash} re-sets every product not changed directly to the
 * Bertrand-Nash equilibrium ({@link EquilibriumSolver}, starting from the planned prices). With
 * every cost from the first-order conditions the base prices are that equilibrium, so {@code nash}
 * with no change returns the base.
 *
 * <p>Usage from a job (one evaluator per task thread):
 *
 * <pre>
 *   ScenarioEvaluator ev = new ScenarioEvaluator(maxShoppers, maxProducts);
 *   ScenarioPlan[] plans = ...;                 // ScenarioPlan.of(market, scenario), per store
 *   for each draw d:
 *     BaseDraw b = ev.base(market, psi[d], delta[d]);
 *     for (ScenarioPlan plan : plans) emit(ev.evaluate(b, plan));
 * </pre>
 *
 * <p>Not thread-safe: it owns its buffers. Results are fresh objects the caller may keep.
 */
public final class ScenarioEvaluator {
  private final MarketModel model;
  private final EquilibriumSolver solver;
  private final MarginalCosts costs;
  private final EquilibriumSettings settings;
  private final boolean substitution;
  private final double[] dsdp;
  private final double[] work;
  private final double[] cost;
  private final double[] delta;
  private final boolean[] free;

  /** Default convergence settings, with elasticities and diversion ratios. */
  public ScenarioEvaluator(int maxShoppers, int maxProducts) {
    this(maxShoppers, maxProducts, EquilibriumSettings.defaults(), true);
  }

  /**
   * @param maxShoppers largest R
   * @param maxProducts largest assortment, launches included
   * @param settings equilibrium convergence settings
   * @param substitution whether outcomes carry elasticities and diversion ratios (J x J each)
   */
  public ScenarioEvaluator(int maxShoppers, int maxProducts, EquilibriumSettings settings,
      boolean substitution) {
    this.model = new MarketModel(maxShoppers, maxProducts);
    this.solver = new EquilibriumSolver(maxShoppers, maxProducts);
    this.costs = new MarginalCosts(maxShoppers, maxProducts);
    this.settings = settings;
    this.substitution = substitution;
    this.dsdp = new double[maxProducts * maxProducts];
    this.work = new double[maxProducts];
    this.cost = new double[maxProducts];
    this.delta = new double[maxProducts];
    this.free = new boolean[maxProducts];
  }

  /**
   * The base period of {@code market} under one posterior draw.
   *
   * @param psi the store's heterogeneity draw, not modified
   * @param delta base mean utilities (price excluded) of the store's products, not modified
   */
  public BaseDraw base(BaseMarket market, double[] psi, double[] delta) {
    int j = market.products();
    if (delta.length != j) {
      throw new IllegalArgumentException("store " + market.storeId() + ": " + delta.length
          + " mean utilities for " + j + " products");
    }
    model.load(psi, market.kx(), market.nuView(), market.shoppers(), market.xView(), j, delta,
        market.firmView());
    double[] price = market.priceView();
    double[] c = new double[j];
    boolean[] nonPositive = new boolean[j];
    MarginalCosts.Info info = costs.recover(model, price, c, nonPositive);
    for (int p = 0; p < j; p++) {
      double known = market.knownCost(p);
      if (!Double.isNaN(known)) {
        c[p] = known;
        nonPositive[p] = false; // reported counts are about inferred costs only
      }
    }
    double outside = solver.evaluate(model, price);
    MarketOutcome outcome = outcome(j, market.productIdsView(), market.ownersView(),
        market.firmView(), market.ownerNames(), market, price, c);
    return new BaseDraw(market, psi.clone(), delta.clone(), c, nonPositive, info, outcome);
  }

  /** {@link #base} then {@link #evaluate(BaseDraw, ScenarioPlan)}. */
  public ScenarioOutcome evaluate(ScenarioPlan plan, double[] psi, double[] delta) {
    return evaluate(base(plan.market, psi, delta), plan);
  }

  /** One scenario on a base draw of the same store. */
  public ScenarioOutcome evaluate(BaseDraw base, ScenarioPlan plan) {
    BaseMarket market = plan.market;
    if (base.market() != market) {
      throw new IllegalArgumentException("plan is for store " + market.storeId()
          + ", base draw for store " + base.market().storeId());
    }
    int j = plan.j;
    for (int p = 0; p < j; p++) {
      int src = plan.source[p];
      if (src >= 0) {
        delta[p] = base.delta()[src];
        cost[p] = base.cost()[src];
      } else {
        int l = -src - 1;
        Launch launch = plan.scenario.launches().get(l);
        int like = plan.likeIndex[l];
        delta[p] = Double.isNaN(launch.delta())
            ? base.delta()[like] + launch.deltaShift() : launch.delta();
        cost[p] = Double.isNaN(launch.cost()) ? base.cost()[like] : launch.cost();
      }
    }
    model.load(base.psi(), market.kx(), market.nuView(), market.shoppers(), plan.x, j, delta,
        plan.firm);
    double[] price = plan.price.clone();
    SolveInfo info;
    if (plan.scenario.response() == Response.NASH) {
      if (!base.costInfo().solved()) {
        solver.evaluate(model, price);
        info = new SolveInfo(false, 0, Double.NaN, Double.NaN,
            "marginal costs could not be recovered: " + base.costInfo().failure());
      } else {
        for (int p = 0; p < j; p++) {
          free[p] = !plan.fixed[p];
        }
        info = solver.solve(model, cost, free, price, settings);
      }
    } else {
      solver.evaluate(model, price);
      info = SolveInfo.held();
    }
    MarketOutcome scenarioOutcome = outcome(j, plan.ids, plan.owners, plan.firm, plan.ownerNames,
        market, price, cost);
    MarketOutcome baseOutcome = base.outcome();
    if (plan.ownerNames.length != baseOutcome.ownerNames().length) {
      // a launch brought a new owner: re-aggregate the base under the scenario's owner list
      baseOutcome = MarketOutcome.of(market.products(), baseOutcome.productIds(),
          baseOutcome.owners(), market.firmView(), plan.ownerNames, market.portfolioOwners(),
          baseOutcome.price(), baseOutcome.cost(), baseOutcome.share(), baseOutcome.outsideShare(),
          market.marketSize(), baseOutcome.elasticity(), baseOutcome.diversion());
    }
    return new ScenarioOutcome(plan.scenario.name(), market.storeId(), baseOutcome,
        scenarioOutcome, info, base.nonPositiveCosts());
  }

  /** Outcome at the solver's current market (its shares and probabilities). */
  private MarketOutcome outcome(int j, String[] ids, String[] owners, int[] firm,
      String[] ownerNames, BaseMarket market, double[] price, double[] c) {
    double[] elasticity = null;
    double[] diversion = null;
    if (substitution) {
      ShareKernel.jacobianPrice(model.shoppers(), j, solver.probs(), model.alpha(), dsdp);
      elasticity = new double[j * j];
      diversion = new double[j * (j + 1)];
      ShareKernel.elasticities(j, dsdp, solver.shares(), price, elasticity);
      ShareKernel.diversion(j, dsdp, diversion);
    }
    System.arraycopy(solver.shares(), 0, work, 0, j);
    return MarketOutcome.of(j, ids, owners, firm, ownerNames, market.portfolioOwners(), price, c,
        work, solver.outsideShare(), market.marketSize(), elasticity, diversion);
  }
}
