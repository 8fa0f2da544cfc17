package aislecast.core.demand;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;

class ShareKernelTest {
  private static final double H = 1e-5;

  /** |a - b| within rel * max(|a|, |b|) plus a floor for entries that are zero analytically. */
  private static void assertClose(double expected, double actual, double rel, double floor,
      String what) {
    double tol = rel * Math.max(Math.abs(expected), Math.abs(actual)) + floor;
    assertTrue(Math.abs(expected - actual) <= tol,
        what + ": expected " + expected + " got " + actual + " (tol " + tol + ")");
  }

  private static TestMarket heterogeneous(long seed, int r, int j) {
    return TestMarket.random(seed, r, j, 3, TestMarket.psi(3, 0.0, -0.5, -0.3, 0.2));
  }

  /** One shopper with zero draws: the plain logit with alpha = exp(a). */
  private static TestMarket plainLogit(double[] delta, double[] price, double a) {
    int j = delta.length;
    int kx = 2;
    double[] x = new double[j * kx];
    for (int p = 0; p < j; p++) {
      x[p * kx] = p;
      x[p * kx + 1] = -p * 0.5;
    }
    return TestMarket.of(1, j, kx, TestMarket.psi(kx, a, 0.0, 0.0, 0.3), new double[1 + kx], x,
        price, delta);
  }

  @Test
  void plainLogitSharesHaveTheClosedForm() {
    // Logit: s_j = exp(u_j) / (1 + sum_k exp(u_k)), s_0 = 1 / (1 + sum_k exp(u_k))
    // (Train, Discrete Choice Methods with Simulation, 2nd ed., eq. 3.6).
    double[] delta = {1.0, -0.5, 0.3, 2.0};
    double[] price = {1.5, 0.5, 2.5, 3.0};
    double a = Math.log(0.8);
    TestMarket m = plainLogit(delta, price, a);
    double den = 1.0;
    double[] num = new double[4];
    for (int p = 0; p < 4; p++) {
      num[p] = Math.exp(delta[p] - 0.8 * price[p]);
      den += num[p];
    }
    double[] s = new double[4];
    double s0 = ShareKernel.shares(1, 4, delta, m.v, s, null);
    FactoredShares f = new FactoredShares(1, 4);
    f.prepare(1, 4, m.v);
    double[] sf = new double[4];
    double s0f = f.shares(delta, sf, null);
    assertEquals(1.0 / den, s0, 1e-15);
    assertEquals(1.0 / den, s0f, 1e-15);
    for (int p = 0; p < 4; p++) {
      assertEquals(num[p] / den, s[p], 1e-15);
      assertEquals(num[p] / den, sf[p], 1e-15);
    }
  }

  @Test
  void plainLogitElasticitiesHaveTheClosedForm() {
    // Train, Discrete Choice Methods with Simulation, ch. 3.6: own elasticity -alpha p_j (1 - s_j),
    // cross elasticity alpha p_k s_k (for price coefficient -alpha).
    double[] delta = {0.5, 1.0, -0.2, 0.0, 0.7};
    double[] price = {2.0, 1.0, 3.5, 0.8, 1.2};
    double alpha = 1.3;
    TestMarket m = plainLogit(delta, price, Math.log(alpha));
    int j = 5;
    double[] s = new double[j];
    double[] probs = new double[j];
    ShareKernel.shares(1, j, delta, m.v, s, probs);
    double[] dsdp = new double[j * j];
    ShareKernel.jacobianPrice(1, j, probs, m.alpha, dsdp);
    double[] e = new double[j * j];
    ShareKernel.elasticities(j, dsdp, s, price, e);
    for (int a = 0; a < j; a++) {
      for (int b = 0; b < j; b++) {
        double expected = a == b ? -alpha * price[a] * (1 - s[a]) : alpha * price[b] * s[b];
        assertEquals(expected, e[a * j + b], 1e-13, "e[" + a + "][" + b + "]");
      }
    }
  }

  @Test
  void jacobianDeltaMatchesCentralDifferences() {
    TestMarket m = heterogeneous(1L, 200, 8);
    int r = m.r;
    int j = m.j;
    double[] s = new double[j];
    double[] probs = new double[r * j];
    ShareKernel.shares(r, j, m.delta, m.v, s, probs);
    double[] jac = new double[j * j];
    ShareKernel.jacobianDelta(r, j, probs, jac);
    double[] up = new double[j];
    double[] dn = new double[j];
    for (int k = 0; k < j; k++) {
      double[] d = m.delta.clone();
      d[k] = m.delta[k] + H;
      ShareKernel.shares(r, j, d, m.v, up, null);
      d[k] = m.delta[k] - H;
      ShareKernel.shares(r, j, d, m.v, dn, null);
      for (int a = 0; a < j; a++) {
        double fd = (up[a] - dn[a]) / (2 * H);
        assertClose(fd, jac[a * j + k], 1e-6, 1e-13, "ds" + a + "/ddelta" + k);
      }
    }
  }

  @Test
  void jacobianPriceAndElasticitiesMatchCentralDifferences() {
    TestMarket m = heterogeneous(2L, 200, 8);
    int r = m.r;
    int j = m.j;
    double[] s = new double[j];
    double[] probs = new double[r * j];
    ShareKernel.shares(r, j, m.delta, m.v, s, probs);
    double[] dsdp = new double[j * j];
    ShareKernel.jacobianPrice(r, j, probs, m.alpha, dsdp);
    double[] el = new double[j * j];
    ShareKernel.elasticities(j, dsdp, s, m.price, el);
    double[] up = new double[j];
    double[] dn = new double[j];
    for (int k = 0; k < j; k++) {
      double[] p = m.price.clone();
      p[k] = m.price[k] + H;
      ShareKernel.shares(r, j, m.delta, m.utilityAt(p), up, null);
      p[k] = m.price[k] - H;
      ShareKernel.shares(r, j, m.delta, m.utilityAt(p), dn, null);
      for (int a = 0; a < j; a++) {
        assertClose((up[a] - dn[a]) / (2 * H), dsdp[a * j + k], 1e-6, 1e-13, "ds" + a + "/dp" + k);
      }
      // elasticity = d log s_j / d log p_k: perturb log p_k
      p[k] = m.price[k] * Math.exp(H);
      ShareKernel.shares(r, j, m.delta, m.utilityAt(p), up, null);
      p[k] = m.price[k] * Math.exp(-H);
      ShareKernel.shares(r, j, m.delta, m.utilityAt(p), dn, null);
      for (int a = 0; a < j; a++) {
        double fd = (Math.log(up[a]) - Math.log(dn[a])) / (2 * H);
        assertClose(fd, el[a * j + k], 1e-6, 1e-12, "e" + a + "," + k);
      }
    }
  }

  @Test
  void diversionMatchesCentralDifferencesIncludingTheOutsideOption() {
    TestMarket m = heterogeneous(3L, 200, 6);
    int r = m.r;
    int j = m.j;
    double[] s = new double[j];
    double[] probs = new double[r * j];
    ShareKernel.shares(r, j, m.delta, m.v, s, probs);
    double[] dsdp = new double[j * j];
    ShareKernel.jacobianPrice(r, j, probs, m.alpha, dsdp);
    double[] div = new double[j * (j + 1)];
    ShareKernel.diversion(j, dsdp, div);
    double[] up = new double[j];
    double[] dn = new double[j];
    for (int a = 0; a < j; a++) {
      double[] p = m.price.clone();
      p[a] = m.price[a] + H;
      double s0up = ShareKernel.shares(r, j, m.delta, m.utilityAt(p), up, null);
      p[a] = m.price[a] - H;
      double s0dn = ShareKernel.shares(r, j, m.delta, m.utilityAt(p), dn, null);
      double own = up[a] - dn[a];
      double rowSum = 0.0;
      for (int b = 0; b <= j; b++) {
        double analytic = div[a * (j + 1) + b];
        rowSum += analytic;
        if (b == a) {
          assertEquals(0.0, analytic, 0.0);
          continue;
        }
        // outside option: its share is what the kernel returns, differenced the same way
        double fd = b == j ? -(s0up - s0dn) / own : -(up[b] - dn[b]) / own;
        assertClose(fd, analytic, 1e-6, 1e-12, "diversion " + a + "->" + b);
        assertTrue(analytic > 0.0, "substitutes: diversion is positive");
      }
      assertEquals(1.0, rowSum, 1e-12, "row " + a + " sums to one");
    }
  }

  @Test
  void directAndFactoredAgreeOnOrdinaryMarkets() {
    for (long seed = 10; seed < 15; seed++) {
      TestMarket m = heterogeneous(seed, 200, 30);
      compareDirectAndFactored(m.r, m.j, m.delta, m.v, "seed " + seed);
    }
  }

  @Test
  void factoredSharesAreRelativelyAccurateOnOrdinaryMarkets() {
    TestMarket m = heterogeneous(16L, 200, 30);
    double[] sd = new double[m.j];
    double[] sf = new double[m.j];
    double s0d = ShareKernel.shares(m.r, m.j, m.delta, m.v, sd, null);
    FactoredShares f = new FactoredShares(m.r, m.j);
    f.prepare(m.r, m.j, m.v);
    double s0f = f.shares(m.delta, sf, null);
    assertClose(s0d, s0f, 1e-12, 0.0, "outside");
    for (int p = 0; p < m.j; p++) {
      assertClose(sd[p], sf[p], 1e-12, 0.0, "share " + p);
    }
  }

  @Test
  void oneFactoredInstanceServesMarketsOfDifferentSizes() {
    FactoredShares f = new FactoredShares(200, 30);
    int[][] sizes = {{200, 30}, {7, 3}, {50, 11}, {1, 1}, {200, 30}};
    for (int c = 0; c < sizes.length; c++) {
      TestMarket m = heterogeneous(40L + c, sizes[c][0], sizes[c][1]);
      double[] sd = new double[m.j];
      double[] sf = new double[m.j];
      double s0d = ShareKernel.shares(m.r, m.j, m.delta, m.v, sd, null);
      f.prepare(m.r, m.j, m.v);
      double s0f = f.shares(m.delta, sf, null);
      assertClose(s0d, s0f, 1e-12, 0.0, "outside, size case " + c);
      for (int p = 0; p < m.j; p++) {
        assertClose(sd[p], sf[p], 1e-12, 0.0, "share " + p + ", size case " + c);
      }
    }
  }

  @Test
  void factoredFallsBackWhenEveryFactoredTermUnderflows() {
    // delta = (600, -600), v = (-1000, 200): both utilities are -400, but the factored terms are
    // exp(-1200) each (the best delta and the best v belong to different products).
    double[] delta = {600.0, -600.0};
    double[] v = {-1000.0, 200.0};
    double[] sd = new double[2];
    double[] sf = new double[2];
    double[] pf = new double[2];
    double s0d = ShareKernel.shares(1, 2, delta, v, sd, null);
    FactoredShares f = new FactoredShares(1, 2);
    f.prepare(1, 2, v);
    double s0f = f.shares(delta, sf, pf);
    // closed form: s_j = exp(-400) / (1 + 2 exp(-400))
    double expected = Math.exp(-400.0) / (1.0 + 2.0 * Math.exp(-400.0));
    assertClose(expected, sd[0], 1e-13, 0.0, "direct");
    assertClose(expected, sf[0], 1e-13, 0.0, "factored");
    assertClose(expected, sf[1], 1e-13, 0.0, "factored");
    assertClose(expected, pf[1], 1e-13, 0.0, "factored probability");
    assertEquals(s0d, s0f, 1e-15);

    // the same shopper among ordinary ones, inside the four-shopper blocks and in the remainder
    int r = 9;
    double[] vMany = new double[r * 2];
    for (int i = 0; i < r; i++) {
      boolean odd = i == 2 || i == 8;
      vMany[i * 2] = odd ? -1000.0 : -600.0 + 0.1 * i;
      vMany[i * 2 + 1] = odd ? 200.0 : 599.0 - 0.2 * i;
    }
    double[] sdMany = new double[2];
    double[] sfMany = new double[2];
    double[] pdMany = new double[r * 2];
    double[] pfMany = new double[r * 2];
    double s0dMany = ShareKernel.shares(r, 2, delta, vMany, sdMany, pdMany);
    FactoredShares fMany = new FactoredShares(r, 2);
    fMany.prepare(r, 2, vMany);
    double s0fMany = fMany.shares(delta, sfMany, pfMany);
    assertClose(s0dMany, s0fMany, 1e-13, 0.0, "outside, mixed shoppers");
    for (int p = 0; p < 2; p++) {
      assertClose(sdMany[p], sfMany[p], 1e-12, 0.0, "share " + p + ", mixed shoppers");
    }
    for (int q = 0; q < r * 2; q++) {
      assertClose(pdMany[q], pfMany[q], 1e-12, 0.0, "probability " + q + ", mixed shoppers");
    }
  }

  @Test
  void directAndFactoredAgreeAtExtremeUtilities() {
    int r = 50;
    int j = 10;
    // alpha_r = exp(0.5 + 0.6 nu): about 0.3 to 9; prices up to 300 make v_rj as low as -2700.
    TestMarket m = TestMarket.random(20L, r, j, 2, TestMarket.psi(2, 0.5, Math.log(0.6), 1.0, 0.5));
    double[][] deltas = new double[5][j];
    for (int p = 0; p < j; p++) {
      deltas[0][p] = 600.0;
      deltas[1][p] = -600.0;
      deltas[2][p] = p % 2 == 0 ? 600.0 : -600.0;
      deltas[3][p] = -600.0 + 120.0 * p;
      deltas[4][p] = m.delta[p];
    }
    double[][] prices = new double[3][j];
    for (int p = 0; p < j; p++) {
      prices[0][p] = m.price[p];
      prices[1][p] = 100.0 + 20.0 * p;
      prices[2][p] = p % 3 == 0 ? 1.0 : 150.0;
    }
    for (int di = 0; di < deltas.length; di++) {
      for (int pi = 0; pi < prices.length; pi++) {
        compareDirectAndFactored(r, j, deltas[di], m.utilityAt(prices[pi]),
            "delta case " + di + ", price case " + pi);
      }
    }
  }

  private static void compareDirectAndFactored(int r, int j, double[] delta, double[] v,
      String label) {
    double[] sd = new double[j];
    double[] pd = new double[r * j];
    double s0d = ShareKernel.shares(r, j, delta, v, sd, pd);
    FactoredShares f = new FactoredShares(r, j);
    f.prepare(r, j, v);
    double[] sf = new double[j];
    double[] pf = new double[r * j];
    double s0f = f.shares(delta, sf, pf);
    double[] sfNoProbs = new double[j];
    double s0fNoProbs = f.shares(delta, sfNoProbs, null);
    assertTrue(Double.isFinite(s0d) && Double.isFinite(s0f), label + ": outside " + s0d + " " + s0f);
    double sumD = s0d;
    double sumF = s0f;
    for (int p = 0; p < j; p++) {
      assertTrue(Double.isFinite(sd[p]) && Double.isFinite(sf[p]), label);
      assertEquals(sd[p], sf[p], 1e-12, label + ": share " + p);
      assertEquals(sf[p], sfNoProbs[p], 0.0, label + ": with and without probabilities");
      sumD += sd[p];
      sumF += sf[p];
    }
    assertEquals(s0d, s0f, 1e-12, label + ": outside share");
    assertEquals(s0f, s0fNoProbs, 0.0, label);
    assertEquals(1.0, sumD, 1e-12, label + ": direct shares plus outside");
    assertEquals(1.0, sumF, 1e-12, label + ": factored shares plus outside");
    for (int q = 0; q < r * j; q++) {
      assertTrue(Double.isFinite(pf[q]), label);
      assertEquals(pd[q], pf[q], 1e-12, label + ": shopper probability " + q);
    }
  }
}
