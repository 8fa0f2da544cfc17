package aislecast.core.demand;

/**
 * Fast shares for a market whose shopper parts {@code v_rj} stay fixed while the mean utilities
 * {@code delta} move (week-level updates, share inversion).
 *
 * <p>{@link #prepare} stores {@code A_rj = exp(v_rj - c_r)} with {@code c_r = max_j v_rj}; then
 * {@code exp(delta_j + v_rj) = E_j A_rj exp(c_r + d)} with {@code E_j = exp(delta_j - d)},
 * {@code d = max_j delta_j}, so {@link #shares} needs J + 1 calls to {@code exp} instead of R J
 * (the outside term {@code exp(-(c_r + d))} is {@code exp(-c_r)}, kept by prepare, times
 * {@code exp(-d)}). Every stored factor lies in [0, 1], which keeps it stable at extreme
 * utilities: when the outside term leaves [2^-900, 2^1000] it is recomputed directly, with the
 * scale flipped when it would overflow, and a shopper whose factored terms all underflow is
 * recomputed by log-sum-exp from a copy of {@code v}.
 *
 * <p>Since {@code s_j = E_j (1/R) sum_r A_rj / den_r}, the share loop only accumulates
 * {@code A_rj / den_r}; it takes four shoppers at a time so that each product's accumulator is
 * loaded and stored once per four shoppers and the four denominators are independent sums.
 *
 * <p>One instance per thread: it owns its buffers (sized once for the largest market).
 */
public final class FactoredShares {
  /** The fast outside term is trusted in this range; outside it, exact per-shopper exp. */
  private static final double FAST_MIN = 0x1p-900;
  private static final double FAST_MAX = 0x1p1000;
  /** Below this the factored denominator has lost its leading digits to underflow. */
  private static final double MIN_DENOMINATOR = 0x1p-900;

  private final double[] a;
  private final double[] v;
  private final double[] shift;
  private final double[] expNegShift;
  private final double[] e;
  private final double[] acc;
  private final double[] extra;
  private final double[] rowOutside;
  private boolean anyDirect;
  private int r;
  private int j;

  public FactoredShares(int maxShoppers, int maxProducts) {
    this.a = new double[maxShoppers * maxProducts];
    this.v = new double[maxShoppers * maxProducts];
    this.shift = new double[maxShoppers];
    this.expNegShift = new double[maxShoppers];
    this.rowOutside = new double[maxShoppers];
    this.e = new double[maxProducts];
    this.acc = new double[maxProducts];
    this.extra = new double[maxProducts];
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
      expNegShift[i] = Math.exp(-c);
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
    final double[] a = this.a;
    final double[] e = this.e;
    final double[] acc = this.acc;
    double d = Double.NEGATIVE_INFINITY;
    for (int p = 0; p < jj; p++) {
      d = Math.max(d, delta[p]);
    }
    for (int p = 0; p < jj; p++) {
      e[p] = Math.exp(delta[p] - d);
      acc[p] = 0.0;
    }
    final double expNegD = Math.exp(-d);
    anyDirect = false;
    int i = 0;
    for (; i + 3 < r; i += 4) {
      int r0 = i * jj;
      int r1 = r0 + jj;
      int r2 = r1 + jj;
      int r3 = r2 + jj;
      double s0 = 0.0;
      double s1 = 0.0;
      double s2 = 0.0;
      double s3 = 0.0;
      for (int p = 0; p < jj; p++) {
        double ep = e[p];
        s0 += ep * a[r0 + p];
        s1 += ep * a[r1 + p];
        s2 += ep * a[r2 + p];
        s3 += ep * a[r3 + p];
      }
      double c0 = scale(i, s0, d, expNegD);
      double c1 = scale(i + 1, s1, d, expNegD);
      double c2 = scale(i + 2, s2, d, expNegD);
      double c3 = scale(i + 3, s3, d, expNegD);
      if (probsOut == null) {
        for (int p = 0; p < jj; p++) {
          acc[p] += (a[r0 + p] * c0 + a[r1 + p] * c1) + (a[r2 + p] * c2 + a[r3 + p] * c3);
        }
      } else {
        for (int p = 0; p < jj; p++) {
          double ep = e[p];
          double x0 = a[r0 + p] * c0;
          double x1 = a[r1 + p] * c1;
          double x2 = a[r2 + p] * c2;
          double x3 = a[r3 + p] * c3;
          probsOut[r0 + p] = ep * x0;
          probsOut[r1 + p] = ep * x1;
          probsOut[r2 + p] = ep * x2;
          probsOut[r3 + p] = ep * x3;
          acc[p] += (x0 + x1) + (x2 + x3);
        }
      }
    }
    for (; i < r; i++) {
      int row = i * jj;
      double s = 0.0;
      for (int p = 0; p < jj; p++) {
        s += e[p] * a[row + p];
      }
      double c = scale(i, s, d, expNegD);
      for (int p = 0; p < jj; p++) {
        double x = a[row + p] * c;
        if (probsOut != null) {
          probsOut[row + p] = e[p] * x;
        }
        acc[p] += x;
      }
    }
    if (anyDirect) {
      java.util.Arrays.fill(extra, 0, jj, 0.0);
      for (int q = 0; q < r; q++) {
        if (rowOutside[q] < 0.0) {
          rowOutside[q] = directRow(q, delta, extra, probsOut);
        }
      }
    }
    double outside = 0.0;
    for (int q = 0; q < r; q++) {
      outside += rowOutside[q];
    }
    double invR = 1.0 / r;
    for (int p = 0; p < jj; p++) {
      sharesOut[p] = (anyDirect ? e[p] * acc[p] + extra[p] : e[p] * acc[p]) * invR;
    }
    return outside * invR;
  }

  /**
   * {@code 1 / den_i} on the common scale {@code exp(c_i + d)}, given the factored inside sum
   * {@code s}; stores the shopper's outside probability. A shopper that needs the log-sum-exp
   * path gets scale 0 and outside marker -1.
   */
  private double scale(int i, double s, double d, double expNegD) {
    double o = expNegShift[i] * expNegD;
    if (o >= FAST_MIN && o <= FAST_MAX) {
      double inv = 1.0 / (s + o);
      rowOutside[i] = o * inv;
      return inv;
    }
    double t = shift[i] + d;
    if (t >= 0.0) {
      o = Math.exp(-t);
      double den = s + o;
      if (!(den >= MIN_DENOMINATOR)) {
        // every term underflowed (utility ranges beyond ~700 within one shopper)
        anyDirect = true;
        rowOutside[i] = -1.0;
        return 0.0;
      }
      double inv = 1.0 / den;
      rowOutside[i] = o * inv;
      return inv;
    }
    // exp(-t) would overflow: rescale by g = exp(t) <= 1 instead
    double g = Math.exp(t);
    double inv = 1.0 / (s * g + 1.0);
    rowOutside[i] = inv;
    return g * inv;
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
