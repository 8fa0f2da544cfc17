package aislecast.core.model;

import aislecast.core.demand.Heterogeneity;
import aislecast.core.demand.ShareKernel;
import org.apache.commons.math3.special.Gamma;

/**
 * The log density of one store's data and locals given the globals (DESIGN section 4), with every
 * normalising constant, split into the terms of the model:
 *
 * <pre>
 *   sales      sum_t log Multinomial(q_0t, q_jt | M_t, s_0t, s_jt)
 *   price      sum_rows log N(log p | pi0_j + c' pi + lambda xi, sigma_p^2)   (density of log p)
 *   xi         sum_rows log N(xi | 0, sigma_xi^2),   xi = delta - kappa_sj - z' gamma
 *   kappa      sum_j log N(kappa_sj | kappabar_j, tau^2)
 *   psi        log N(psi_s | Gamma' d_s, V_psi)
 * </pre>
 *
 * <p>Not a hot path: the samplers use their own incremental forms; this is the reference form
 * that pins the model down against outside test vectors.
 */
public final class StoreDensity {
  private static final double LOG_2PI = Math.log(2 * Math.PI);

  private StoreDensity() {}

  /** The five store-level terms. */
  public record Terms(double sales, double price, double xi, double kappa, double psi) {
    public double total() {
      return sales + price + xi + kappa + psi;
    }

    public Terms plus(Terms o) {
      return new Terms(sales + o.sales, price + o.price, xi + o.xi, kappa + o.kappa, psi + o.psi);
    }
  }

  /**
   * @param x catalog attributes J x Kx standardised, not modified
   * @param psi the store's heterogeneity, not modified
   * @param kappa intercepts per product of {@code d.products}, not modified
   * @param delta mean utility per row, not modified
   */
  public static Terms terms(StoreData d, double[] x, int kx, LocalParams g, double[] psi,
      double[] kappa, double[] delta) {
    int r = d.shoppers;
    int jmax = d.maxAssortment();
    double[] alpha = new double[r];
    double[] muAll = new double[r * x.length / Math.max(kx, 1)];
    int jCat = kx == 0 ? 0 : x.length / kx;
    Heterogeneity.shopperTastes(psi, kx, d.nu, r, x, jCat, alpha, muAll);
    double[] v = new double[r * jmax];
    double[] del = new double[jmax];
    double[] pr = new double[jmax];
    double[] s = new double[jmax];

    double sales = 0;
    for (int t = 0; t < d.markets(); t++) {
      int a = d.rowStart[t];
      int j = d.rowStart[t + 1] - a;
      for (int p = 0; p < j; p++) {
        del[p] = delta[a + p];
        pr[p] = d.price[a + p];
      }
      for (int i = 0; i < r; i++) {
        for (int p = 0; p < j; p++) {
          v[i * j + p] = muAll[i * jCat + d.product[a + p]] - alpha[i] * pr[p];
        }
      }
      double s0 = ShareKernel.shares(r, j, del, v, s, null);
      long m = d.marketSize[t];
      long inside = 0;
      double ll = 0;
      for (int p = 0; p < j; p++) {
        long q = d.units[a + p];
        inside += q;
        ll += (q == 0 ? 0.0 : q * Math.log(s[p])) - Gamma.logGamma(q + 1.0);
      }
      long q0 = m - inside;
      ll += (q0 == 0 ? 0.0 : q0 * Math.log(s0)) - Gamma.logGamma(q0 + 1.0)
          + Gamma.logGamma(m + 1.0);
      sales += ll;
    }

    double priceTerm = 0;
    double xiTerm = 0;
    for (int row = 0; row < d.rows(); row++) {
      double xi = xi(d, g, kappa, delta, row);
      xiTerm += normal(xi, 0, g.sigmaXi2());
      double mean = g.pi0()[d.product[row]] + g.lambda() * xi;
      for (int k = 0; k < d.kc; k++) {
        mean += d.c[row * d.kc + k] * g.pi()[k];
      }
      priceTerm += normal(d.logPrice[row], mean, g.sigmaP2());
    }

    double kappaTerm = 0;
    for (int l = 0; l < d.products.length; l++) {
      kappaTerm += normal(kappa[l], g.kappabar()[d.products[l]], g.tau2());
    }

    int kpsi = g.kpsi();
    double[] mean = new double[kpsi];
    g.psiMean(d.demographics, mean);
    double psiTerm = mvnLogDensity(psi, mean, g.vPsiChol(), g.logDetVPsi(), kpsi);
    return new Terms(sales, priceTerm, xiTerm, kappaTerm, psiTerm);
  }

  /** xi of one row: delta - kappa_sj - z' gamma. */
  public static double xi(StoreData d, LocalParams g, double[] kappa, double[] delta, int row) {
    double v = delta[row] - kappa[d.local[row]];
    for (int k = 0; k < d.kz; k++) {
      v -= d.z[row * d.kz + k] * g.gamma()[k];
    }
    return v;
  }

  /** log N(y | mean, var). */
  public static double normal(double y, double mean, double var) {
    double e = y - mean;
    return -0.5 * (LOG_2PI + Math.log(var) + e * e / var);
  }

  /**
   * log N(y | mean, L L') for a lower Cholesky factor L (row-major), by forward substitution.
   */
  public static double mvnLogDensity(double[] y, double[] mean, double[] chol, double logDet,
      int k) {
    double[] w = new double[k];
    double quad = 0;
    for (int i = 0; i < k; i++) {
      double v = y[i] - mean[i];
      for (int m = 0; m < i; m++) {
        v -= chol[i * k + m] * w[m];
      }
      w[i] = v / chol[i * k + i];
      quad += w[i] * w[i];
    }
    return -0.5 * (k * LOG_2PI + logDet + quad);
  }
}
