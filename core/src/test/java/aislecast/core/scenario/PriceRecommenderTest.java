package aislecast.core.scenario;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import aislecast.core.demand.Heterogeneity;
import java.util.ArrayList;
import java.util.List;
import java.util.Set;
import java.util.SplittableRandom;
import org.apache.commons.math3.analysis.solvers.BrentSolver;
import org.junit.jupiter.api.Test;

class PriceRecommenderTest {
  private static final DemoStores DEMO = new DemoStores();

  /** A small seeded "posterior" around the true parameters: psi and delta jittered per draw. */
  private static double[][][] draws(DemoStores.Store st, int n, long seed) {
    SplittableRandom g = new SplittableRandom(seed);
    double[][] psi = new double[n][];
    double[][] delta = new double[n][];
    for (int d = 0; d < n; d++) {
      psi[d] = st.psi().clone();
      delta[d] = st.delta().clone();
      for (int q = 0; q < psi[d].length; q++) {
        psi[d][q] += 0.05 * g.nextGaussian();
      }
      for (int q = 0; q < delta[d].length; q++) {
        delta[d][q] += 0.05 * g.nextGaussian();
      }
    }
    return new double[][][] {psi, delta};
  }

  private static BaseMarket withKnownCosts(BaseMarket mk, double[] known) {
    return new BaseMarket(mk.storeId(), mk.productIdsView(), mk.ownersView(), mk.kx(), mk.xView(),
        mk.priceView(), mk.marketSize(), mk.nuView(), mk.shoppers(), known, mk.portfolioOwners());
  }

  /**
   * Single-product firm under plain logit with a known cost, rival holding: the recommendation
   * satisfies {@code p - c = 1 / (alpha (1 - s))} (Anderson, de Palma and Thisse 1992; from
   * memory), solved independently with commons-math3's Brent root finder.
   */
  @Test
  void singleProductLogitOptimum() {
    double alpha = 0.8;
    double[] psi = new double[Heterogeneity.dim(1)];
    psi[0] = Math.log(alpha);
    psi[1] = -50; // no spread in alpha
    psi[2] = -50; // no attribute tastes
    double[] delta = {1.0, 0.5};
    double cost = 1.0;
    BaseMarket mk = new BaseMarket("s", new String[] {"A", "B"}, new String[] {"me", "rival"}, 1,
        new double[] {1, -1}, new double[] {2.2, 2.0}, 1000, new double[] {0.1, -0.3}, 1,
        new double[] {cost, Double.NaN}, Set.of("me"));
    RecommendSettings st = RecommendSettings.defaults().with(40, Response.HOLD, Double.NaN)
        .withSearch(1e-6, 100_000);
    Recommendation rec = new PriceRecommender(1, 2).recommend(mk, new double[][] {psi},
        new double[][] {delta}, st);
    assertTrue(rec.converged());
    double pB = 2.0;
    double expected = new BrentSolver(1e-14).solve(1000, p -> {
      double ea = Math.exp(delta[0] - alpha * p);
      double s = ea / (1 + ea + Math.exp(delta[1] - alpha * pB));
      return p - cost - 1 / (alpha * (1 - s));
    }, 1.0, 10.0);
    assertEquals(expected, rec.recommendedPrice()[0], 1e-6 * expected);
    assertTrue(rec.objectiveRecommended() > rec.objectiveCurrent());
    assertEquals(rec.objectiveRecommended() - rec.objectiveCurrent(), rec.marginChange().mean(),
        1e-9 * rec.objectiveRecommended());
    assertEquals(1.0, rec.marginChange().probPositive(), 0.0);
  }

  /**
   * Every cost from the first-order conditions and rivals holding: in each draw the current
   * prices are the portfolio's best reply, so the expected margin is maximal there and the search
   * stays within its last step of the current prices (common practice: the FOC inversion).
   */
  @Test
  void focCostsUnderHoldKeepCurrentPrices() {
    DemoStores.Store st = DEMO.store(6);
    double[][][] d = draws(st, 6, 61L);
    RecommendSettings s = RecommendSettings.defaults().with(10, Response.HOLD, Double.NaN);
    Recommendation rec = new PriceRecommender(200, 40).recommend(st.market(), d[0], d[1], s);
    assertTrue(rec.converged());
    assertEquals(6, rec.drawsUsed());
    for (int q = 0; q < rec.productIds().length; q++) {
      assertEquals(rec.currentPrice()[q], rec.recommendedPrice()[q],
          2 * s.minStepPercent() / 100 * rec.currentPrice()[q], rec.productIds()[q]);
    }
    assertTrue(rec.objectiveRecommended() >= rec.objectiveCurrent());
    assertTrue(rec.objectiveRecommended() - rec.objectiveCurrent() < 1e-6 * rec.objectiveCurrent());
  }

  /**
   * Guard-rails: with known costs far below the FOC ones the optimum lies below the rails, so
   * prices stop at the lower rail; a known cost above the lower rail becomes the floor.
   */
  @Test
  void guardRailsAndCostFloorAreRespected() {
    DemoStores.Store st = DEMO.store(9);
    BaseMarket mk = st.market();
    double[] known = new double[mk.products()];
    String high = null;
    for (int p = 0; p < known.length; p++) {
      known[p] = Double.NaN;
      if (mk.inPortfolio(mk.owner(p))) {
        if (high == null) {
          high = mk.productId(p);
          known[p] = 0.98 * mk.price(p); // floor above the 5% lower rail
        } else {
          known[p] = 0.05 * mk.price(p);
        }
      }
    }
    double[][][] d = draws(st, 4, 91L);
    RecommendSettings s = RecommendSettings.defaults().with(5, Response.HOLD, Double.NaN);
    Recommendation rec = new PriceRecommender(200, 40).recommend(withKnownCosts(mk, known), d[0],
        d[1], s);
    int atLower = 0;
    for (int q = 0; q < rec.productIds().length; q++) {
      double p = rec.recommendedPrice()[q];
      assertTrue(p >= rec.lower()[q] && p <= rec.upper()[q]);
      double c = known[mk.indexOf(rec.productIds()[q])];
      assertTrue(p >= c, rec.productIds()[q] + " below cost");
      if (rec.productIds()[q].equals(high)) {
        assertEquals(c, rec.lower()[q], 1e-12);
      } else if (p == rec.lower()[q]) {
        atLower++;
      }
    }
    assertTrue(atLower > 0, "cheap products should go to the lower rail");
    assertTrue(rec.objectiveRecommended() > rec.objectiveCurrent());
  }

  /**
   * Under nash the portfolio leads and rivals re-set: the search never ends below the current
   * prices, and the per-draw margin change it reports equals the change computed through
   * ScenarioEvaluator (a SET-price nash scenario per draw), an independent path.
   */
  @Test
  void nashRecommendationAgreesWithScenarioEvaluation() {
    DemoStores.Store st = DEMO.store(12);
    BaseMarket mk = st.market();
    double[][][] d = draws(st, 3, 121L);
    RecommendSettings s = RecommendSettings.defaults().with(8, Response.NASH, Double.NaN)
        .withSearch(0.05, 400);
    Recommendation rec = new PriceRecommender(200, 40).recommend(mk, d[0], d[1], s);
    assertTrue(rec.objectiveRecommended() >= rec.objectiveCurrent());
    assertEquals(0, rec.rejectedCandidates());
    Bands b = rec.marginChange();
    assertTrue(b.q05() <= b.q25() && b.q25() <= b.q50() && b.q50() <= b.q75() && b.q75() <= b.q95());
    assertEquals(rec.objectiveRecommended() - rec.objectiveCurrent(), b.mean(),
        1e-9 * Math.abs(rec.objectiveRecommended()));
    List<PriceChange> set = new ArrayList<>();
    for (int q = 0; q < rec.productIds().length; q++) {
      set.add(PriceChange.set(rec.productIds()[q], rec.recommendedPrice()[q]));
    }
    ScenarioPlan plan = ScenarioPlan.of(mk, new Scenario("rec", set, List.of(), List.of(),
        Response.NASH));
    ScenarioEvaluator ev = new ScenarioEvaluator(200, 40);
    double sum = 0;
    for (int k = 0; k < 3; k++) {
      ScenarioOutcome o = ev.evaluate(plan, d[0][k], d[1][k]);
      assertTrue(o.solve().converged());
      sum += o.portfolioMarginChange();
    }
    assertEquals(sum / 3, b.mean(), 1e-6 * Math.abs(rec.objectiveCurrent()));
    // a cautious objective: the 10% quantile of portfolio margin
    Recommendation cautious = new PriceRecommender(200, 40).recommend(mk, d[0], d[1],
        s.with(8, Response.NASH, 0.1));
    assertTrue(cautious.objectiveRecommended() >= cautious.objectiveCurrent());
  }
}
