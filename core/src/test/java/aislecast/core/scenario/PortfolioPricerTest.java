package aislecast.core.scenario;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;
import java.util.Set;
import org.junit.jupiter.api.Test;

class PortfolioPricerTest {

  private static final double ALPHA = 1.4;

  /** Plain-logit market: kx = 1 with vanishing spread, so every shopper has alpha = ALPHA. */
  private static BaseMarket logitMarket(String[] owners, double[] price, double[] cost) {
    int r = 5;
    int j = owners.length;
    double[] nu = new double[r * 2];
    for (int i = 0; i < nu.length; i++) {
      nu[i] = Math.cos(i + 0.5);
    }
    String[] ids = new String[j];
    double[] x = new double[j];
    for (int p = 0; p < j; p++) {
      ids[p] = "P" + p;
      x[p] = 0.1 * p;
    }
    return new BaseMarket("S1", ids, owners, 1, x, price, 5000.0, nu, r, cost, Set.of("own"));
  }

  private static double[] logitPsi() {
    return new double[] {Math.log(ALPHA), -40, -40};
  }

  private static double[] logitShares(double[] delta, double[] price) {
    double den = 1;
    double[] e = new double[delta.length];
    for (int p = 0; p < delta.length; p++) {
      e[p] = Math.exp(delta[p] - ALPHA * price[p]);
      den += e[p];
    }
    for (int p = 0; p < delta.length; p++) {
      e[p] /= den;
    }
    return e;
  }

  /**
   * Single-product logit firm, rivals hold: the optimum satisfies p - c = 1 / (alpha (1 - s))
   * (Anderson, de Palma and Thisse 1992, Discrete Choice Theory of Product Differentiation, ch. 7).
   */
  @Test
  void singleProductLogitMarkup() {
    double[] price = {2.0, 2.2, 1.8};
    double[] cost = {1.2, 1.0, 1.1};
    double[] delta = {1.0, 0.8, 0.5};
    BaseMarket m = logitMarket(new String[] {"own", "b", "c"}, price, cost);
    BaseDraw b = new ScenarioEvaluator(5, 3).base(m, logitPsi(), delta);
    PortfolioPricer.Result r = new PortfolioPricer(5, 3).recommend(List.of(b),
        PortfolioPricer.Settings.of(0.9, Double.NaN, Response.HOLD));
    double p = r.recommended()[0];
    double[] q = price.clone();
    q[0] = p;
    double s = logitShares(delta, q)[0];
    assertEquals(1 / (ALPHA * (1 - s)), p - cost[0], 1e-6);
    assertTrue(r.marginChange()[0] > 0);
  }

  /**
   * Multi-product logit firm, rivals hold: every own product carries the same markup
   * 1 / (alpha (1 - sum of the firm's shares)) (Anderson, de Palma and Thisse 1992; from memory).
   */
  @Test
  void multiProductLogitCommonMarkup() {
    double[] price = {2.0, 2.5, 2.2, 1.8};
    double[] cost = {1.2, 1.6, 1.0, 1.1};
    double[] delta = {1.0, 1.3, 0.8, 0.5};
    BaseMarket m = logitMarket(new String[] {"own", "own", "b", "c"}, price, cost);
    BaseDraw b = new ScenarioEvaluator(5, 4).base(m, logitPsi(), delta);
    PortfolioPricer.Result r = new PortfolioPricer(5, 4).recommend(List.of(b),
        PortfolioPricer.Settings.of(0.9, Double.NaN, Response.HOLD));
    double[] q = price.clone();
    q[0] = r.recommended()[0];
    q[1] = r.recommended()[1];
    double[] s = logitShares(delta, q);
    double markup = 1 / (ALPHA * (1 - s[0] - s[1]));
    assertEquals(markup, q[0] - cost[0], 1e-4);
    assertEquals(markup, q[1] - cost[1], 1e-4);
  }

  /** Guard-rails bind: a tight max move keeps every price within current x (1 +- move). */
  @Test
  void guardRailsBind() {
    double[] price = {2.0, 2.5, 2.2, 1.8};
    double[] cost = {1.2, 1.6, 1.0, 1.1};
    double[] delta = {1.0, 1.3, 0.8, 0.5};
    BaseMarket m = logitMarket(new String[] {"own", "own", "b", "c"}, price, cost);
    BaseDraw b = new ScenarioEvaluator(5, 4).base(m, logitPsi(), delta);
    PortfolioPricer.Result r = new PortfolioPricer(5, 4).recommend(List.of(b),
        PortfolioPricer.Settings.of(0.02, Double.NaN, Response.HOLD));
    for (int q = 0; q < 2; q++) {
      assertTrue(r.recommended()[q] <= price[q] * 1.02 + 1e-12);
      assertTrue(r.recommended()[q] >= price[q] * 0.98 - 1e-12);
      assertTrue(r.recommended()[q] >= r.meanCost()[q]);
    }
    // unconstrained optimum markups are above the current ones here, so the upper rail binds
    assertEquals(price[0] * 1.02, r.recommended()[0], 1e-6);
  }

  /**
   * Random coefficients, rivals re-set to Bertrand-Nash (demo stores, true parameters, costs from
   * the first-order conditions, so base prices are the simultaneous equilibrium): the leader's
   * optimum gains at least what the base gives (the base is feasible), and it is a local maximum
   * of the objective (finite differences, common practice).
   */
  @Test
  void nashLeaderOptimumOnDemoStore() {
    DemoStores demo = new DemoStores();
    List<BaseDraw> draws = new ArrayList<>();
    DemoStores.Store st = demo.store(5);
    BaseMarket m = st.market();
    ScenarioEvaluator ev = new ScenarioEvaluator(m.shoppers(), m.products());
    draws.add(ev.base(m, st.psi(), st.delta()));
    PortfolioPricer pricer = new PortfolioPricer(m.shoppers(), m.products());
    PortfolioPricer.Settings set = PortfolioPricer.Settings.of(0.10, Double.NaN, Response.NASH);
    PortfolioPricer.Result r = pricer.recommend(draws, set);
    assertEquals(0, r.failedSolves());
    double best = r.marginChange()[0];
    assertTrue(best >= -1e-9, "gain " + best);
    // perturb each interior price: no direction improves by more than the solver's noise
    for (int q = 0; q < r.productIds().length; q++) {
      double p = r.recommended()[q];
      if (p <= r.lower()[q] + 1e-3 || p >= r.upper()[q] - 1e-3) {
        continue;
      }
      for (double h : new double[] {-1e-3, 1e-3}) {
        double moved = marginAt(m, draws.get(0), r, q, p * (1 + h));
        assertTrue(moved <= best + 1e-6 * Math.abs(best) + 1e-9,
            "product " + r.productIds()[q] + " step " + h + ": " + moved + " > " + best);
      }
    }
  }

  /** Margin change of the portfolio when product q of the recommendation is set to {@code p}. */
  private static double marginAt(BaseMarket m, BaseDraw b, PortfolioPricer.Result r, int q,
      double p) {
    List<PriceChange> changes = new ArrayList<>();
    for (int i = 0; i < r.productIds().length; i++) {
      changes.add(PriceChange.set(r.productIds()[i], i == q ? p : r.recommended()[i]));
    }
    Scenario sc = new Scenario("probe", changes, List.of(), List.of(), Response.NASH);
    ScenarioOutcome o = new ScenarioEvaluator(m.shoppers(), m.products())
        .evaluate(b, ScenarioPlan.of(m, sc));
    assertTrue(o.solve().converged());
    return o.portfolioMarginChange();
  }
}
