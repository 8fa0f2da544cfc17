package aislecast.core.demand;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Arrays;
import org.junit.jupiter.api.Test;

class ShareInversionTest {

  @Test
  void plainLogitInversionIsBerrysClosedForm() {
    // Without heterogeneity the inversion has the closed form delta_j = ln s_j - ln s_0
    // (Berry 1994, "Estimating discrete-choice models of product differentiation", eq. 6).
    double[] target = {0.12, 0.05, 0.30, 0.08, 0.015};
    double s0 = 1.0;
    for (double t : target) {
      s0 -= t;
    }
    int j = target.length;
    double[] v = new double[j]; // one shopper, zero draws, no price part
    double[] delta = new double[j];
    ShareInversion inv = new ShareInversion(1, j);
    ShareInversion.Result res = inv.invert(1, j, v, target, delta, 1e-13, 100);
    assertTrue(res.converged(), res.toString());
    assertTrue(res.iterations() >= 1 && res.iterations() <= 10, "Newton: few steps, " + res);
    assertTrue(res.maxAbsLogResidual() <= 1e-13);
    for (int p = 0; p < j; p++) {
      assertEquals(Math.log(target[p]) - Math.log(s0), delta[p], 1e-12, "delta " + p);
    }
  }

  @Test
  void vanishingHeterogeneityGivesTheLogitInversionShiftedByPrice() {
    // sigma = L = e^-30: every shopper has alpha = e^a, tastes ~ 0, so v_rj = -e^a p_j and
    // delta_j = ln s_j - ln s_0 + e^a p_j (Berry 1994, with the price term moved into v).
    int r = 200;
    int j = 12;
    double a = Math.log(0.7);
    TestMarket m = TestMarket.random(5L, r, j, 3, TestMarket.psi(3, a, -30.0, -30.0, 0.0));
    double[] target = new double[j];
    double s0 = 1.0;
    for (int p = 0; p < j; p++) {
      target[p] = 0.01 + 0.005 * p;
      s0 -= target[p];
    }
    double[] delta = new double[j];
    ShareInversion inv = new ShareInversion(r, j);
    ShareInversion.Result res = inv.invert(r, j, m.v, target, delta, 1e-12, 100);
    assertTrue(res.converged(), res.toString());
    assertTrue(res.iterations() <= 10, res.toString());
    for (int p = 0; p < j; p++) {
      double expected = Math.log(target[p]) - Math.log(s0) + 0.7 * m.price[p];
      assertEquals(expected, delta[p], 1e-9, "delta " + p);
    }
  }

  @Test
  void heterogeneousInversionReproducesTargetSharesFromBadStarts() {
    int r = 200;
    int j = 30;
    TestMarket m = TestMarket.random(6L, r, 30, 3, TestMarket.psi(3, 0.0, -0.2, 0.0, 0.3));
    double[] target = new double[j];
    ShareKernel.shares(r, j, m.delta, m.v, target, null);
    ShareInversion inv = new ShareInversion(r, j);
    for (double start : new double[] {-12.0, 0.0, 8.0}) {
      double[] delta = new double[j];
      Arrays.fill(delta, start);
      ShareInversion.Result res = inv.invert(r, j, m.v, target, delta, 1e-13, 200);
      assertTrue(res.converged(), "start " + start + ": " + res);
      assertTrue(res.iterations() > 0 && res.iterations() <= 200, res.toString());
      assertTrue(res.maxAbsLogResidual() <= 1e-13, res.toString());
      // shares(invert(target)) == target, through the independent direct path
      double[] back = new double[j];
      ShareKernel.shares(r, j, delta, m.v, back, null);
      for (int p = 0; p < j; p++) {
        assertEquals(target[p], back[p], 1e-10 * target[p], "start " + start + ", share " + p);
        // the inverse is unique (Berry 1994), so the mean utilities come back too
        assertEquals(m.delta[p], delta[p], 1e-8, "start " + start + ", delta " + p);
      }
    }
  }

  @Test
  void startingAtTheSolutionTakesNoStep() {
    TestMarket m = TestMarket.random(7L, 50, 5, 2, TestMarket.psi(2, 0.0, -0.5, 0.0, 0.1));
    double[] target = new double[5];
    ShareKernel.shares(50, 5, m.delta, m.v, target, null);
    double[] delta = m.delta.clone();
    ShareInversion.Result res = new ShareInversion(50, 5).invert(50, 5, m.v, target, delta, 1e-10,
        50);
    assertTrue(res.converged());
    assertEquals(0, res.iterations());
  }

  @Test
  void anUnfinishedInversionSaysSo() {
    TestMarket m = TestMarket.random(8L, 100, 10, 2, TestMarket.psi(2, 0.0, -0.5, 0.0, 0.1));
    double[] target = new double[10];
    ShareKernel.shares(100, 10, m.delta, m.v, target, null);
    double[] delta = new double[10];
    Arrays.fill(delta, 10.0);
    ShareInversion.Result res =
        new ShareInversion(100, 10).invert(100, 10, m.v, target, delta, 1e-13, 1);
    assertFalse(res.converged());
    assertEquals(1, res.iterations());
    assertTrue(res.maxAbsLogResidual() > 1e-13 && Double.isFinite(res.maxAbsLogResidual()));
  }

  @Test
  void rejectsMarketsLargerThanItsBuffers() {
    ShareInversion inv = new ShareInversion(10, 3);
    assertThrows(IllegalArgumentException.class,
        () -> inv.invert(10, 4, new double[40], new double[] {0.1, 0.1, 0.1, 0.1}, new double[4],
            1e-10, 10));
  }
}
