package aislecast.core.demand;

/**
 * Shopper-specific part of utility for one store, from its heterogeneity vector {@code psi}.
 *
 * <p>Layout of {@code psi} (DESIGN section 4): {@code a, log sigma, log L11 .. log LKK, then the
 * strictly lower off-diagonal of L row by row (L21, L31, L32, ...)}. Shopper r has price
 * sensitivity {@code alpha_r = exp(a + sigma nu_r0)} and tastes {@code beta_r = L nu_r[1..Kx]}, so
 * its utility part for product j is {@code v_rj = -alpha_r p_j + x_j' beta_r}.
 *
 * <p>All arrays are flat and row-major: {@code nu} is R x (1 + Kx), {@code x} is J x Kx, outputs
 * are R x J. Nothing is allocated except a Kx-long scratch vector per call.
 */
public final class Heterogeneity {
  private Heterogeneity() {}

  /** Number of components of {@code psi} for {@code kx} attributes. */
  public static int dim(int kx) {
    return 2 + kx + kx * (kx - 1) / 2;
  }

  /** Index in {@code psi} of the strictly-lower element L[row][col] (row > col). */
  public static int offDiagonalIndex(int kx, int row, int col) {
    if (row <= col || row >= kx) {
      throw new IllegalArgumentException("not a strictly lower element: " + row + "," + col);
    }
    return 2 + kx + row * (row - 1) / 2 + col;
  }

  /**
   * Fills the Cholesky-like factor L (Kx x Kx, row-major, upper part zero) from {@code psi}.
   *
   * @param psi not modified
   * @param lOut modified, length Kx*Kx
   */
  public static void factor(double[] psi, int kx, double[] lOut) {
    java.util.Arrays.fill(lOut, 0, kx * kx, 0.0);
    int p = 2 + kx;
    for (int k = 0; k < kx; k++) {
      lOut[k * kx + k] = Math.exp(psi[2 + k]);
    }
    for (int row = 1; row < kx; row++) {
      for (int col = 0; col < row; col++) {
        lOut[row * kx + col] = psi[p++];
      }
    }
  }

  /**
   * Per-shopper price sensitivities and the attribute part of utility.
   *
   * @param psi heterogeneity of the store, not modified
   * @param kx number of attributes
   * @param nu shopper draws R x (1 + Kx), not modified
   * @param r number of shoppers
   * @param x attributes J x Kx (standardised), not modified
   * @param j number of products
   * @param alphaOut modified: alpha_r, length R
   * @param muOut modified: x_j' L nu_r, R x J
   */
  public static void shopperTastes(
      double[] psi, int kx, double[] nu, int r, double[] x, int j, double[] alphaOut,
      double[] muOut) {
    double a = psi[0];
    double sigma = Math.exp(psi[1]);
    double[] l = new double[Math.max(1, kx * kx)];
    double[] beta = new double[Math.max(1, kx)];
    factor(psi, kx, l);
    int stride = 1 + kx;
    for (int i = 0; i < r; i++) {
      int base = i * stride;
      alphaOut[i] = Math.exp(a + sigma * nu[base]);
      for (int k = 0; k < kx; k++) {
        double b = 0.0;
        for (int m = 0; m <= k; m++) {
          b += l[k * kx + m] * nu[base + 1 + m];
        }
        beta[k] = b;
      }
      int row = i * j;
      for (int p = 0; p < j; p++) {
        double u = 0.0;
        for (int k = 0; k < kx; k++) {
          u += x[p * kx + k] * beta[k];
        }
        muOut[row + p] = u;
      }
    }
  }

  /**
   * Shopper utility parts {@code v_rj = mu_rj - alpha_r p_j}.
   *
   * @param alpha length R, not modified
   * @param mu R x J, not modified
   * @param price length J, not modified
   * @param vOut R x J, modified (may alias {@code mu})
   */
  public static void shopperUtility(
      int r, int j, double[] alpha, double[] mu, double[] price, double[] vOut) {
    for (int i = 0; i < r; i++) {
      double ai = alpha[i];
      int row = i * j;
      for (int p = 0; p < j; p++) {
        vOut[row + p] = mu[row + p] - ai * price[p];
      }
    }
  }
}
