package aislecast.core.mcmc;

import aislecast.core.demand.Heterogeneity;
import aislecast.core.demand.ShareKernel;
import aislecast.core.model.LocalParams;
import aislecast.core.model.StoreData;

/**
 * One store's conditional log density of its locals given the globals, with its gradient: the
 * target of the local HMC move, in coordinates chosen so that the data's ridges become axes.
 *
 * <p>Sampler coordinates {@code [psi (Kpsi), kt (one per stocked product), eta (one per row)]},
 * natural coordinates {@code [psi, kappa, delta]}, related by
 *
 * <pre>
 *   g_jt    = log (1/R) sum_r exp(v_rjt(psi))      v_rjt = -alpha_r p_jt + x_j' L nu_r
 *   delta_jt = eta_jt - g_jt
 *   kappa_sj = kt_sj - gbar_sj                      gbar_sj = mean of g_jt over the store's weeks
 * </pre>
 *
 * Shares pin {@code delta - alpha p}, not {@code delta}: with {@code eta} held, a move of the price
 * sensitivity leaves predicted shares nearly unchanged, and with {@code kt} held the intercepts
 * follow so {@code xi} barely moves. Each map is a shift by a function of {@code psi} alone, so
 * its Jacobian is 1 and the density is the same in both coordinates.
 *
 * <p>Terms (DESIGN section 4, constants dropped): multinomial sales, the price equation and
 * {@code xi} (both through {@code xi = delta - kappa - z' gamma}), and the hierarchical priors of
 * {@code kappa} and {@code psi}. Gradient of the sales part: with {@code w_j = q_j / s_j},
 * {@code w_0 = q_0 / s_0}, {@code dL/dv_rj = (1/R) P_rj (w_j - sum_k w_k P_rk - w_0 P_r0)}; psi
 * enters through {@code v}: {@code dv/da = -alpha_r p_j}, {@code dv/d log sigma = -alpha_r p_j
 * sigma nu_r0}, {@code dv/d L_kl = x_jk nu_rl} (times {@code L_kk} for a log-diagonal element);
 * and through the coordinate maps, {@code dg_jt/dpsi = sum_r omega_rjt dv_rjt/dpsi} with
 * {@code omega_rjt = exp(v_rjt) / sum_r exp(v_rjt)}.
 *
 * <p>Not thread-safe: one instance per store and thread; buffers are sized once.
 */
public final class StoreTarget implements Target {
  private final StoreData d;
  private final double[] x;
  private final int kx;
  private final int kpsi;
  private final int jCat;
  private final int nk;
  private final int off;
  private final int r;
  private LocalParams g;

  private final double[] alpha;
  private final double[] mu;
  /** exp(v_rj - c_j) for every row, market blocks of R x J_t at offset R * rowStart[t]. */
  private final double[] aExp;
  private final double[] colSum;
  private final double[] offset;
  private final double[] gbar;
  private final int[] count;
  private final double[] kappa;
  private final double[] delta;
  private final double[] gRow;
  private final double[] gKappa;
  private final double[] probs;
  private final double[] gv;
  private final double[] e;
  private final double[] s;
  private final double[] w;
  private final double[] outside;
  private final double[] l;
  private final double[] shopperPrice;
  private final double[] shopperTaste;
  private final double[] psiMean;
  private final double[] tmp;
  private final double[] colMax;
  private final double[] xCol;

  public StoreTarget(StoreData d, double[] x, int kx) {
    this.d = d;
    this.x = x;
    this.kx = kx;
    this.kpsi = Heterogeneity.dim(kx);
    this.jCat = x.length / Math.max(kx, 1);
    this.nk = d.products.length;
    this.off = kpsi + nk;
    this.r = d.shoppers;
    int jmax = d.maxAssortment();
    int rows = d.rows();
    this.alpha = new double[r];
    this.mu = new double[r * jCat];
    this.aExp = new double[r * rows];
    this.colSum = new double[rows];
    this.offset = new double[rows];
    this.gbar = new double[nk];
    this.count = new int[nk];
    for (int row = 0; row < rows; row++) {
      count[d.local[row]]++;
    }
    this.kappa = new double[nk];
    this.delta = new double[rows];
    this.gRow = new double[rows];
    this.gKappa = new double[nk];
    this.probs = new double[r * jmax];
    this.gv = new double[r * jmax];
    this.e = new double[jmax];
    this.s = new double[jmax];
    this.w = new double[jmax];
    this.outside = new double[r];
    this.l = new double[Math.max(1, kx * kx)];
    this.shopperPrice = new double[r];
    this.shopperTaste = new double[r * Math.max(1, kx)];
    this.psiMean = new double[kpsi];
    this.tmp = new double[kpsi];
    this.colMax = new double[jmax];
    this.xCol = new double[Math.max(1, kx) * jmax];
  }

  /** Sets the conditioning globals (read, not copied). */
  public void condition(LocalParams globals) {
    this.g = globals;
    g.psiMean(d.demographics, psiMean);
  }

  public StoreData data() {
    return d;
  }

  @Override
  public int dimension() {
    return off + d.rows();
  }

  /**
   * Sampler coordinates to natural ones {@code [psi, kappa, delta]}.
   *
   * @param pos not modified
   * @param out modified, same length (may not alias {@code pos})
   */
  public void toNatural(double[] pos, double[] out) {
    offsets(pos);
    System.arraycopy(pos, 0, out, 0, kpsi);
    for (int k = 0; k < nk; k++) {
      out[kpsi + k] = pos[kpsi + k] - gbar[k];
    }
    for (int row = 0; row < d.rows(); row++) {
      out[off + row] = pos[off + row] - offset[row];
    }
  }

  /** Natural coordinates to sampler ones; the inverse of {@link #toNatural}. */
  public void fromNatural(double[] nat, double[] out) {
    offsets(nat);
    System.arraycopy(nat, 0, out, 0, kpsi);
    for (int k = 0; k < nk; k++) {
      out[kpsi + k] = nat[kpsi + k] + gbar[k];
    }
    for (int row = 0; row < d.rows(); row++) {
      out[off + row] = nat[off + row] + offset[row];
    }
  }

  /**
   * The multinomial sales log likelihood (without the multinomial coefficient) at a position in
   * natural coordinates; by the direct kernel, independent of the sampler's own arithmetic.
   */
  public double salesLogLikelihoodNatural(double[] nat) {
    Heterogeneity.shopperTastes(nat, kx, d.nu, r, x, jCat, alpha, mu);
    double ll = 0;
    double[] v = gv;
    for (int t = 0; t < d.markets(); t++) {
      int a = d.rowStart[t];
      int j = d.rowStart[t + 1] - a;
      for (int i = 0; i < r; i++) {
        for (int p = 0; p < j; p++) {
          v[i * j + p] = mu[i * jCat + d.product[a + p]] - alpha[i] * d.price[a + p];
        }
      }
      System.arraycopy(nat, off + a, e, 0, j);
      double s0 = ShareKernel.shares(r, j, e, v, s, null);
      long inside = 0;
      for (int p = 0; p < j; p++) {
        long q = d.units[a + p];
        inside += q;
        ll += q == 0 ? 0.0 : q * Math.log(s[p]);
      }
      long q0 = d.marketSize[t] - inside;
      ll += q0 == 0 ? 0.0 : q0 * Math.log(s0);
    }
    return ll;
  }

  /** Fills {@code offset} (g per row), {@code gbar}, {@code aExp}, {@code colSum} for a psi. */
  private void offsets(double[] pos) {
    Heterogeneity.shopperTastes(pos, kx, d.nu, r, x, jCat, alpha, mu);
    java.util.Arrays.fill(gbar, 0.0);
    double logR = Math.log(r);
    for (int t = 0; t < d.markets(); t++) {
      int a = d.rowStart[t];
      int j = d.rowStart[t + 1] - a;
      int base = r * a;
      // the R x J block is row-major (shopper, product): walk it in that order, keeping each
      // column's running maximum and then its running sum (the same terms, added in the same
      // shopper order, as a column-by-column walk)
      for (int p = 0; p < j; p++) {
        colMax[p] = Double.NEGATIVE_INFINITY;
        colSum[a + p] = 0.0;
      }
      for (int i = 0; i < r; i++) {
        int row = base + i * j;
        int mrow = i * jCat;
        double al = alpha[i];
        for (int p = 0; p < j; p++) {
          double v = mu[mrow + d.product[a + p]] - al * d.price[a + p];
          aExp[row + p] = v;
          if (v > colMax[p]) {
            colMax[p] = v;
          }
        }
      }
      for (int i = 0; i < r; i++) {
        int row = base + i * j;
        for (int p = 0; p < j; p++) {
          double ex = Math.exp(aExp[row + p] - colMax[p]);
          aExp[row + p] = ex;
          colSum[a + p] += ex;
        }
      }
      for (int p = 0; p < j; p++) {
        offset[a + p] = colMax[p] + Math.log(colSum[a + p]) - logR;
        gbar[d.local[a + p]] += offset[a + p];
      }
    }
    for (int k = 0; k < nk; k++) {
      gbar[k] /= count[k];
    }
  }

  @Override
  public double logDensityAndGradient(double[] pos, double[] grad) {
    java.util.Arrays.fill(grad, 0, dimension(), 0.0);
    offsets(pos);
    for (int k = 0; k < nk; k++) {
      kappa[k] = pos[kpsi + k] - gbar[k];
    }
    for (int row = 0; row < d.rows(); row++) {
      delta[row] = pos[off + row] - offset[row];
    }
    double lp = psiPrior(pos, grad);
    lp += kappaPrior();
    lp += rows();
    lp += salesAndGradient(pos, grad);
    for (int k = 0; k < nk; k++) {
      grad[kpsi + k] = gKappa[k];
    }
    return lp;
  }

  /** log N(psi | Gamma' d, V) without constants, and its gradient -V^-1 (psi - mean). */
  private double psiPrior(double[] pos, double[] grad) {
    double[] ch = g.vPsiChol();
    double quad = 0;
    for (int i = 0; i < kpsi; i++) {
      double v = pos[i] - psiMean[i];
      for (int m = 0; m < i; m++) {
        v -= ch[i * kpsi + m] * tmp[m];
      }
      tmp[i] = v / ch[i * kpsi + i];
      quad += tmp[i] * tmp[i];
    }
    for (int i = kpsi - 1; i >= 0; i--) {
      double v = tmp[i];
      for (int m = i + 1; m < kpsi; m++) {
        v -= ch[m * kpsi + i] * tmp[m];
      }
      tmp[i] = v / ch[i * kpsi + i];
      grad[i] -= tmp[i];
    }
    return -0.5 * quad;
  }

  /** log N(kappa | kappabar, tau^2) without constants; starts the kappa gradient. */
  private double kappaPrior() {
    double lp = 0;
    double tau2 = g.tau2();
    for (int k = 0; k < nk; k++) {
      double dev = kappa[k] - g.kappabar()[d.products[k]];
      lp -= 0.5 * dev * dev / tau2;
      gKappa[k] = -dev / tau2;
    }
    return lp;
  }

  /** Price equation and xi terms; sets gRow (d/d delta) and adds to gKappa. */
  private double rows() {
    double sx2 = g.sigmaXi2();
    double sp2 = g.sigmaP2();
    double lambda = g.lambda();
    double[] gam = g.gamma();
    double[] pi = g.pi();
    double[] pi0 = g.pi0();
    double lp = 0;
    for (int row = 0; row < d.rows(); row++) {
      double xi = delta[row] - kappa[d.local[row]];
      for (int k = 0; k < d.kz; k++) {
        xi -= d.z[row * d.kz + k] * gam[k];
      }
      double m = pi0[d.product[row]];
      for (int k = 0; k < d.kc; k++) {
        m += d.c[row * d.kc + k] * pi[k];
      }
      double res = d.logPrice[row] - m - lambda * xi;
      lp += -0.5 * xi * xi / sx2 - 0.5 * res * res / sp2;
      double gxi = -xi / sx2 + lambda * res / sp2;
      gRow[row] = gxi;
      gKappa[d.local[row]] -= gxi;
    }
    return lp;
  }

  /**
   * Multinomial log likelihood and the whole gradient in sampler coordinates (psi and eta;
   * the kappa gradient is already complete in gKappa).
   */
  private double salesAndGradient(double[] pos, double[] grad) {
    Heterogeneity.factor(pos, kx, l);
    double sigma = Math.exp(pos[1]);
    java.util.Arrays.fill(shopperPrice, 0.0);
    java.util.Arrays.fill(shopperTaste, 0.0);
    double invR = 1.0 / r;
    double logR = Math.log(r);
    int tk = Math.max(1, kx);
    double ll = 0;
    for (int t = 0; t < d.markets(); t++) {
      int a = d.rowStart[t];
      int j = d.rowStart[t + 1] - a;
      int base = r * a;
      // exp(delta_j + v_rj) = exp(eta_j + log R - log S_j) * A_rj; scale by the largest b_j
      double bmax = Double.NEGATIVE_INFINITY;
      for (int p = 0; p < j; p++) {
        double b = pos[off + a + p] + logR - Math.log(colSum[a + p]);
        e[p] = b;
        bmax = Math.max(bmax, b);
      }
      for (int p = 0; p < j; p++) {
        e[p] = Math.exp(e[p] - bmax);
        s[p] = 0;
      }
      double o = Math.exp(-bmax);
      double s0 = 0;
      // Shoppers go four at a time: each shopper's sums keep their own order, and sums over
      // shoppers (s, s0, gRow) still add shopper by shopper, so every value is the one a
      // shopper-by-shopper loop gives, bit for bit; four independent sums in flight keep the
      // floating-point adder busy instead of waiting on one chain.
      int i = 0;
      for (; i + 3 < r; i += 4) {
        int r0 = i * j;
        int r1 = r0 + j;
        int r2 = r1 + j;
        int r3 = r2 + j;
        double in0 = 0;
        double in1 = 0;
        double in2 = 0;
        double in3 = 0;
        for (int p = 0; p < j; p++) {
          double ep = e[p];
          double v0 = ep * aExp[base + r0 + p];
          double v1 = ep * aExp[base + r1 + p];
          double v2 = ep * aExp[base + r2 + p];
          double v3 = ep * aExp[base + r3 + p];
          probs[r0 + p] = v0;
          probs[r1 + p] = v1;
          probs[r2 + p] = v2;
          probs[r3 + p] = v3;
          in0 += v0;
          in1 += v1;
          in2 += v2;
          in3 += v3;
        }
        double inv0 = 1.0 / (o + in0);
        double inv1 = 1.0 / (o + in1);
        double inv2 = 1.0 / (o + in2);
        double inv3 = 1.0 / (o + in3);
        for (int p = 0; p < j; p++) {
          double x0 = probs[r0 + p] * inv0;
          double x1 = probs[r1 + p] * inv1;
          double x2 = probs[r2 + p] * inv2;
          double x3 = probs[r3 + p] * inv3;
          probs[r0 + p] = x0;
          probs[r1 + p] = x1;
          probs[r2 + p] = x2;
          probs[r3 + p] = x3;
          s[p] = (((s[p] + x0) + x1) + x2) + x3;
        }
        outside[i] = o * inv0;
        outside[i + 1] = o * inv1;
        outside[i + 2] = o * inv2;
        outside[i + 3] = o * inv3;
        s0 = (((s0 + outside[i]) + outside[i + 1]) + outside[i + 2]) + outside[i + 3];
      }
      for (; i < r; i++) {
        int row = i * j;
        double in = 0;
        for (int p = 0; p < j; p++) {
          double v = e[p] * aExp[base + row + p];
          probs[row + p] = v;
          in += v;
        }
        double inv = 1.0 / (o + in);
        for (int p = 0; p < j; p++) {
          probs[row + p] *= inv;
          s[p] += probs[row + p];
        }
        outside[i] = o * inv;
        s0 += outside[i];
      }
      long inside = 0;
      for (int p = 0; p < j; p++) {
        s[p] *= invR;
        long q = d.units[a + p];
        inside += q;
        ll += q == 0 ? 0.0 : q * Math.log(s[p]);
        w[p] = q / s[p];
      }
      s0 *= invR;
      long q0 = d.marketSize[t] - inside;
      ll += q0 == 0 ? 0.0 : q0 * Math.log(s0);
      double w0 = q0 / s0;
      // pass 1: dL/dv_rj, and the total d/d delta of each row
      i = 0;
      for (; i + 3 < r; i += 4) {
        int r0 = i * j;
        int r1 = r0 + j;
        int r2 = r1 + j;
        int r3 = r2 + j;
        double pw0 = w0 * outside[i];
        double pw1 = w0 * outside[i + 1];
        double pw2 = w0 * outside[i + 2];
        double pw3 = w0 * outside[i + 3];
        for (int p = 0; p < j; p++) {
          double wp = w[p];
          pw0 += wp * probs[r0 + p];
          pw1 += wp * probs[r1 + p];
          pw2 += wp * probs[r2 + p];
          pw3 += wp * probs[r3 + p];
        }
        for (int p = 0; p < j; p++) {
          double wp = w[p];
          double g0 = invR * probs[r0 + p] * (wp - pw0);
          double g1 = invR * probs[r1 + p] * (wp - pw1);
          double g2 = invR * probs[r2 + p] * (wp - pw2);
          double g3 = invR * probs[r3 + p] * (wp - pw3);
          gv[r0 + p] = g0;
          gv[r1 + p] = g1;
          gv[r2 + p] = g2;
          gv[r3 + p] = g3;
          gRow[a + p] = (((gRow[a + p] + g0) + g1) + g2) + g3;
        }
      }
      for (; i < r; i++) {
        int row = i * j;
        double pw = w0 * outside[i];
        for (int p = 0; p < j; p++) {
          pw += w[p] * probs[row + p];
        }
        for (int p = 0; p < j; p++) {
          double gvi = invR * probs[row + p] * (w[p] - pw);
          gv[row + p] = gvi;
          gRow[a + p] += gvi;
        }
      }
      // pass 2: weights on dv_rj/dpsi, including the coordinate maps' dependence on psi; the
      // weights replace gv in place, the attributes are laid out by attribute for this market
      for (int p = 0; p < j; p++) {
        int k = d.local[a + p];
        e[p] = (gRow[a + p] + gKappa[k] / count[k]) / colSum[a + p];
        grad[off + a + p] = gRow[a + p];
        for (int m = 0; m < kx; m++) {
          xCol[m * j + p] = x[d.product[a + p] * kx + m];
        }
      }
      i = 0;
      for (; i + 3 < r; i += 4) {
        int r0 = i * j;
        int r1 = r0 + j;
        int r2 = r1 + j;
        int r3 = r2 + j;
        double gp0 = 0;
        double gp1 = 0;
        double gp2 = 0;
        double gp3 = 0;
        for (int p = 0; p < j; p++) {
          double ep = e[p];
          double price = d.price[a + p];
          double wt0 = gv[r0 + p] - ep * aExp[base + r0 + p];
          double wt1 = gv[r1 + p] - ep * aExp[base + r1 + p];
          double wt2 = gv[r2 + p] - ep * aExp[base + r2 + p];
          double wt3 = gv[r3 + p] - ep * aExp[base + r3 + p];
          gp0 += wt0 * price;
          gp1 += wt1 * price;
          gp2 += wt2 * price;
          gp3 += wt3 * price;
          gv[r0 + p] = wt0;
          gv[r1 + p] = wt1;
          gv[r2 + p] = wt2;
          gv[r3 + p] = wt3;
        }
        shopperPrice[i] += gp0;
        shopperPrice[i + 1] += gp1;
        shopperPrice[i + 2] += gp2;
        shopperPrice[i + 3] += gp3;
        for (int k = 0; k < kx; k++) {
          int xb = k * j;
          double t0 = shopperTaste[i * tk + k];
          double t1 = shopperTaste[(i + 1) * tk + k];
          double t2 = shopperTaste[(i + 2) * tk + k];
          double t3 = shopperTaste[(i + 3) * tk + k];
          for (int p = 0; p < j; p++) {
            double xv = xCol[xb + p];
            t0 += gv[r0 + p] * xv;
            t1 += gv[r1 + p] * xv;
            t2 += gv[r2 + p] * xv;
            t3 += gv[r3 + p] * xv;
          }
          shopperTaste[i * tk + k] = t0;
          shopperTaste[(i + 1) * tk + k] = t1;
          shopperTaste[(i + 2) * tk + k] = t2;
          shopperTaste[(i + 3) * tk + k] = t3;
        }
      }
      for (; i < r; i++) {
        int row = i * j;
        double gp = 0;
        for (int p = 0; p < j; p++) {
          double wt = gv[row + p] - e[p] * aExp[base + row + p];
          gp += wt * d.price[a + p];
          gv[row + p] = wt;
        }
        shopperPrice[i] += gp;
        for (int k = 0; k < kx; k++) {
          int xb = k * j;
          double acc = shopperTaste[i * tk + k];
          for (int p = 0; p < j; p++) {
            acc += gv[row + p] * xCol[xb + p];
          }
          shopperTaste[i * tk + k] = acc;
        }
      }
    }
    int stride = 1 + kx;
    for (int i = 0; i < r; i++) {
      double ga = alpha[i] * shopperPrice[i];
      grad[0] -= ga;
      grad[1] -= ga * sigma * d.nu[i * stride];
    }
    for (int k = 0; k < kx; k++) {
      for (int m = 0; m <= k; m++) {
        double gsum = 0;
        for (int i = 0; i < r; i++) {
          gsum += shopperTaste[i * kx + k] * d.nu[i * stride + 1 + m];
        }
        if (m == k) {
          grad[2 + k] += gsum * l[k * kx + k];
        } else {
          grad[Heterogeneity.offDiagonalIndex(kx, k, m)] += gsum;
        }
      }
    }
    return ll;
  }
}
