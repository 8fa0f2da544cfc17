package aislecast.core.scenario;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import aislecast.core.demand.Heterogeneity;
import aislecast.core.demand.ShareKernel;
import aislecast.core.equilibrium.MarketModel;
import aislecast.core.equilibrium.Markets;
import java.util.Arrays;
import java.util.List;
import java.util.Set;
import org.junit.jupiter.api.Test;

class ScenarioEvaluatorTest {
  private static final DemoStores DEMO = new DemoStores();

  private static ScenarioEvaluator evaluator() {
    return new ScenarioEvaluator(200, 40);
  }

  /** The portfolio product with the most units in the base. */
  private static String bestSeller(BaseDraw b) {
    MarketOutcome o = b.outcome();
    int best = -1;
    for (int p = 0; p < o.products(); p++) {
      if (b.market().inPortfolio(o.owners()[p]) && (best < 0 || o.units()[p] > o.units()[best])) {
        best = p;
      }
    }
    return o.productIds()[best];
  }

  /** {@code hold} with no change reproduces the base exactly (bit for bit). */
  @Test
  void holdWithNoChangeReproducesBaseExactly() {
    DemoStores.Store st = DEMO.store(3);
    ScenarioEvaluator ev = evaluator();
    ScenarioPlan plan = ScenarioPlan.of(st.market(), Scenario.none("none", Response.HOLD));
    ScenarioOutcome out = ev.evaluate(plan, st.psi(), st.delta());
    MarketOutcome b = out.base();
    MarketOutcome s = out.scenario();
    assertTrue(out.solve().converged());
    assertArrayEquals(b.productIds(), s.productIds());
    assertArrayEquals(b.price(), s.price(), 0.0);
    assertArrayEquals(b.cost(), s.cost(), 0.0);
    assertArrayEquals(b.share(), s.share(), 0.0);
    assertArrayEquals(b.units(), s.units(), 0.0);
    assertArrayEquals(b.revenue(), s.revenue(), 0.0);
    assertArrayEquals(b.margin(), s.margin(), 0.0);
    assertArrayEquals(b.ownerMargin(), s.ownerMargin(), 0.0);
    assertArrayEquals(b.elasticity(), s.elasticity(), 0.0);
    assertArrayEquals(b.diversion(), s.diversion(), 0.0);
    assertEquals(0.0, out.portfolioMarginChange(), 0.0);
  }

  /** With every cost from the first-order conditions, the base prices are the nash equilibrium. */
  @Test
  void nashWithNoChangeReturnsTheBase() {
    DemoStores.Store st = DEMO.store(5);
    ScenarioOutcome out = evaluator().evaluate(
        ScenarioPlan.of(st.market(), Scenario.none("none", Response.NASH)), st.psi(), st.delta());
    assertTrue(out.solve().converged(), out.solve().toString());
    for (int p = 0; p < out.base().products(); p++) {
      assertEquals(out.base().price()[p], out.scenario().price()[p], 1e-9 * out.base().price()[p]);
    }
  }

  /**
   * A 5% cut on the portfolio's best seller under {@code nash}: the cut product keeps its new
   * price, and every other product's owner satisfies its first-order condition, checked with
   * ShareKernel's price Jacobian in a market rebuilt from the outcome (to 1e-8 relative to the
   * share).
   */
  @Test
  void nashScenarioSatisfiesEveryFirmsFoc() {
    DemoStores.Store st = DEMO.store(7);
    ScenarioEvaluator ev = evaluator();
    BaseDraw b = ev.base(st.market(), st.psi(), st.delta());
    String cut = bestSeller(b);
    Scenario sc = new Scenario("cut", List.of(PriceChange.percent(cut, -5)), List.of(), List.of(),
        Response.NASH);
    ScenarioOutcome out = ev.evaluate(b, ScenarioPlan.of(st.market(), sc));
    assertTrue(out.solve().converged(), out.solve().toString());
    assertTrue(out.solve().iterations() > 0);
    MarketOutcome s = out.scenario();
    int k = s.indexOf(cut);
    assertEquals(0.95 * b.outcome().price()[k], s.price()[k], 1e-12);
    int j = s.products();
    MarketModel m = rebuild(st, s);
    double[] shares = new double[j];
    double[] grad = Markets.profitGradient(m, s.price(), s.cost(), shares);
    assertArrayEquals(s.share(), shares, 1e-13);
    for (int p = 0; p < j; p++) {
      if (p != k) {
        assertTrue(Math.abs(grad[p]) <= 1e-8 * shares[p], s.productIds()[p] + ": " + grad[p]);
      }
    }
    // rivals respond to a cut by cutting too (strategic complements under logit-type demand)
    int lower = 0;
    for (int p = 0; p < j; p++) {
      if (p != k && s.price()[p] < b.outcome().price()[p]) {
        lower++;
      }
    }
    assertEquals(j - 1, lower);
  }

  /** Same products in the same order as the outcome, rebuilt independently of the evaluator. */
  private static MarketModel rebuild(DemoStores.Store st, MarketOutcome o) {
    BaseMarket mk = st.market();
    int j = o.products();
    int kx = mk.kx();
    double[] x = new double[j * kx];
    double[] delta = new double[j];
    int[] firm = new int[j];
    for (int p = 0; p < j; p++) {
      int b = mk.indexOf(o.productIds()[p]);
      System.arraycopy(mk.xView(), b * kx, x, p * kx, kx);
      delta[p] = st.delta()[b];
      firm[p] = o.ownerIndex(o.owners()[p]);
    }
    MarketModel m = new MarketModel(mk.shoppers(), j);
    m.load(st.psi(), kx, mk.nuView(), mk.shoppers(), x, j, delta, firm);
    return m;
  }

  /**
   * Elasticities and diversion ratios of an outcome equal those from ShareKernel on utilities
   * built by Heterogeneity, and agree with central finite differences of the shares (common
   * practice); diversion rows sum to one.
   */
  @Test
  void elasticitiesAndDiversionMatchShareKernelAndFiniteDifferences() {
    DemoStores.Store st = DEMO.store(11);
    BaseMarket mk = st.market();
    BaseDraw b = evaluator().base(mk, st.psi(), st.delta());
    MarketOutcome o = b.outcome();
    int r = mk.shoppers();
    int j = mk.products();
    double[] alpha = new double[r];
    double[] mu = new double[r * j];
    double[] v = new double[r * j];
    Heterogeneity.shopperTastes(st.psi(), mk.kx(), mk.nuView(), r, mk.xView(), j, alpha, mu);
    Heterogeneity.shopperUtility(r, j, alpha, mu, o.price(), v);
    double[] s = new double[j];
    double[] probs = new double[r * j];
    ShareKernel.shares(r, j, st.delta(), v, s, probs);
    double[] dsdp = new double[j * j];
    ShareKernel.jacobianPrice(r, j, probs, alpha, dsdp);
    double[] e = new double[j * j];
    double[] d = new double[j * (j + 1)];
    ShareKernel.elasticities(j, dsdp, s, o.price(), e);
    ShareKernel.diversion(j, dsdp, d);
    assertArrayEquals(e, o.elasticity(), 1e-12);
    assertArrayEquals(d, o.diversion(), 1e-12);
    double h = 1e-6;
    double[] up = new double[j];
    double[] dn = new double[j];
    for (int k = 0; k < j; k++) {
      double[] pu = o.price().clone();
      double[] pd = o.price().clone();
      pu[k] += h;
      pd[k] -= h;
      Heterogeneity.shopperUtility(r, j, alpha, mu, pu, v);
      ShareKernel.shares(r, j, st.delta(), v, up, null);
      Heterogeneity.shopperUtility(r, j, alpha, mu, pd, v);
      ShareKernel.shares(r, j, st.delta(), v, dn, null);
      for (int q = 0; q < j; q++) {
        double fd = (up[q] - dn[q]) / (2 * h) * o.price()[k] / s[q];
        assertEquals(fd, o.elasticity()[q * j + k], 1e-6, "e[" + q + "," + k + "]");
      }
    }
    for (int q = 0; q < j; q++) {
      double sum = 0;
      for (int c = 0; c <= j; c++) {
        sum += o.diversion()[q * (j + 1) + c];
      }
      assertEquals(1.0, sum, 1e-12);
      assertTrue(o.elasticity()[q * j + q] < 0);
    }
  }

  /**
   * Plain logit through the whole API (heterogeneity scales exp(-50), i.e. none): own elasticity
   * {@code -alpha p_j (1 - s_j)}, cross {@code alpha p_k s_k} (Train, Discrete Choice Methods with
   * Simulation, ch. 3), diversion {@code s_k / (1 - s_j)} (from memory).
   */
  @Test
  void logitClosedFormsThroughTheApi() {
    int kx = 2;
    double[] psi = new double[Heterogeneity.dim(kx)];
    double alpha = 0.7;
    psi[0] = Math.log(alpha);
    psi[1] = -50;
    psi[2] = -50;
    psi[3] = -50;
    String[] ids = {"A", "B", "C"};
    double[] x = {0.5, -1, 1, 0, -1.5, 1};
    double[] price = {2.0, 2.5, 1.5};
    double[] nu = {0.3, -1.2, 0.8, -0.4, 0.1, 1.5};
    BaseMarket mk = new BaseMarket("s", ids, new String[] {"o1", "o2", "o1"}, kx, x, price, 1000,
        nu, 2, null, Set.of("o1"));
    double[] delta = {0.4, 0.9, -0.2};
    MarketOutcome o = evaluator().base(mk, psi, delta).outcome();
    double den = 1;
    for (int p = 0; p < 3; p++) {
      den += Math.exp(delta[p] - alpha * price[p]);
    }
    for (int q = 0; q < 3; q++) {
      double sq = Math.exp(delta[q] - alpha * price[q]) / den;
      assertEquals(sq, o.share()[q], 1e-14);
      for (int k = 0; k < 3; k++) {
        double sk = Math.exp(delta[k] - alpha * price[k]) / den;
        double expected = q == k ? -alpha * price[q] * (1 - sq) : alpha * price[k] * sk;
        assertEquals(expected, o.elasticity()[q * 3 + k], 1e-12);
        if (k != q) {
          assertEquals(sk / (1 - sq), o.diversion()[q * 4 + k], 1e-12);
        }
      }
    }
    assertEquals(o.share()[0] + o.share()[2], o.portfolioShare(), 1e-15);
    assertEquals(1000 * o.portfolioShare(), o.portfolioUnits(), 1e-9);
  }

  /**
   * Round trip through the API: solve an equilibrium from known costs, make its prices the base
   * of a store without known costs, and the first-order conditions return the known costs.
   */
  @Test
  void costsRecoveredFromAnEquilibriumBaseEqualTheCostsBehindIt() {
    DemoStores.Store st = DEMO.store(13);
    BaseMarket mk = st.market();
    int j = mk.products();
    double[] known = new double[j];
    for (int p = 0; p < j; p++) {
      known[p] = 0.55 * mk.price(p);
    }
    BaseMarket withCosts = new BaseMarket(mk.storeId(), mk.productIdsView(), mk.ownersView(),
        mk.kx(), mk.xView(), mk.priceView(), mk.marketSize(), mk.nuView(), mk.shoppers(), known,
        mk.portfolioOwners());
    ScenarioEvaluator ev = evaluator();
    ScenarioOutcome eq = ev.evaluate(
        ScenarioPlan.of(withCosts, Scenario.none("eq", Response.NASH)), st.psi(), st.delta());
    assertTrue(eq.solve().converged(), eq.solve().toString());
    assertArrayEquals(known, eq.base().cost(), 0.0);
    BaseMarket atEquilibrium = new BaseMarket(mk.storeId(), mk.productIdsView(), mk.ownersView(),
        mk.kx(), mk.xView(), eq.scenario().price(), mk.marketSize(), mk.nuView(), mk.shoppers(),
        null, mk.portfolioOwners());
    BaseDraw b = ev.base(atEquilibrium, st.psi(), st.delta());
    assertTrue(b.costInfo().solved());
    assertEquals(0, b.nonPositiveCosts());
    assertArrayEquals(known, b.cost(), 1e-9);
  }

  /**
   * Delisting under {@code hold}: every remaining product and the outside option gain share, and
   * the delisted product's units are split among them (units are conserved).
   */
  @Test
  void delistingRedistributesItsShare() {
    DemoStores.Store st = DEMO.store(2);
    ScenarioEvaluator ev = evaluator();
    BaseDraw b = ev.base(st.market(), st.psi(), st.delta());
    String gone = bestSeller(b);
    ScenarioOutcome out = ev.evaluate(b, ScenarioPlan.of(st.market(),
        new Scenario("delist", List.of(), List.of(gone), List.of(), Response.HOLD)));
    MarketOutcome s = out.scenario();
    assertEquals(-1, s.indexOf(gone));
    assertEquals(b.outcome().products() - 1, s.products());
    double gained = 0;
    for (int p = 0; p < s.products(); p++) {
      int q = b.outcome().indexOf(s.productIds()[p]);
      assertTrue(s.share()[p] > b.outcome().share()[q]);
      gained += s.units()[p] - b.outcome().units()[q];
    }
    assertTrue(s.outsideShare() > b.outcome().outsideShare());
    double lost = b.outcome().units()[b.outcome().indexOf(gone)];
    double toOutside = (s.outsideShare() - b.outcome().outsideShare()) * st.market().marketSize();
    assertEquals(lost, gained + toOutside, 1e-9 * lost);
  }

  /**
   * Launching an exact copy of X (same attributes, price, utility and cost) under {@code hold}:
   * the copy and X end with equal shares (identical products, common practice), X loses share,
   * and a new owner appears in the owner sums with zero base figures.
   */
  @Test
  void launchOfAnExactCopy() {
    DemoStores.Store st = DEMO.store(4);
    BaseMarket mk = st.market();
    ScenarioEvaluator ev = evaluator();
    BaseDraw b = ev.base(mk, st.psi(), st.delta());
    String like = bestSeller(b);
    int xi = mk.indexOf(like);
    double[] x = Arrays.copyOfRange(mk.xView(), xi * mk.kx(), (xi + 1) * mk.kx());
    Launch copy = Launch.like("NEW-1", "Newcomer Drinks", like, x, mk.price(xi));
    ScenarioOutcome out = ev.evaluate(b, ScenarioPlan.of(mk,
        new Scenario("launch", List.of(), List.of(), List.of(copy), Response.HOLD)));
    MarketOutcome s = out.scenario();
    int n = s.indexOf("NEW-1");
    int xs = s.indexOf(like);
    assertEquals(s.share()[xs], s.share()[n], 1e-15);
    assertTrue(s.share()[xs] < b.outcome().share()[xi]);
    assertEquals(b.cost()[xi], s.cost()[n], 0.0);
    int newOwner = s.ownerIndex("Newcomer Drinks");
    assertEquals(s.ownerNames().length, out.base().ownerNames().length);
    assertEquals(0.0, out.base().ownerUnits()[newOwner], 0.0);
    assertEquals(s.units()[n], s.ownerUnits()[newOwner], 1e-12);
    // the copy takes the most share from X itself (random tastes: closest substitute loses most)
    double worst = 0;
    String worstId = null;
    for (int p = 0; p < s.products(); p++) {
      if (p == n) {
        continue;
      }
      double rel = (b.outcome().share()[b.outcome().indexOf(s.productIds()[p])] - s.share()[p])
          / b.outcome().share()[b.outcome().indexOf(s.productIds()[p])];
      if (rel > worst) {
        worst = rel;
        worstId = s.productIds()[p];
      }
    }
    assertEquals(like, worstId);
  }

  /** Launch prices and directly changed prices are held under {@code nash}; FOC for the rest. */
  @Test
  void launchUnderNashHoldsItsPrice() {
    DemoStores.Store st = DEMO.store(8);
    BaseMarket mk = st.market();
    ScenarioEvaluator ev = evaluator();
    BaseDraw b = ev.base(mk, st.psi(), st.delta());
    String like = bestSeller(b);
    int xi = mk.indexOf(like);
    double[] x = Arrays.copyOfRange(mk.xView(), xi * mk.kx(), (xi + 1) * mk.kx());
    x[0] = -x[0]; // a sugar-free twist on X
    Launch l = new Launch("NEW-2", mk.owner(xi), x, 1.1 * mk.price(xi), like, -0.2, Double.NaN,
        Double.NaN);
    ScenarioOutcome out = ev.evaluate(b, ScenarioPlan.of(mk,
        new Scenario("launch", List.of(), List.of(), List.of(l), Response.NASH)));
    assertTrue(out.solve().converged(), out.solve().toString());
    MarketOutcome s = out.scenario();
    int n = s.indexOf("NEW-2");
    assertEquals(1.1 * mk.price(xi), s.price()[n], 0.0);
    MarketModel m = new MarketModel(mk.shoppers(), s.products());
    int j = s.products();
    int kx = mk.kx();
    double[] xs = new double[j * kx];
    double[] delta = new double[j];
    int[] firm = new int[j];
    for (int p = 0; p < j; p++) {
      int q = mk.indexOf(s.productIds()[p]);
      System.arraycopy(q >= 0 ? Arrays.copyOfRange(mk.xView(), q * kx, (q + 1) * kx) : x, 0, xs,
          p * kx, kx);
      delta[p] = q >= 0 ? st.delta()[q] : st.delta()[xi] - 0.2;
      firm[p] = s.ownerIndex(s.owners()[p]);
    }
    m.load(st.psi(), kx, mk.nuView(), mk.shoppers(), xs, j, delta, firm);
    double[] shares = new double[j];
    double[] grad = Markets.profitGradient(m, s.price(), s.cost(), shares);
    assertArrayEquals(s.share(), shares, 1e-13);
    for (int p = 0; p < j; p++) {
      if (p != n) {
        assertTrue(Math.abs(grad[p]) <= 1e-8 * shares[p], s.productIds()[p] + ": " + grad[p]);
      }
    }
  }

  @Test
  void planReportsIgnoredReferencesAndRejectsContradictions() {
    DemoStores.Store st = DEMO.store(1);
    BaseMarket mk = st.market();
    String first = mk.productId(0);
    ScenarioPlan plan = ScenarioPlan.of(mk, new Scenario("x",
        List.of(PriceChange.percent("NOT-HERE", 5)), List.of("ALSO-NOT-HERE"), List.of(),
        Response.HOLD));
    assertEquals(2, plan.notes().size());
    assertEquals(mk.products(), plan.products());
    IllegalArgumentException neg = assertThrows(IllegalArgumentException.class,
        () -> ScenarioPlan.of(mk, new Scenario("neg", List.of(PriceChange.absolute(first, -1e6)),
            List.of(), List.of(), Response.HOLD)));
    assertTrue(neg.getMessage().contains(mk.storeId()) && neg.getMessage().contains(first));
    double[] x = new double[mk.kx()];
    assertThrows(IllegalArgumentException.class, () -> ScenarioPlan.of(mk, new Scenario("dup",
        List.of(), List.of(), List.of(Launch.like(first, "o", first, x, 1.0)), Response.HOLD)));
    assertThrows(IllegalArgumentException.class, () -> ScenarioPlan.of(mk, new Scenario("like",
        List.of(), List.of(), List.of(Launch.like("N", "o", "NOT-HERE", x, 1.0)), Response.HOLD)));
    assertThrows(IllegalArgumentException.class, () -> new Scenario("both",
        List.of(PriceChange.percent(first, 1)), List.of(first), List.of(), Response.HOLD));
    String[] all = new String[mk.products()];
    for (int p = 0; p < all.length; p++) {
      all[p] = mk.productId(p);
    }
    assertThrows(IllegalArgumentException.class, () -> ScenarioPlan.of(mk,
        new Scenario("empty", List.of(), List.of(all), List.of(), Response.HOLD)));
  }

  /** A cost solve failure is reported in the outcome under nash, not thrown. */
  @Test
  void failedCostsAreReportedUnderNash() {
    BaseMarket mk = new BaseMarket("s", new String[] {"A", "B"}, new String[] {"o1", "o2"}, 0,
        new double[0], new double[] {1.0, 2000.0}, 100, new double[] {0.0}, 1, null, Set.of("o1"));
    double[] psi = {0.0, -50};
    ScenarioOutcome out = evaluator().evaluate(
        ScenarioPlan.of(mk, Scenario.none("n", Response.NASH)), psi, new double[] {0, 0});
    assertFalse(out.solve().converged());
    assertTrue(out.solve().failure().contains("marginal costs"));
    ScenarioOutcome held = evaluator().evaluate(
        ScenarioPlan.of(mk, Scenario.none("h", Response.HOLD)), psi, new double[] {0, 0});
    assertTrue(held.solve().converged());
    assertNull(held.solve().failure());
    assertTrue(Double.isNaN(held.scenario().margin()[0]));
  }
}
