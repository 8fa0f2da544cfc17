package aislecast.core.demand;

/**
 * Simulated market shares of the random-coefficients logit and their derivatives.
 *
 * <p>For one market with R shoppers and J products, mean utilities {@code delta_j} and shopper
 * parts {@code v_rj} (see {@link Heterogeneity}), shopper r chooses product j with probability
 * {@code P_rj = exp(delta_j + v_rj) / (1 + sum_k exp(delta_k + v_rk))} and the market share is
 * {@code s_j = (1/R) sum_r P_rj}. The outside option has utility 0.
 *
 * <p>All functions are static, work on flat row-major arrays and write into caller buffers. This
 * class is the direct (one {@code exp} per shopper-product) path, stable at any utility by
 * log-sum-exp; {@link FactoredShares} is the fast path for when only {@code delta} moves.
 */
public final class ShareKernel {
  private ShareKernel() {}

  /**
   * Shares by log-sum-exp, one {@code exp} per shopper-product.
   *
   * @param delta length J, not modified
   * @param v R x J, not modified
   * @param sharesOut length J, modified
   * @param probsOut R x J shopper choice probabilities, modified; may be null
   * @return the outside share {@code s_0}
   */
  public static double shares(
      int r, int j, double[] delta, double[] v, double[] sharesOut, double[] probsOut) {
    java.util.Arrays.fill(sharesOut, 0, j, 0.0);
    // one exp per element: kept in the caller's probability row, or in a per-thread row
    double[] buf = probsOut != null ? probsOut : scratchRow(j);
    double outside = 0.0;
    double invR = 1.0 / r;
    for (int i = 0; i < r; i++) {
      int row = i * j;
      int b = probsOut != null ? row : 0;
      double m = 0.0; // the outside option's utility bounds the max from below
      for (int p = 0; p < j; p++) {
        double u = delta[p] + v[row + p];
        if (u > m) {
          m = u;
        }
      }
      double e0 = Math.exp(-m);
      double den = e0;
      for (int p = 0; p < j; p++) {
        double ex = Math.exp(delta[p] + v[row + p] - m);
        buf[b + p] = ex;
        den += ex;
      }
      double inv = 1.0 / den;
      for (int p = 0; p < j; p++) {
        double prob = buf[b + p] * inv;
        buf[b + p] = prob;
        sharesOut[p] += prob * invR;
      }
      outside += e0 * inv * invR;
    }
    return outside;
  }

  private static final ThreadLocal<double[]> SCRATCH = ThreadLocal.withInitial(() -> new double[64]);

  private static double[] scratchRow(int j) {
    double[] row = SCRATCH.get();
    if (row.length < j) {
      row = new double[j];
      SCRATCH.set(row);
    }
    return row;
  }

  /**
   * Jacobian of shares with respect to mean utilities, {@code D_jk = ds_j / d delta_k =
   * (1/R) sum_r P_rj (1{j=k} - P_rk)}.
   *
   * @param probs R x J shopper probabilities, not modified
   * @param out J x J row-major (row j = share j), modified
   */
  public static void jacobianDelta(int r, int j, double[] probs, double[] out) {
    jacobian(r, j, probs, null, out);
  }

  /**
   * Jacobian of shares with respect to prices, {@code ds_j / dp_k = -(1/R) sum_r alpha_r P_rj
   * (1{j=k} - P_rk)}: a price enters only its own product's utility, with slope {@code -alpha_r}.
   *
   * @param probs R x J, not modified
   * @param alpha length R, not modified
   * @param out J x J row-major (row j = share j, column k = price k), modified
   */
  public static void jacobianPrice(int r, int j, double[] probs, double[] alpha, double[] out) {
    jacobian(r, j, probs, alpha, out);
  }

  private static void jacobian(int r, int j, double[] probs, double[] alpha, double[] out) {
    // symmetric (w_i P_ia P_ib is symmetric in a, b): accumulate the upper triangle, then mirror
    java.util.Arrays.fill(out, 0, j * j, 0.0);
    // four shoppers per pass over the triangle: each entry still takes the shoppers' terms one
    // after another in shopper order (bit for bit the one-shopper loop), loaded and stored once
    int i = 0;
    for (; i + 3 < r; i += 4) {
      int r0 = i * j;
      int r1 = r0 + j;
      int r2 = r1 + j;
      int r3 = r2 + j;
      double w0 = alpha == null ? 1.0 : -alpha[i];
      double w1 = alpha == null ? 1.0 : -alpha[i + 1];
      double w2 = alpha == null ? 1.0 : -alpha[i + 2];
      double w3 = alpha == null ? 1.0 : -alpha[i + 3];
      for (int a = 0; a < j; a++) {
        double pa0 = w0 * probs[r0 + a];
        double pa1 = w1 * probs[r1 + a];
        double pa2 = w2 * probs[r2 + a];
        double pa3 = w3 * probs[r3 + a];
        int o = a * j;
        // the diagonal gets each shopper's pa before that shopper's own product term
        double diag = out[o + a];
        diag = (diag + pa0) - pa0 * probs[r0 + a];
        diag = (diag + pa1) - pa1 * probs[r1 + a];
        diag = (diag + pa2) - pa2 * probs[r2 + a];
        diag = (diag + pa3) - pa3 * probs[r3 + a];
        out[o + a] = diag;
        for (int b = a + 1; b < j; b++) {
          out[o + b] = (((out[o + b] - pa0 * probs[r0 + b]) - pa1 * probs[r1 + b])
              - pa2 * probs[r2 + b]) - pa3 * probs[r3 + b];
        }
      }
    }
    for (; i < r; i++) {
      int row = i * j;
      double w = alpha == null ? 1.0 : -alpha[i];
      for (int a = 0; a < j; a++) {
        double pa = w * probs[row + a];
        int o = a * j;
        out[o + a] += pa;
        for (int b = a; b < j; b++) {
          out[o + b] -= pa * probs[row + b];
        }
      }
    }
    double invR = 1.0 / r;
    for (int a = 0; a < j; a++) {
      for (int b = a; b < j; b++) {
        double v = out[a * j + b] * invR;
        out[a * j + b] = v;
        out[b * j + a] = v;
      }
    }
  }

  /**
   * Price elasticities {@code e_jk = (ds_j/dp_k) p_k / s_j} from a price Jacobian.
   *
   * @param dsdp J x J from {@link #jacobianPrice}, not modified
   * @param out J x J, modified (row j = share j responding to price k)
   */
  public static void elasticities(int j, double[] dsdp, double[] shares, double[] price, double[] out) {
    for (int a = 0; a < j; a++) {
      for (int b = 0; b < j; b++) {
        out[a * j + b] = dsdp[a * j + b] * price[b] / shares[a];
      }
    }
  }

  /**
   * Diversion ratios: of the sales product j loses when its price rises, the fraction that goes to
   * product k, {@code D_jk = -(ds_k/dp_j) / (ds_j/dp_j)}; column J holds the fraction that goes to
   * the outside option, so each row sums to one.
   *
   * @param dsdp J x J price Jacobian, not modified
   * @param out J x (J + 1), modified; the diagonal is set to 0
   */
  public static void diversion(int j, double[] dsdp, double[] out) {
    int w = j + 1;
    for (int a = 0; a < j; a++) {
      double own = dsdp[a * j + a];
      double inside = 0.0;
      for (int b = 0; b < j; b++) {
        double d = b == a ? 0.0 : -dsdp[b * j + a] / own;
        out[a * w + b] = d;
        inside += d;
      }
      out[a * w + j] = 1.0 - inside;
    }
  }
}
