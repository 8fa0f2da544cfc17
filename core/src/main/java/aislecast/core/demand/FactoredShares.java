package aislecast.core.demand;

/**
 * Fast shares for a market whose shopper parts {@code v_rj} stay fixed while the mean utilities
 * {@code delta} move (week-level updates, share inversion).
 *
 * <p>{@link #prepare} stores {@code A_rj = exp(v_rj - c_r)} with {@code c_r = max_j v_rj}; then
 * {@code exp(delta_j + v_rj) = E_j A_rj exp(c_r + d)} with {@code E_j = exp(delta_j - d)},
 * {@code d = max_j delta_j}, so {@link #shares} needs J + R calls to {@code exp} instead of R J,
 * and every stored factor lies in [0, 1], which keeps it stable at extreme utilities; a shopper
 * whose factored terms all underflow is recomputed by log-sum-exp from a copy of {@code v}.
 *
 * <p>One instance per thread: it owns its buffers (sized once for the largest market).
 */
public final class FactoredShares {
  private final double[] a;
  private final double[] v;
  private final double[] shift;
  private final double[] e;
  private int r;
  private int j;

  public FactoredShares(int maxShoppers, int maxProducts) {
    this.a = new double[maxShoppers * maxProducts];
    this.v = new double[maxShoppers * maxProducts];
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
    // kept for the rare shopper whose factored terms all underflow
    System.arraycopy(v, 0, this.v, 0, shoppers * products);
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
      double s = dot(e, a, row, jj);
      // Common scale exp(t): the outside option is exp(-t) relative to it. For t < 0 that would
      // overflow, so rescale by g = exp(t) <= 1 instead; both branches keep every factor <= 1.
      double t = shift[i] + d;
      double scale;
      double out;
      if (t >= 0.0) {
        double o = Math.exp(-t);
        double den = s + o;
        if (!(den >= MIN_DENOMINATOR)) {
          // every term underflowed (utility ranges beyond ~700 within one shopper)
          outside += directRow(i, delta, sharesOut, probsOut);
          continue;
        }
        scale = 1.0 / den;
        out = o * scale;
      } else {
        double g = Math.exp(t);
        double inv = 1.0 / (s * g + 1.0);
        scale = g * inv;
        out = inv;
      }
      if (probsOut == null) {
        for (int p = 0; p < jj; p++) {
          sharesOut[p] += e[p] * a[row + p] * scale;
        }
      } else {
        for (int p = 0; p < jj; p++) {
          double prob = e[p] * a[row + p] * scale;
          probsOut[row + p] = prob;
          sharesOut[p] += prob;
        }
      }
      outside += out;
    }
    double invR = 1.0 / r;
    for (int p = 0; p < jj; p++) {
      sharesOut[p] *= invR;
    }
    return outside * invR;
  }

  /** Below this the factored denominator has lost its leading digits to underflow. */
  private static final double MIN_DENOMINATOR = 0x1p-900;

  /** sum_p e_p a_(row+p), four partial sums so the adds pipeline. */
  private static double dot(double[] e, double[] a, int row, int n) {
    double s0 = 0.0;
    double s1 = 0.0;
    double s2 = 0.0;
    double s3 = 0.0;
    int p = 0;
    for (; p + 3 < n; p += 4) {
      s0 += e[p] * a[row + p];
      s1 += e[p + 1] * a[row + p + 1];
      s2 += e[p + 2] * a[row + p + 2];
      s3 += e[p + 3] * a[row + p + 3];
    }
    for (; p < n; p++) {
      s0 += e[p] * a[row + p];
    }
    return (s0 + s1) + (s2 + s3);
  }

  /**
   * Shopper i by log-sum-exp from the stored utility parts; adds its probabilities to
   * {@code sharesOut} (not yet divided by R) and returns its outside probability.
   */
  private double directRow(int i, double[] delta, double[] sharesOut, double[] probsOut) {
    int row = i * j;
    double m = 0.0;
    for (int p = 0; p < j; p++) {
      m = Math.max(m, delta[p] + v[row + p]);
    }
    double e0 = Math.exp(-m);
    double den = e0;
    for (int p = 0; p < j; p++) {
      den += Math.exp(delta[p] + v[row + p] - m);
    }
    double inv = 1.0 / den;
    for (int p = 0; p < j; p++) {
      double prob = Math.exp(delta[p] + v[row + p] - m) * inv;
      sharesOut[p] += prob;
      if (probsOut != null) {
        probsOut[row + p] = prob;
      }
    }
    return e0 * inv;
  }
}
