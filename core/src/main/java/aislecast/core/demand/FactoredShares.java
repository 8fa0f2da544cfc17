package aislecast.core.demand;

/**
 * Fast shares for a market whose shopper parts {@code v_rj} stay fixed while the mean utilities
 * {@code delta} move (week-level updates, share inversion).
 *
 * <p>{@link #prepare} stores {@code A_rj = exp(v_rj - c_r)} with {@code c_r = max_j v_rj}; then
 * {@code exp(delta_j + v_rj) = E_j A_rj exp(c_r + d)} with {@code E_j = exp(delta_j - d)},
 * {@code d = max_j delta_j}, so {@link #shares} needs J + R calls to {@code exp} instead of R J,
 * and every stored factor lies in (0, 1], which keeps it stable at extreme utilities.
 *
 * <p>One instance per thread: it owns its buffers (sized once for the largest market).
 */
public final class FactoredShares {
  private final double[] a;
  private final double[] shift;
  private final double[] e;
  private int r;
  private int j;

  public FactoredShares(int maxShoppers, int maxProducts) {
    this.a = new double[maxShoppers * maxProducts];
    this.shift = new double[maxShoppers];
    this.e = new double[maxProducts];
  }

  /**
   * Stores the exponentiated shopper parts of one market.
   *
   * @param v R x J shopper utility parts, not modified
   */
  public void prepare(int shoppers, int products, double[] v) {
    this.r = shoppers;
    this.j = products;
    for (int i = 0; i < shoppers; i++) {
      int row = i * products;
      double c = Double.NEGATIVE_INFINITY;
      for (int p = 0; p < products; p++) {
        c = Math.max(c, v[row + p]);
      }
      shift[i] = c;
      for (int p = 0; p < products; p++) {
        a[row + p] = Math.exp(v[row + p] - c);
      }
    }
  }

  public int shoppers() {
    return r;
  }

  public int products() {
    return j;
  }

  /**
   * Shares at mean utilities {@code delta}.
   *
   * @param delta length J, not modified
   * @param sharesOut length J, modified
   * @param probsOut R x J shopper probabilities, modified; may be null
   * @return the outside share
   */
  public double shares(double[] delta, double[] sharesOut, double[] probsOut) {
    final int jj = j;
    double d = Double.NEGATIVE_INFINITY;
    for (int p = 0; p < jj; p++) {
      d = Math.max(d, delta[p]);
    }
    for (int p = 0; p < jj; p++) {
      e[p] = Math.exp(delta[p] - d);
      sharesOut[p] = 0.0;
    }
    double outside = 0.0;
    for (int i = 0; i < r; i++) {
      int row = i * jj;
      double s = 0.0;
      for (int p = 0; p < jj; p++) {
        s += e[p] * a[row + p];
      }
      // outside option: exp(0) relative to the common scale exp(c_r + d)
      double o = Math.exp(-(shift[i] + d));
      double inv = 1.0 / (s + o);
      if (probsOut == null) {
        for (int p = 0; p < jj; p++) {
          sharesOut[p] += e[p] * a[row + p] * inv;
        }
      } else {
        for (int p = 0; p < jj; p++) {
          double prob = e[p] * a[row + p] * inv;
          probsOut[row + p] = prob;
          sharesOut[p] += prob;
        }
      }
      outside += o * inv;
    }
    double invR = 1.0 / r;
    for (int p = 0; p < jj; p++) {
      sharesOut[p] *= invR;
    }
    return outside * invR;
  }
}
