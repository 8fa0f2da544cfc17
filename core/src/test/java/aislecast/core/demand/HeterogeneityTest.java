package aislecast.core.demand;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import org.junit.jupiter.api.Test;

class HeterogeneityTest {

  @Test
  void psiLayoutFollowsTheDesign() {
    // DESIGN section 4: a, log sigma, log L11..log LKK, then L21, L31, L32, ... row by row.
    assertEquals(3, Heterogeneity.dim(1));
    assertEquals(5, Heterogeneity.dim(2));
    assertEquals(8, Heterogeneity.dim(3));
    assertEquals(5, Heterogeneity.offDiagonalIndex(3, 1, 0));
    assertEquals(6, Heterogeneity.offDiagonalIndex(3, 2, 0));
    assertEquals(7, Heterogeneity.offDiagonalIndex(3, 2, 1));
    assertThrows(IllegalArgumentException.class, () -> Heterogeneity.offDiagonalIndex(3, 1, 1));
    assertThrows(IllegalArgumentException.class, () -> Heterogeneity.offDiagonalIndex(3, 0, 1));
    assertThrows(IllegalArgumentException.class, () -> Heterogeneity.offDiagonalIndex(3, 3, 0));

    double[] psi = {0.1, 0.2, Math.log(2.0), Math.log(3.0), Math.log(4.0), 0.5, 0.6, 0.7};
    double[] l = new double[9];
    Heterogeneity.factor(psi, 3, l);
    assertArrayEquals(new double[] {2, 0, 0, 0.5, 3, 0, 0.6, 0.7, 4}, l, 1e-15);
  }

  @Test
  void tastesAndUtilityAreTheModelWrittenOut() {
    // v_rj = -alpha_r p_j + x_j' L nu_r[1..3], alpha_r = exp(a + sigma nu_r0) (DESIGN section 4)
    double[] psi = {0.3, Math.log(0.5), Math.log(1.2), Math.log(0.7), Math.log(0.9), -0.4, 0.2,
        0.8};
    TestMarket m = TestMarket.random(9L, 20, 6, 3, psi);
    double[][] l = {{1.2, 0, 0}, {-0.4, 0.7, 0}, {0.2, 0.8, 0.9}};
    for (int i = 0; i < m.r; i++) {
      double[] nu = {m.nu[i * 4], m.nu[i * 4 + 1], m.nu[i * 4 + 2], m.nu[i * 4 + 3]};
      double alpha = Math.exp(0.3 + 0.5 * nu[0]);
      assertEquals(alpha, m.alpha[i], 1e-13 * alpha);
      for (int p = 0; p < m.j; p++) {
        double taste = 0.0;
        for (int k = 0; k < 3; k++) {
          double beta = 0.0;
          for (int c = 0; c < 3; c++) {
            beta += l[k][c] * nu[1 + c];
          }
          taste += m.x[p * 3 + k] * beta;
        }
        assertEquals(taste, m.mu[i * m.j + p], 1e-12);
        assertEquals(taste - alpha * m.price[p], m.v[i * m.j + p], 1e-12);
      }
    }
  }
}
