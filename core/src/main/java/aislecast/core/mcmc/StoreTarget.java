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
      for (int p = 0; p < j; p++) {
        int prod = d.product[a + p];
        double price = d.price[a + p];
        double c = Double.NEGATIVE_INFINITY;
        for (int i = 0; i < r; i++) {
          double v = mu[i * jCat + prod] - alpha[i] * price;
          aExp[base + i * j + p] = v;
          if (v > c) {
            c = v;
          }
        }
        double sum = 0;
        for (int i = 0; i < r; i++) {
          double ex = Math.exp(aExp[base + i * j + p] - c);
          aExp[base + i * j + p] = ex;
          sum += ex;
        }
        colSum[a + p] = sum;
        offset[a + p] = c + Math.log(sum) - logR;
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
      for (int i = 0; i < r; i++) {
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
      for (int i = 0; i < r; i++) {
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
      // pass 2: weights on dv_rj/dpsi, including the coordinate maps' dependence on psi
      for (int p = 0; p < j; p++) {
        int k = d.local[a + p];
        e[p] = (gRow[a + p] + gKappa[k] / count[k]) / colSum[a + p];
        grad[off + a + p] = gRow[a + p];
      }
      for (int i = 0; i < r; i++) {
        int row = i * j;
        double gp = 0;
        int tb = i * tk;
        for (int p = 0; p < j; p++) {
          double wt = gv[row + p] - e[p] * aExp[base + row + p];
          gp += wt * d.price[a + p];
          int prod = d.product[a + p];
          for (int k = 0; k < kx; k++) {
            shopperTaste[tb + k] += wt * x[prod * kx + k];
          }
        }
        shopperPrice[i] += gp;
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
