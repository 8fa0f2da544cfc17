package aislecast.core.globals;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.apache.commons.math3.analysis.UnivariateFunction;
import org.apache.commons.math3.analysis.integration.IterativeLegendreGaussIntegrator;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.ArrayRealVector;
import org.apache.commons.math3.linear.CholeskyDecomposition;
import org.apache.commons.math3.linear.RealMatrix;
import org.apache.commons.math3.random.Well19937c;
import org.junit.jupiter.api.Test;

/**
 * {@link PriceNoiseMarginal} against references outside it:
 *
 * <ol>
 *   <li>the likelihood with the price equation's coefficients integrated out against the direct
 *       multivariate normal density {@code y - X m0 ~ N(0, s I + X V0 X')} (linear-Gaussian
 *       marginal, Gelman et al., BDA3, section 14.2; determinant and solve by commons-math3's
 *       Cholesky decomposition on the n x n covariance, no identities shared with the code);
 *   <li>its integral over {@code sigma_p^2} against commons-math3's iterative Legendre-Gauss
 *       quadrature;
 *   <li>draws against that quadrature's CDF at nine points, tolerance four binomial standard
 *       errors (common practice).
 * </ol>
 */
class PriceNoiseMarginalTest {
  private static final int J = 4;
  /** The non-default priors and the parameter point of {@link ConditionalsTest}. */
  private static final Priors PRIORS = ConditionalsTest.PRIORS;
  private static final Globals G = ConditionalsTest.CURRENT;

  private static SimRows rows(int n, long seed) {
    return new SimRows(n, J, new double[] {0.5, -0.4}, new double[] {0.2, 0.7, 1.0, 1.1},
        new double[] {0.6, -0.3}, 0.4, 0.5, 0.25, new Well19937c(seed));
  }

  /** Direct log density of the coefficients-integrated price equation at sigma_p^2 = s. */
  private static double direct(SimRows r, boolean fixedLambda, double s) {
    int m = J + r.kc + (fixedLambda ? 0 : 1);
    double[][] x = new double[r.n][m];
    double[] y = new double[r.n];
    double[] m0 = new double[m];
    double[] v0 = new double[m];
    for (int i = 0; i < m; i++) {
      Normal p = i < J ? PRIORS.pi0() : (i < J + r.kc ? PRIORS.pi() : PRIORS.lambda());
      m0[i] = p.mean();
      v0[i] = p.var();
    }
    for (int t = 0; t < r.n; t++) {
      double xi = r.y[t];
      for (int a = 0; a < r.kz; a++) {
        xi -= r.z[t * r.kz + a] * G.gamma(a);
      }
      x[t][r.product[t]] = 1.0;
      for (int k = 0; k < r.kc; k++) {
        x[t][J + k] = r.c[t * r.kc + k];
      }
      if (fixedLambda) {
        y[t] = r.l[t] - G.lambda() * xi;
      } else {
        x[t][J + r.kc] = xi;
        y[t] = r.l[t];
      }
    }
    RealMatrix xm = new Array2DRowRealMatrix(x);
    RealMatrix v0m = new Array2DRowRealMatrix(m, m);
    for (int i = 0; i < m; i++) {
      v0m.setEntry(i, i, v0[i]);
    }
    RealMatrix cov = xm.multiply(v0m).multiply(xm.transpose());
    for (int t = 0; t < r.n; t++) {
      cov.addToEntry(t, t, s);
    }
    var resid = new ArrayRealVector(y).subtract(xm.operate(new ArrayRealVector(m0)));
    var chol = new CholeskyDecomposition(cov, 1e-12, 1e-300);
    double logDet = Math.log(chol.getDeterminant());
    double quad = resid.dotProduct(chol.getSolver().solve(resid));
    return -0.5 * r.n * Math.log(2 * Math.PI) - 0.5 * logDet - 0.5 * quad;
  }

  @Test
  void integratedLikelihoodMatchesTheDirectGaussianDensity() {
    SimRows r = rows(60, 21);
    for (boolean fixed : new boolean[] {false, true}) {
      PriceNoiseMarginal pm = PriceNoiseMarginal.of(G, r.stats(), PRIORS, fixed);
      for (double s : new double[] {0.01, 0.0625, 0.3, 2.0}) {
        double want = direct(r, fixed, s);
        assertEquals(want, pm.logLikelihood(s), 1e-8 * Math.abs(want),
            "fixed lambda " + fixed + ", s = " + s);
      }
    }
  }

  /**
   * {@code exp(log p(y | s) + log InvGamma(s) + u - shift)} over {@code u = log s}; the likelihood
   * is the one checked against the direct density above, the prior density comes from
   * commons-math3's gamma distribution ({@code 1/s ~ Gamma(shape a, rate b)}, so the density of
   * {@code s} is {@code Gamma(1/s) / s^2}).
   */
  private static UnivariateFunction integrand(PriceNoiseMarginal pm, double shift) {
    InvGamma p = PRIORS.sigmaP2();
    var gamma = new org.apache.commons.math3.distribution.GammaDistribution(
        null, p.shape(), 1.0 / p.scale());
    return u -> {
      double s = Math.exp(u);
      return Math.exp(pm.logLikelihood(s) + gamma.logDensity(1.0 / s) - 2 * u + u - shift);
    };
  }

  private static double quadrature(PriceNoiseMarginal pm, double shift, double lo, double hi) {
    var quad = new IterativeLegendreGaussIntegrator(32, 1e-13, 1e-15);
    return quad.integrate(10_000_000, integrand(pm, shift), lo, hi);
  }

  @Test
  void integralOverTheNoiseVarianceMatchesQuadrature() {
    // few rows (the prior matters, posterior wide and skewed) and many (narrow)
    for (int n : new int[] {6, 60, 2_000}) {
      SimRows r = rows(n, 22);
      for (boolean fixed : new boolean[] {false, true}) {
        PriceNoiseMarginal pm = PriceNoiseMarginal.of(G, r.stats(), PRIORS, fixed);
        double value = pm.logMarginal(PRIORS.sigmaP2());
        double ratio = quadrature(pm, value, Math.log(1e-6), Math.log(1e3));
        assertEquals(1.0, ratio, 1e-8, "n = " + n + ", fixed lambda " + fixed);
      }
    }
  }

  @Test
  void drawsFollowTheQuadratureCdf() {
    for (int n : new int[] {6, 200}) {
      SimRows r = rows(n, 23);
      PriceNoiseMarginal pm = PriceNoiseMarginal.of(G, r.stats(), PRIORS, false);
      double value = pm.logMarginal(PRIORS.sigmaP2());
      int draws = 40_000;
      double[] u = pm.draws(PRIORS.sigmaP2(), new Well19937c(5), draws);
      for (int i = 0; i < draws; i++) {
        u[i] = Math.log(u[i]);
      }
      java.util.Arrays.sort(u);
      double lo = Math.log(1e-6);
      for (int q = 1; q <= 9; q++) {
        double at = u[q * draws / 10];
        double cdf = quadrature(pm, value, lo, at);
        double empirical = (double) (q * draws / 10) / draws;
        double se = Math.sqrt(cdf * (1 - cdf) / draws);
        assertTrue(Math.abs(cdf - empirical) < 4 * se,
            "n = " + n + ": CDF " + cdf + " at the empirical " + empirical + " quantile");
      }
    }
  }
}
