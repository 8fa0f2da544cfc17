package aislecast.core.estimate;

import aislecast.core.demand.Heterogeneity;
import aislecast.core.demand.ShareInversion;
import aislecast.core.demand.ShareKernel;
import aislecast.core.globals.Gaussian;
import aislecast.core.globals.GlobalGibbs;
import aislecast.core.globals.GlobalStats;
import aislecast.core.globals.Globals;
import aislecast.core.globals.HierarchyStats;
import aislecast.core.globals.InterceptStats;
import aislecast.core.globals.InvGamma;
import aislecast.core.globals.Normal;
import aislecast.core.globals.Priors;
import aislecast.core.globals.RegressionStats;
import aislecast.core.model.StoreData;

/**
 * A joint move along the slowest direction of the posterior: every store's heterogeneity vector
 * {@code psi_s} shifts by the same {@code c}, each market's mean utilities are re-inverted so that
 * its predicted shares stay exactly as they were, and each store-product intercept follows its
 * products' mean utility change (so {@code xi} barely moves). Without it, a Gibbs sweep between
 * globals and locals crawls: given
 * the locals the price equation pins {@code lambda} and the intercept means far tighter than
 * their posterior spread, and given those the locals are pinned too.
 *
 * <p>Exactness: for a fixed {@code c} the map shifts {@code psi}, maps {@code delta} to the
 * {@code delta'} with {@code s(delta'; psi') = s(delta; psi)} and shifts {@code kappa} by an
 * amount that depends only on (psi, delta); the map for {@code -c} inverts the one for {@code c},
 * so with {@code c ~ N(0, s^2)} the Metropolis-Hastings ratio is the posterior ratio times the
 * map's Jacobian (Green 1995's deterministic-map form), returned by {@link #apply}.
 * That ratio is taken with {@code Gamma}, {@code kappabar} and the price equation's coefficients
 * integrated out (each Gaussian given the other globals, so the integral is exact by Chib's
 * identity), the demand shocks' variance {@code sigma_xi^2} integrated out too (its
 * inverse-gamma prior is conjugate to the shocks), and the price noise variance {@code sigma_p^2}
 * by one-dimensional quadrature ({@link aislecast.core.globals.PriceNoiseMarginal}); those are
 * then drawn from their conditionals given the chosen locals, before anything that conditions on
 * them: a
 * partially collapsed Gibbs step in the sense of van Dyk and Park (2008, JASA 103), valid because
 * the collapsed block is redrawn right after the collapsed move.
 */
public final class RidgeMove {
  private RidgeMove() {}

  /**
   * Applies the shift to a local position {@code [psi, kappa, delta]} in place: {@code psi += c};
   * each market's {@code delta} re-inverted so that its predicted shares stay exactly what they
   * were; each intercept moved by its rows' mean {@code delta} change.
   *
   * @return {@code log |det d(delta')/d(delta)| = sum_t [log det D_t(old) - log det D_t(new)]}
   *     with {@code D = ds/d delta} (from {@code s(delta'; psi') = s(delta; psi)}); the map is
   *     block-triangular in (psi, delta, kappa), so this is its whole log Jacobian. NaN when an
   *     inversion fails (the caller rejects).
   */
  public static double apply(StoreData d, double[] x, int kx, double[] position, double[] c) {
    if (c == null) {
      return 0.0;
    }
    int kpsi = Heterogeneity.dim(kx);
    int np = d.products.length;
    int off = kpsi + np;
    int r = d.shoppers;
    int jCat = x.length / Math.max(1, kx);
    int jmax = d.maxAssortment();
    double[] alpha = new double[r];
    double[] mu = new double[r * jCat];
    Heterogeneity.shopperTastes(position, kx, d.nu, r, x, jCat, alpha, mu);
    double[] psiNew = java.util.Arrays.copyOf(position, kpsi);
    for (int k = 0; k < kpsi; k++) {
      psiNew[k] += c[k];
    }
    double[] alphaNew = new double[r];
    double[] muNew = new double[r * jCat];
    Heterogeneity.shopperTastes(psiNew, kx, d.nu, r, x, jCat, alphaNew, muNew);
    double[] vOld = new double[r * jmax];
    double[] vNew = new double[r * jmax];
    double[] del = new double[jmax];
    double[] target = new double[jmax];
    double[] probs = new double[r * jmax];
    double[] jac = new double[jmax * jmax];
    double[] start = new double[jmax];
    double[] dsum = new double[np];
    double[] dcount = new double[np];
    ShareInversion inversion = new ShareInversion(r, jmax);
    double logJac = 0;
    for (int t = 0; t < d.markets(); t++) {
      int a = d.rowStart[t];
      int j = d.rowStart[t + 1] - a;
      for (int i = 0; i < r; i++) {
        for (int p = 0; p < j; p++) {
          int prod = d.product[a + p];
          double pr = d.price[a + p];
          vOld[i * j + p] = mu[i * jCat + prod] - alpha[i] * pr;
          vNew[i * j + p] = muNew[i * jCat + prod] - alphaNew[i] * pr;
        }
      }
      System.arraycopy(position, off + a, del, 0, j);
      ShareKernel.shares(r, j, del, vOld, target, probs);
      ShareKernel.jacobianDelta(r, j, probs, jac);
      logJac += logDetSpd(jac, j);
      // start from the plain-logit guess: delta moves with the mean price-utility change
      for (int p = 0; p < j; p++) {
        double mean = 0;
        for (int i = 0; i < r; i++) {
          mean += vOld[i * j + p] - vNew[i * j + p];
        }
        del[p] += mean / r;
      }
      // the old point's Jacobian (needed for the log det anyway) drives chord steps; full
      // Newton only if they stall (same root either way, to the same tolerance)
      System.arraycopy(del, 0, start, 0, j);
      ShareInversion.Result res = inversion.invertChord(r, j, vNew, target, del, jac, 1e-12, 30);
      if (!res.converged()) {
        System.arraycopy(start, 0, del, 0, j);
        res = inversion.invert(r, j, vNew, target, del, 1e-12, 100);
      }
      if (!res.converged()) {
        return Double.NaN;
      }
      ShareKernel.shares(r, j, del, vNew, target, probs);
      ShareKernel.jacobianDelta(r, j, probs, jac);
      logJac -= logDetSpd(jac, j);
      for (int p = 0; p < j; p++) {
        double change = del[p] - position[off + a + p];
        position[off + a + p] = del[p];
        dsum[d.local[a + p]] += change;
        dcount[d.local[a + p]]++;
      }
    }
    for (int l = 0; l < np; l++) {
      position[kpsi + l] += dsum[l] / dcount[l];
    }
    System.arraycopy(psiNew, 0, position, 0, kpsi);
    return logJac;
  }

  /**
   * Cholesky factor of {@code 2.38^2 / k} times the sample covariance of the warmup draws of the
   * hierarchy's intercept row, plus a small ridge (Haario, Saksman and Tamminen 2001, Bernoulli 7,
   * adaptive Metropolis; Roberts and Rosenthal 2009 for the 2.38^2/d scaling).
   */
  static double[] proposalFactor(aislecast.core.mcmc.Welford history, int k) {
    double[] cov = history.covariance();
    double f = 2.38 * 2.38 / k;
    org.ejml.data.DMatrixRMaj m = new org.ejml.data.DMatrixRMaj(k, k);
    for (int i = 0; i < k; i++) {
      for (int q = 0; q < k; q++) {
        m.set(i, q, f * cov[i * k + q] + (i == q ? 1e-6 : 0.0));
      }
    }
    var chol = org.ejml.dense.row.factory.DecompositionFactory_DDRM.chol(k, true);
    if (!chol.decompose(m)) {
      double[] diag = new double[k * k];
      for (int i = 0; i < k; i++) {
        diag[i * k + i] = Math.sqrt(f * Math.max(cov[i * k + i], 0) + 1e-6);
      }
      return diag;
    }
    double[] l = new double[k * k];
    for (int i = 0; i < k; i++) {
      for (int q = 0; q <= i; q++) {
        l[i * k + q] = m.get(i, q);
      }
    }
    return l;
  }

  /** log det of a symmetric positive definite J x J matrix (row-major) by Cholesky (EJML). */
  private static double logDetSpd(double[] a, int j) {
    org.ejml.data.DMatrixRMaj m = new org.ejml.data.DMatrixRMaj(j, j);
    System.arraycopy(a, 0, m.data, 0, j * j);
    var chol = org.ejml.dense.row.factory.DecompositionFactory_DDRM.chol(j, true);
    if (!chol.decompose(m)) {
      return Double.NaN;
    }
    double s = 0;
    for (int i = 0; i < j; i++) {
      s += 2 * Math.log(m.get(i, i));
    }
    return s;
  }

  /**
   * Log of the collapsed posterior of the locals summarised by {@code s}, up to terms that do
   * not change under the move (the sales likelihood is added separately): the psi hierarchy with
   * Gamma integrated out given V_psi, the intercepts with kappabar integrated out given tau^2, the
   * xi term with sigma_xi^2 integrated out given gamma, and the price-equation term with (pi0, pi,
   * lambda) and sigma_p^2 integrated out given gamma (lambda held at its value when {@code
   * fixedLambda}).
   */
  public static double collapsedLogDensity(Globals g, GlobalStats s, Priors priors,
      boolean fixedLambda) {
    return hierarchy(g, s.hierarchy(), priors) + intercepts(g, s.intercepts(), priors)
        + regression(g, s.regression(), priors, fixedLambda);
  }

  static double hierarchy(Globals g, HierarchyStats s, Priors priors) {
    int kpsi = s.kpsi();
    Gaussian cond = GlobalGibbs.gammaPsiConditional(g.vPsi(), s, priors);
    double[] gStar = cond.mean();
    org.ejml.data.DMatrixRMaj v = new org.ejml.data.DMatrixRMaj(kpsi, kpsi, true, g.vPsi());
    double logDetV = Math.log(org.ejml.dense.row.CommonOps_DDRM.det(v));
    org.ejml.data.DMatrixRMaj inv = new org.ejml.data.DMatrixRMaj(kpsi, kpsi);
    if (!org.ejml.dense.row.CommonOps_DDRM.invertSPD(v.copy(), inv)) {
      throw new IllegalArgumentException("V_psi is not positive definite");
    }
    double[] vinv = inv.getData();
    double[] scatter = s.residualScatter(gStar);
    double tr = 0;
    for (int i = 0; i < kpsi * kpsi; i++) {
      tr += vinv[i] * scatter[i];
    }
    double lik = -0.5 * s.count() * (kpsi * Math.log(2 * Math.PI) + logDetV) - 0.5 * tr;
    double prior = 0;
    double[] m0 = priors.gammaPsiMean();
    double[] v0 = priors.gammaPsiVar();
    for (int i = 0; i < gStar.length; i++) {
      prior += normal(gStar[i], m0[i], v0[i]);
    }
    return lik + prior - cond.logDensityAtMean();
  }

  static double intercepts(Globals g, InterceptStats s, Priors priors) {
    double tau2 = g.tau2();
    Normal prior = priors.kappabar();
    double out = 0;
    for (int j = 0; j < s.products(); j++) {
      double n = s.count(j);
      if (n == 0) {
        continue;
      }
      double prec = n / tau2 + 1.0 / prior.var();
      double mean = (s.sum(j) / tau2 + prior.mean() / prior.var()) / prec;
      double ss = s.sumOfSquares(j) - 2 * mean * s.sum(j) + n * mean * mean;
      double lik = -0.5 * n * Math.log(2 * Math.PI * tau2) - 0.5 * ss / tau2;
      out += lik + normal(mean, prior.mean(), prior.var())
          - (-0.5 * Math.log(2 * Math.PI) + 0.5 * Math.log(prec));
    }
    return out;
  }

  static double regression(Globals g, RegressionStats s, Priors priors, boolean fixedLambda) {
    double n = s.n();
    double demand = collapseNoiseVariance ? collapsedDemand(g, s, priors)
        : -0.5 * n * Math.log(2 * Math.PI * g.sigmaXi2())
        - 0.5 * GlobalGibbs.demandResidualSquares(g, s) / g.sigmaXi2();
    if (collapsePriceNoise) {
      return demand + aislecast.core.globals.PriceNoiseMarginal.of(g, s, priors, fixedLambda)
          .logMarginal(priors.sigmaP2());
    }
    int j = s.products();
    int kc = s.kc();
    Gaussian cond = fixedLambda
        ? GlobalGibbs.priceEquationFixedLambdaConditional(g, s, priors)
        : GlobalGibbs.priceEquationConditional(g, s, priors);
    double[] t = cond.mean();
    double[] pi0 = java.util.Arrays.copyOfRange(t, 0, j);
    double[] pi = java.util.Arrays.copyOfRange(t, j, j + kc);
    double lambda = fixedLambda ? g.lambda() : t[j + kc];
    Globals at = g.withPriceEquation(pi0, pi, lambda);
    double price = -0.5 * n * Math.log(2 * Math.PI * g.sigmaP2())
        - 0.5 * GlobalGibbs.priceResidualSquares(at, s) / g.sigmaP2();
    double prior = 0;
    for (int i = 0; i < j; i++) {
      prior += normal(pi0[i], priors.pi0().mean(), priors.pi0().var());
    }
    for (int i = 0; i < kc; i++) {
      prior += normal(pi[i], priors.pi().mean(), priors.pi().var());
    }
    if (!fixedLambda) {
      prior += normal(lambda, priors.lambda().mean(), priors.lambda().var());
    }
    return demand + price + prior - cond.logDensityAtMean();
  }

  /**
   * Whether the demand term integrates sigma_xi^2 out (the default). Only the in-process probes
   * switch it off, to measure what the collapse buys.
   */
  static volatile boolean collapseNoiseVariance = true;

  /**
   * Whether the price term integrates sigma_p^2 out as well (the default, see {@link
   * aislecast.core.globals.PriceNoiseMarginal}). Only the in-process probes switch it off.
   */
  static volatile boolean collapsePriceNoise = true;

  /**
   * {@code log prod_t N(xi_t; 0, s2)} integrated over {@code s2 ~ Inv-Gamma(a, b)}: {@code a log b
   * - log Gamma(a) + log Gamma(a + n/2) - (a + n/2) log(b + xi'xi/2) - (n/2) log(2 pi)} (the
   * normal-inverse-gamma marginal, Gelman et al., BDA3, section 3.3).
   */
  static double collapsedDemand(Globals g, RegressionStats s, Priors priors) {
    return normalInvGammaMarginal(s.n(), GlobalGibbs.demandResidualSquares(g, s),
        priors.sigmaXi2());
  }

  /** {@code log int prod_{i<=n} N(y_i; 0, v) InvGamma(v; prior) dv} with {@code ss = sum y_i^2}. */
  static double normalInvGammaMarginal(double n, double ss, InvGamma prior) {
    double a = prior.shape();
    double b = prior.scale();
    return a * Math.log(b) - org.apache.commons.math3.special.Gamma.logGamma(a)
        + org.apache.commons.math3.special.Gamma.logGamma(a + 0.5 * n)
        - (a + 0.5 * n) * Math.log(b + 0.5 * ss) - 0.5 * n * Math.log(2 * Math.PI);
  }

  private static double normal(double y, double m, double v) {
    double e = y - m;
    return -0.5 * (Math.log(2 * Math.PI * v) + e * e / v);
  }
}
