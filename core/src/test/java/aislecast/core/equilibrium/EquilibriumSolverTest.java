package aislecast.core.equilibrium;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Arrays;
import org.junit.jupiter.api.Test;

class EquilibriumSolverTest {

  /**
   * Single-product firms under plain logit: the Bertrand optimum satisfies {@code p - c = 1 /
   * (alpha (1 - s))} (Anderson, de Palma and Thisse 1992, "Discrete Choice Theory of Product
   * Differentiation", ch. 7; from memory).
   */
  @Test
  void singleProductLogitMarkup() {
    double alpha = 1.3;
    double[] delta = {1.0, 0.2, -0.5};
    int[] firm = {0, 1, 2};
    double[] cost = {1.0, 0.8, 1.5};
    MarketModel m = Markets.logit(alpha, delta, firm);
    EquilibriumSolver solver = new EquilibriumSolver(1, 3);
    double[] price = {2.0, 2.0, 2.0};
    boolean[] free = {true, true, true};
    SolveInfo info = solver.solve(m, cost, free, price);
    assertTrue(info.converged(), info.toString());
    assertNull(info.failure());
    for (int p = 0; p < 3; p++) {
      double s = solver.shares()[p];
      assertEquals(1.0 / (alpha * (1 - s)), price[p] - cost[p], 1e-9, "product " + p);
    }
  }

  /**
   * A multi-product logit firm charges the same markup on all its products, {@code 1 / (alpha (1
   * - sum of its shares))} (Anderson, de Palma and Thisse 1992, ch. 7; from memory).
   */
  @Test
  void multiProductLogitCommonMarkup() {
    double alpha = 0.9;
    double[] delta = {1.0, 0.4, -0.3, 0.8, 0.1};
    int[] firm = {0, 0, 0, 1, 2};
    double[] cost = {1.0, 1.4, 0.7, 1.1, 0.9};
    MarketModel m = Markets.logit(alpha, delta, firm);
    EquilibriumSolver solver = new EquilibriumSolver(1, 5);
    double[] price = cost.clone();
    boolean[] free = new boolean[5];
    Arrays.fill(free, true);
    SolveInfo info = solver.solve(m, cost, free, price);
    assertTrue(info.converged(), info.toString());
    double[] s = solver.shares();
    double firm0 = s[0] + s[1] + s[2];
    for (int p = 0; p < 3; p++) {
      assertEquals(1.0 / (alpha * (1 - firm0)), price[p] - cost[p], 1e-9, "product " + p);
    }
    assertEquals(1.0 / (alpha * (1 - s[3])), price[3] - cost[3], 1e-9);
    assertEquals(1.0 / (alpha * (1 - s[4])), price[4] - cost[4], 1e-9);
  }

  /**
   * Under random coefficients every re-set product's owner is at a stationary point of its
   * profit: the gradient from ShareKernel's price Jacobian vanishes to 1e-8 (relative to the
   * share), and so do central finite differences of the profit (common practice). Some products
   * are held at given prices; their owners' other products still best respond.
   */
  @Test
  void nashSatisfiesEveryFirmsFocWithRandomCoefficients() {
    EquilibriumSolver solver = new EquilibriumSolver(200, 12);
    for (long seed = 1; seed <= 4; seed++) {
      Markets.Rc mk = new Markets.Rc(seed, 200, 12, 3, 3);
      MarketModel m = mk.model();
      boolean[] free = new boolean[12];
      Arrays.fill(free, true);
      if (seed % 2 == 0) {
        free[0] = false; // held, e.g. a product the scenario changed directly
        free[5] = false;
      }
      double[] price = new double[12];
      for (int p = 0; p < 12; p++) {
        price[p] = mk.cost[p] * 1.5 + 0.3;
      }
      double[] start = price.clone();
      SolveInfo info = solver.solve(m, mk.cost, free, price);
      assertTrue(info.converged(), "seed " + seed + ": " + info);
      assertTrue(info.iterations() > 0);
      double[] s = new double[12];
      double[] grad = Markets.profitGradient(m, price, mk.cost, s);
      for (int p = 0; p < 12; p++) {
        if (!free[p]) {
          assertEquals(start[p], price[p], 0.0, "held price moved");
          continue;
        }
        assertTrue(Math.abs(grad[p]) <= 1e-8 * s[p], "seed " + seed + " product " + p + ": " + grad[p]);
        double h = 1e-5;
        double[] up = price.clone();
        double[] dn = price.clone();
        up[p] += h;
        dn[p] -= h;
        int f = m.firm(p);
        double fd = (Markets.firmProfit(m, up, mk.cost, f) - Markets.firmProfit(m, dn, mk.cost, f))
            / (2 * h);
        assertEquals(0.0, fd, 1e-8, "finite-difference profit slope, product " + p);
        // a maximum, not a minimum: moving either way lowers the firm's profit
        double at = Markets.firmProfit(m, price, mk.cost, f);
        up[p] = price[p] + 0.01;
        dn[p] = price[p] - 0.01;
        assertTrue(Markets.firmProfit(m, up, mk.cost, f) < at);
        assertTrue(Markets.firmProfit(m, dn, mk.cost, f) < at);
      }
    }
  }

  /** Round trip: costs recovered at an equilibrium equal the costs it was solved with. */
  @Test
  void costsRecoveredAtEquilibriumEqualTrueCosts() {
    for (long seed = 11; seed <= 13; seed++) {
      Markets.Rc mk = new Markets.Rc(seed, 200, 10, 2, 4);
      MarketModel m = mk.model();
      boolean[] free = new boolean[10];
      Arrays.fill(free, true);
      double[] price = new double[10];
      Arrays.fill(price, 2.0);
      SolveInfo info = new EquilibriumSolver(200, 10).solve(m, mk.cost, free, price);
      assertTrue(info.converged(), info.toString());
      double[] recovered = new double[10];
      boolean[] flags = new boolean[10];
      MarginalCosts.Info ci = new MarginalCosts(200, 10).recover(m, price, recovered, flags);
      assertTrue(ci.solved(), ci.toString());
      assertEquals(0, ci.nonPositive());
      assertArrayEquals(mk.cost, recovered, 1e-8);
    }
  }

  /** Starting at an equilibrium, the solver stops at once and leaves the prices alone. */
  @Test
  void startingAtEquilibriumNeedsNoIteration() {
    Markets.Rc mk = new Markets.Rc(21, 200, 8, 3, 2);
    MarketModel m = mk.model();
    boolean[] free = new boolean[8];
    Arrays.fill(free, true);
    double[] price = new double[8];
    Arrays.fill(price, 2.0);
    EquilibriumSolver solver = new EquilibriumSolver(200, 8);
    assertTrue(solver.solve(m, mk.cost, free, price).converged());
    double[] again = price.clone();
    SolveInfo info = solver.solve(m, mk.cost, free, again);
    assertTrue(info.converged());
    assertEquals(0, info.iterations());
    assertArrayEquals(price, again, 0.0);
  }

  @Test
  void heldMarketIsEvaluatedNotSolved() {
    Markets.Rc mk = new Markets.Rc(5, 50, 6, 2, 2);
    MarketModel m = mk.model();
    double[] price = {1, 2, 3, 1, 2, 3};
    SolveInfo info = new EquilibriumSolver(50, 6).solve(m, mk.cost, new boolean[6], price);
    assertTrue(info.converged());
    assertEquals(0, info.iterations());
    assertTrue(Double.isNaN(info.residual()));
    assertArrayEquals(new double[] {1, 2, 3, 1, 2, 3}, price, 0.0);
  }

  /** Failures come back in the report, never as exceptions. */
  @Test
  void failuresAreReported() {
    Markets.Rc mk = new Markets.Rc(7, 100, 6, 2, 2);
    MarketModel m = mk.model();
    EquilibriumSolver solver = new EquilibriumSolver(100, 6);
    boolean[] free = new boolean[6];
    Arrays.fill(free, true);
    double[] price = new double[6];
    Arrays.fill(price, 5.0);
    SolveInfo capped = solver.solve(m, mk.cost, free, price, new EquilibriumSettings(1e-10, 1));
    assertFalse(capped.converged());
    assertEquals(1, capped.iterations());
    assertNotNull(capped.failure());
    assertTrue(capped.residual() > 1e-10);

    double[] badCost = mk.cost.clone();
    badCost[2] = Double.NaN;
    Arrays.fill(price, 5.0);
    SolveInfo bad = solver.solve(m, badCost, free, price);
    assertFalse(bad.converged());
    assertTrue(bad.failure().contains("product 2"), bad.failure());

    // a price so high the product's share underflows to zero
    Arrays.fill(price, 5.0);
    price[1] = 1e6;
    free[1] = false;
    double[] cost = mk.cost.clone();
    cost[1] = 1e6 - 1; // its owner's other products still see it: no NaN in their conditions
    SolveInfo held = solver.solve(m, cost, free, price);
    assertTrue(held.converged(), held.toString());
  }

  /**
   * MarketModel's shares (direct exponentials with an overflow fallback) equal ShareKernel's
   * log-sum-exp shares, for ordinary utilities and for utilities that overflow exp (800).
   */
  @Test
  void sharesMatchShareKernelIncludingOverflow() {
    for (double shift : new double[] {0.0, 800.0, -800.0}) {
      Markets.Rc mk = new Markets.Rc(41, 100, 7, 2, 3);
      double[] delta = mk.delta.clone();
      for (int p = 0; p < 7; p++) {
        delta[p] += shift;
      }
      MarketModel m = new MarketModel(100, 7);
      m.load(mk.psi, mk.kx, mk.nu, 100, mk.x, 7, delta, mk.firm);
      double[] price = {1, 2, 3, 1.5, 2.5, 0.5, 1};
      double[] s = new double[7];
      double[] probs = new double[700];
      double outside = m.shares(price, s, probs);
      double[] v = new double[700];
      m.shopperUtility(price, v);
      double[] ref = new double[7];
      double[] refProbs = new double[700];
      double refOutside = aislecast.core.demand.ShareKernel.shares(100, 7, delta, v, ref, refProbs);
      // at |u| ~ 800 both lose about 800 ulps to the shift itself
      double tol = shift == 0.0 ? 1e-14 : 1e-12;
      assertArrayEquals(ref, s, tol);
      assertArrayEquals(refProbs, probs, tol);
      assertEquals(refOutside, outside, tol);
    }
  }
}
