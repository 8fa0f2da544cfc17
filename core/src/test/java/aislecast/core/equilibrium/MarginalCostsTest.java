package aislecast.core.equilibrium;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import aislecast.core.demand.ShareKernel;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.ArrayRealVector;
import org.apache.commons.math3.linear.LUDecomposition;
import org.apache.commons.math3.linear.RealVector;
import org.junit.jupiter.api.Test;

class MarginalCostsTest {

  /**
   * Plain logit: the first-order conditions give {@code mc_j = p_j - 1 / (alpha (1 - S_f))} with
   * {@code S_f} the share of j's owner (Anderson, de Palma and Thisse 1992; from memory), at any
   * prices, equilibrium or not.
   */
  @Test
  void logitCostsMatchClosedForm() {
    double alpha = 1.1;
    double[] delta = {0.5, 0.0, -0.4, 0.3, 0.9, -1.0};
    int[] firm = {0, 0, 1, 1, 1, 2};
    double[] price = {2.0, 2.5, 1.8, 2.2, 3.0, 1.5};
    MarketModel m = Markets.logit(alpha, delta, firm);
    double[] cost = new double[6];
    MarginalCosts.Info info = new MarginalCosts(1, 6).recover(m, price, cost, null);
    assertTrue(info.solved(), info.toString());
    double[] s = new double[6];
    m.shares(price, s, null);
    double[] firmShare = new double[3];
    for (int p = 0; p < 6; p++) {
      firmShare[firm[p]] += s[p];
    }
    for (int p = 0; p < 6; p++) {
      assertEquals(price[p] - 1.0 / (alpha * (1 - firmShare[firm[p]])), cost[p], 1e-12, "product " + p);
    }
  }

  /**
   * Random coefficients: the same system {@code Omega (p - c) = s}, with Omega built from
   * ShareKernel's price Jacobian and solved by commons-math3's LU decomposition (an independent
   * library), gives the same costs.
   */
  @Test
  void costsAgreeWithCommonsMathSolve() {
    Markets.Rc mk = new Markets.Rc(31, 200, 12, 3, 3);
    MarketModel m = mk.model();
    double[] price = new double[12];
    for (int p = 0; p < 12; p++) {
      price[p] = 2.0 + 0.1 * p;
    }
    double[] cost = new double[12];
    boolean[] flags = new boolean[12];
    MarginalCosts.Info info = new MarginalCosts(200, 12).recover(m, price, cost, flags);
    assertTrue(info.solved(), info.toString());

    double[] s = new double[12];
    double[] v = new double[200 * 12];
    double[] probs = new double[200 * 12];
    double[] delta = new double[12];
    m.delta(delta);
    m.shopperUtility(price, v);
    ShareKernel.shares(200, 12, delta, v, s, probs);
    double[] dsdp = new double[144];
    ShareKernel.jacobianPrice(200, 12, probs, m.alpha(), dsdp);
    double[][] omega = new double[12][12];
    for (int a = 0; a < 12; a++) {
      for (int b = 0; b < 12; b++) {
        omega[a][b] = m.firm(a) == m.firm(b) ? -dsdp[b * 12 + a] : 0.0; // -ds_b/dp_a
      }
    }
    RealVector markup = new LUDecomposition(new Array2DRowRealMatrix(omega))
        .getSolver().solve(new ArrayRealVector(s));
    int nonPositive = 0;
    for (int p = 0; p < 12; p++) {
      double expected = price[p] - markup.getEntry(p);
      assertEquals(expected, cost[p], 1e-10 * Math.max(1, Math.abs(expected)), "product " + p);
      assertEquals(expected <= 0, flags[p]);
      nonPositive += expected <= 0 ? 1 : 0;
    }
    assertEquals(nonPositive, info.nonPositive());
  }

  /** Prices below the logit markup imply negative costs: flagged and counted, not clipped. */
  @Test
  void nonPositiveCostsAreFlaggedNotClipped() {
    double alpha = 1.0;
    double[] delta = {0.0, 0.0};
    int[] firm = {0, 1};
    double[] price = {0.5, 3.0};
    MarketModel m = Markets.logit(alpha, delta, firm);
    double[] cost = new double[2];
    boolean[] flags = new boolean[2];
    MarginalCosts.Info info = new MarginalCosts(1, 2).recover(m, price, cost, flags);
    assertTrue(info.solved());
    assertEquals(1, info.nonPositive());
    assertTrue(flags[0]);
    assertFalse(flags[1]);
    double[] s = new double[2];
    m.shares(price, s, null);
    assertEquals(0.5 - 1.0 / (1 - s[0]), cost[0], 1e-12); // negative, reported as is
    assertTrue(cost[0] < 0);
  }

  /** A product whose share underflows makes Omega singular: reported, costs NaN, no exception. */
  @Test
  void singularSystemIsReported() {
    MarketModel m = Markets.logit(1.0, new double[] {0.0, 0.0}, new int[] {0, 1});
    double[] cost = new double[2];
    MarginalCosts.Info info = new MarginalCosts(1, 2).recover(m, new double[] {1.0, 2000.0}, cost, null);
    assertFalse(info.solved());
    assertTrue(Double.isNaN(cost[0]) && Double.isNaN(cost[1]));
    assertTrue(info.failure() != null && !info.failure().isEmpty());
  }
}
