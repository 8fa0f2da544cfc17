package aislecast.core.mcmc;

import aislecast.core.demand.Heterogeneity;
import aislecast.core.model.LocalParams;
import aislecast.core.model.StoreData;

/**
 * One store's conditional log density of its locals {@code (psi_s, kappa_s, delta_s)} given the
 * globals, with its gradient: the target of the local HMC move.
 *
 * <p>Position layout: {@code [psi (Kpsi), kappa (one per stocked product), delta (one per sales
 * row)]}. Intercepts move together with {@code psi} and {@code delta} because the data leave a
 * ridge between price sensitivity and intercepts (a higher {@code alpha} with higher intercepts
 * predicts the same shares at typical prices); a Gibbs step on kappa alone crawls along it.
 * Terms (DESIGN section 4, constants dropped): multinomial sales, the price equation and
 * {@code xi} (both through {@code xi = delta - kappa - z' gamma}), and the hierarchical priors of
 * {@code kappa} and {@code psi}.
 *
 * <p>Gradient of the multinomial part: with {@code w_j = q_j / s_j}, {@code w_0 = q_0 / s_0},
 * {@code dL/dv_rj = (1/R) P_rj (w_j - sum_k w_k P_rk - w_0 P_r0)}; {@code dL/d delta_j = sum_r
 * dL/dv_rj}; and {@code psi} enters through {@code v_rj = -alpha_r p_j + x_j' L nu_r}:
 * {@code dv/da = -alpha_r p_j}, {@code dv/d log sigma = -alpha_r p_j sigma nu_r0},
 * {@code dv/d L_kl = x_jk nu_rl} (times {@code L_kk} for a log-diagonal element).
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
  private LocalParams g;

  private final double[] alpha;
  private final double[] mu;
  private final double[] v;
  private final double[] probs;
  private final double[] s;
  private final double[] w;
  private final double[] l;
  private final double[] outsideProb;
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
    int r = d.shoppers;
    int jmax = d.maxAssortment();
    this.alpha = new double[r];
    this.mu = new double[r * jCat];
    this.v = new double[r * jmax];
    this.probs = new double[r * jmax];
    this.s = new double[jmax];
    this.w = new double[jmax];
    this.l = new double[Math.max(1, kx * kx)];
    this.outsideProb = new double[r];
    this.shopperTaste = new double[r * Math.max(1, kx)];
    this.psiMean = new double[kpsi];
    this.tmp = new double[kpsi];
  }

  /** Sets the conditioning globals (read, not copied). */
  public void condition(LocalParams globals) {
    this.g = globals;
    g.psiMean(d.demographics, psiMean);
  }

  /**
   * The multinomial sales log likelihood alone (without the multinomial coefficient) at a
   * position; {@code scratch} (length {@link #dimension()}) receives its gradient.
   */
  public double salesLogLikelihood(double[] pos, double[] scratch) {
    java.util.Arrays.fill(scratch, 0, dimension(), 0.0);
    return sales(pos, scratch);
  }

  /** Offset of the first delta in the position. */
  public int deltaOffset() {
    return off;
  }

  public StoreData data() {
    return d;
  }

  @Override
  public int dimension() {
    return off + d.rows();
  }

  @Override
  public double logDensityAndGradient(double[] pos, double[] grad) {
    java.util.Arrays.fill(grad, 0, dimension(), 0.0);
    double lp = psiPrior(pos, grad);
    lp += kappaPrior(pos, grad);
    lp += sales(pos, grad);
    lp += rows(pos, grad);
    return lp;
  }

  /** log N(psi | Gamma' d, V) without constants, and its gradient -V^-1 (psi - mean). */
  private double psiPrior(double[] pos, double[] grad) {
    double[] ch = g.vPsiChol();
    // forward solve L u = psi - mean, then back solve L' y = u: y = V^-1 (psi - mean)
    double quad = 0;
    for (int i = 0; i < kpsi; i++) {
      double e = pos[i] - psiMean[i];
      for (int m = 0; m < i; m++) {
        e -= ch[i * kpsi + m] * tmp[m];
      }
      tmp[i] = e / ch[i * kpsi + i];
      quad += tmp[i] * tmp[i];
    }
    for (int i = kpsi - 1; i >= 0; i--) {
      double e = tmp[i];
      for (int m = i + 1; m < kpsi; m++) {
        e -= ch[m * kpsi + i] * tmp[m];
      }
      tmp[i] = e / ch[i * kpsi + i];
      grad[i] -= tmp[i];
    }
    return -0.5 * quad;
  }

  /** log N(kappa_sj | kappabar_j, tau^2) without constants. */
  private double kappaPrior(double[] pos, double[] grad) {
    double lp = 0;
    double tau2 = g.tau2();
    for (int l = 0; l < nk; l++) {
      double e = pos[kpsi + l] - g.kappabar()[d.products[l]];
      lp -= 0.5 * e * e / tau2;
      grad[kpsi + l] -= e / tau2;
    }
    return lp;
  }

  /** Price equation and xi terms over every row; gradient w.r.t. delta and kappa. */
  private double rows(double[] pos, double[] grad) {
    double sx2 = g.sigmaXi2();
    double sp2 = g.sigmaP2();
    double lambda = g.lambda();
    double[] gam = g.gamma();
    double[] pi = g.pi();
    double[] pi0 = g.pi0();
    double lp = 0;
    for (int row = 0; row < d.rows(); row++) {
      double xi = pos[off + row] - pos[kpsi + d.local[row]];
      for (int k = 0; k < d.kz; k++) {
        xi -= d.z[row * d.kz + k] * gam[k];
      }
      double m = pi0[d.product[row]];
      for (int k = 0; k < d.kc; k++) {
        m += d.c[row * d.kc + k] * pi[k];
      }
      double e = d.logPrice[row] - m - lambda * xi;
      lp += -0.5 * xi * xi / sx2 - 0.5 * e * e / sp2;
      double gxi = -xi / sx2 + lambda * e / sp2;
      grad[off + row] += gxi;
      grad[kpsi + d.local[row]] -= gxi;
    }
    return lp;
  }

  /** Multinomial log likelihood (without the multinomial coefficient) and its gradient. */
  private double sales(double[] pos, double[] grad) {
    int r = d.shoppers;
    Heterogeneity.shopperTastes(pos, kx, d.nu, r, x, jCat, alpha, mu);
    Heterogeneity.factor(pos, kx, l);
    double sigma = Math.exp(pos[1]);
    java.util.Arrays.fill(shopperTaste, 0.0);
    double invR = 1.0 / r;
    double ll = 0;
    for (int t = 0; t < d.markets(); t++) {
      int a = d.rowStart[t];
      int j = d.rowStart[t + 1] - a;
      double s0 = 0;
      java.util.Arrays.fill(s, 0, j, 0.0);
      // shopper probabilities by log-sum-exp
      for (int i = 0; i < r; i++) {
        int row = i * j;
        int catRow = i * jCat;
        double m = 0.0;
        for (int p = 0; p < j; p++) {
          double u = pos[off + a + p] + mu[catRow + d.product[a + p]] - alpha[i] * d.price[a + p];
          v[row + p] = u;
          if (u > m) {
            m = u;
          }
        }
        double e0 = Math.exp(-m);
        double den = e0;
        for (int p = 0; p < j; p++) {
          double e = Math.exp(v[row + p] - m);
          probs[row + p] = e;
          den += e;
        }
        double inv = 1.0 / den;
        for (int p = 0; p < j; p++) {
          probs[row + p] *= inv;
          s[p] += probs[row + p];
        }
        s0 += e0 * inv;
        outsideProb[i] = e0 * inv;
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
      for (int i = 0; i < r; i++) {
        int row = i * j;
        double pw = w0 * outsideProb[i];
        for (int p = 0; p < j; p++) {
          pw += w[p] * probs[row + p];
        }
        double gp = 0;
        int tb = i * Math.max(1, kx);
        for (int p = 0; p < j; p++) {
          double gv = invR * probs[row + p] * (w[p] - pw);
          grad[off + a + p] += gv;
          gp += gv * d.price[a + p];
          int prod = d.product[a + p];
          for (int k = 0; k < kx; k++) {
            shopperTaste[tb + k] += gv * x[prod * kx + k];
          }
        }
        grad[0] -= alpha[i] * gp;
        grad[1] -= alpha[i] * gp * sigma * d.nu[i * (1 + kx)];
      }
    }
    // taste part: dL/dL_kl = sum_r H_rk nu_r(1+l)
    int stride = 1 + kx;
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
