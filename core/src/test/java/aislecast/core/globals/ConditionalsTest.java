package aislecast.core.globals;

import static org.junit.jupiter.api.Assertions.assertEquals;

import org.apache.commons.math3.distribution.MultivariateNormalDistribution;
import org.apache.commons.math3.distribution.NormalDistribution;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.ArrayRealVector;
import org.apache.commons.math3.linear.LUDecomposition;
import org.apache.commons.math3.linear.RealMatrix;
import org.apache.commons.math3.linear.RealVector;
import org.apache.commons.math3.random.Well19937c;
import org.apache.commons.math3.special.Gamma;
import org.junit.jupiter.api.Test;

/**
 * Each global conditional checked three ways, all computed independently of the code under test
 * from the raw simulated rows / stores / intercepts:
 *
 * <ol>
 *   <li>its parameters against the textbook closed form (Gelman et al., Bayesian Data Analysis,
 *       3rd ed.: normal mean with known variance 2.5, normal variance 2.6, multivariate normal with
 *       Inverse-Wishart 3.6, regression with known variance and normal prior ch. 14), solved with
 *       commons-math3's LU decomposition;
 *   <li>its log density against the raw log joint density (commons-math3 normal densities): a full
 *       conditional is proportional to the joint, so log-density differences between two values of
 *       the block must agree (the definition of a full conditional, common practice);
 *   <li>20,000 draws of the sub-step against the closed-form mean and variance, tolerances from
 *       the Monte Carlo error ({@link McCheck}).
 * </ol>
 */
class ConditionalsTest {
  private static final int N = 20_000;
  private static final int J = 4;
  private static final int KZ = 2;
  private static final int KC = 2;
  private static final int KD = 2;
  private static final int KPSI = 3;
  private static final Dims DIMS = new Dims(KD, KPSI, J, KZ, KC);

  /** Non-default priors with non-zero means, so every prior term is exercised. */
  static final Priors PRIORS =
      new Priors(
          KD, KPSI, Priors.defaults(KD, 1).gammaPsiMean(), new double[] {4, 1, 2, 9, 3, 5},
          new InvWishart(7.0, new double[] {0.8, 0.1, 0, 0.1, 0.6, 0.05, 0, 0.05, 0.5}, KPSI),
          new Normal(1.0, 9.0), new InvGamma(3.0, 0.8), new Normal(0.3, 4.0),
          new Normal(0.5, 2.0), new Normal(-0.2, 3.0), new Normal(0.1, 0.5),
          new InvGamma(2.5, 0.4), new InvGamma(3.5, 0.3));

  static final Globals CURRENT =
      new Globals(
          DIMS, new double[] {0.2, -0.9, -1.1, 0.1, 0.3, -0.2},
          new double[] {0.5, 0.1, 0.0, 0.1, 0.4, -0.05, 0.0, -0.05, 0.3},
          new double[] {1.5, 0.2, -0.7, 2.0}, 0.6, new double[] {0.4, -0.6}, 0.2,
          new double[] {0.3, 0.6, 0.9, 1.2}, new double[] {0.5, -0.25}, 0.35, 0.05);

  private static final SimRows ROWS =
      new SimRows(
          60, J, new double[] {0.5, -0.4}, new double[] {0.2, 0.7, 1.0, 1.1},
          new double[] {0.6, -0.3}, 0.4, 0.5, 0.25, new Well19937c(21));

  // ------------------------------------------------------------------ helpers

  static RealMatrix m(double[] a, int n) {
    return DistributionsTest.matrix(a, n);
  }

  static double[] flat(RealMatrix x) {
    return DistributionsTest.flat(x);
  }

  static double logNormal(double x, double mean, double var) {
    return new NormalDistribution(null, mean, Math.sqrt(var)).logDensity(x);
  }

  /** log Inv-Gamma(a, b) density (BDA3 appendix A), via commons-math3's log Gamma. */
  static double logInvGamma(double x, InvGamma p) {
    return p.shape() * Math.log(p.scale()) - Gamma.logGamma(p.shape())
        - (p.shape() + 1) * Math.log(x) - p.scale() / x;
  }

  /** log Inv-Wishart density up to a constant (BDA3 appendix A). */
  static double logInvWishartKernel(double[] v, InvWishart p) {
    int d = p.dim();
    LUDecomposition lu = new LUDecomposition(m(v, d));
    double tr = m(p.scale(), d).multiply(lu.getSolver().getInverse()).getTrace();
    return -0.5 * (p.df() + d + 1) * Math.log(lu.getDeterminant()) - 0.5 * tr;
  }

  static double gaussianKernel(Gaussian g, double[] x) {
    double[] q = g.precision();
    double[] b = g.linear();
    int n = g.dim();
    double s = 0;
    for (int i = 0; i < n; i++) {
      s += b[i] * x[i];
      for (int k = 0; k < n; k++) {
        s -= 0.5 * x[i] * q[i * n + k] * x[k];
      }
    }
    return s;
  }

  /** Raw log joint of the demand and price equations plus their priors, row by row. */
  static double logJointRows(Globals g, SimRows r, Priors p) {
    double s = 0;
    for (int t = 0; t < r.n; t++) {
      double zg = 0;
      for (int a = 0; a < r.kz; a++) {
        zg += r.z[t * r.kz + a] * g.gamma(a);
      }
      double cp = 0;
      for (int k = 0; k < r.kc; k++) {
        cp += r.c[t * r.kc + k] * g.pi(k);
      }
      double xi = r.y[t] - zg;
      s += logNormal(r.y[t], zg, g.sigmaXi2());
      s += logNormal(r.l[t], g.pi0(r.product[t]) + cp + g.lambda() * xi, g.sigmaP2());
    }
    for (int a = 0; a < r.kz; a++) {
      s += logNormal(g.gamma(a), p.gamma().mean(), p.gamma().var());
    }
    for (int j = 0; j < r.products; j++) {
      s += logNormal(g.pi0(j), p.pi0().mean(), p.pi0().var());
    }
    for (int k = 0; k < r.kc; k++) {
      s += logNormal(g.pi(k), p.pi().mean(), p.pi().var());
    }
    s += logNormal(g.lambda(), p.lambda().mean(), p.lambda().var());
    s += logInvGamma(g.sigmaXi2(), p.sigmaXi2()) + logInvGamma(g.sigmaP2(), p.sigmaP2());
    return s;
  }

  static void assertSameDifference(double jointDiff, double condDiff, String what) {
    assertEquals(jointDiff, condDiff, 1e-8 * Math.max(1.0, Math.abs(jointDiff)), what);
  }

  static void assertClose(double[] expected, double[] actual, double tol, String what) {
    assertEquals(expected.length, actual.length, what);
    for (int i = 0; i < expected.length; i++) {
      assertEquals(expected[i], actual[i], tol * Math.max(1.0, Math.abs(expected[i])), what + i);
    }
  }

  /** Posterior of a weighted regression with independent normal priors (BDA3 ch. 14). */
  static double[][] regressionPosterior(
      double[][] x, double[] target, double[] weight, double[] priorMean, double[] priorVar) {
    int k = priorMean.length;
    RealMatrix prec = new Array2DRowRealMatrix(k, k);
    RealVector rhs = new ArrayRealVector(k);
    for (int t = 0; t < x.length; t++) {
      for (int a = 0; a < k; a++) {
        rhs.addToEntry(a, weight[t] * x[t][a] * target[t]);
        for (int b = 0; b < k; b++) {
          prec.addToEntry(a, b, weight[t] * x[t][a] * x[t][b]);
        }
      }
    }
    for (int a = 0; a < k; a++) {
      prec.addToEntry(a, a, 1.0 / priorVar[a]);
      rhs.addToEntry(a, priorMean[a] / priorVar[a]);
    }
    RealMatrix cov = new LUDecomposition(prec).getSolver().getInverse();
    return new double[][] {cov.operate(rhs).toArray(), flat(cov)};
  }

  // ------------------------------------------------------------------ gamma

  // BDA3 ch. 14 (regression with known variances and a normal prior), on the stacked rows
  // y_t = z_t'gamma + xi_t (var sigma_xi^2) and u_t = -lambda z_t'gamma + e_t (var sigma_p^2).
  @Test
  void gammaConditional() {
    RegressionStats s = ROWS.stats();
    Globals g = CURRENT;
    int n = ROWS.n;
    double[][] x = new double[2 * n][];
    double[] target = new double[2 * n];
    double[] w = new double[2 * n];
    for (int t = 0; t < n; t++) {
      double[] z = {ROWS.z[t * KZ], ROWS.z[t * KZ + 1]};
      double cp = ROWS.c[t * KC] * g.pi(0) + ROWS.c[t * KC + 1] * g.pi(1);
      x[2 * t] = z;
      target[2 * t] = ROWS.y[t];
      w[2 * t] = 1.0 / g.sigmaXi2();
      x[2 * t + 1] = new double[] {-g.lambda() * z[0], -g.lambda() * z[1]};
      target[2 * t + 1] = ROWS.l[t] - g.pi0(ROWS.product[t]) - cp - g.lambda() * ROWS.y[t];
      w[2 * t + 1] = 1.0 / g.sigmaP2();
    }
    double[][] post =
        regressionPosterior(x, target, w, new double[] {0.3, 0.3}, new double[] {4.0, 4.0});
    Gaussian cond = GlobalGibbs.gammaConditional(g, s, PRIORS);
    assertClose(post[0], cond.mean(), 1e-9, "gamma mean ");
    assertClose(post[1], cond.covariance(), 1e-9, "gamma cov ");

    double[] g1 = {1.0, 0.2};
    double[] g2 = {-0.5, 0.8};
    assertSameDifference(
        logJointRows(g.withGamma(g1), ROWS, PRIORS) - logJointRows(g.withGamma(g2), ROWS, PRIORS),
        gaussianKernel(cond, g1) - gaussianKernel(cond, g2), "gamma log density");

    Well19937c rng = new Well19937c(31);
    double[][] draws = new double[N][];
    for (int i = 0; i < N; i++) {
      draws[i] = GlobalGibbs.drawGamma(g, s, PRIORS, rng).gamma();
    }
    McCheck.checkMoments(draws, post[0], post[1], "gamma draws");
  }

  // ------------------------------------------------------------------ (pi0, pi, lambda)

  // BDA3 ch. 14: regression of log p on [one-hot product, c, xi] with known sigma_p^2.
  @Test
  void priceEquationConditional() {
    RegressionStats s = ROWS.stats();
    Globals g = CURRENT;
    int n = ROWS.n;
    int k = J + KC + 1;
    double[][] x = new double[n][k];
    double[] w = new double[n];
    for (int t = 0; t < n; t++) {
      double xi = ROWS.y[t] - ROWS.z[t * KZ] * g.gamma(0) - ROWS.z[t * KZ + 1] * g.gamma(1);
      x[t][ROWS.product[t]] = 1.0;
      x[t][J] = ROWS.c[t * KC];
      x[t][J + 1] = ROWS.c[t * KC + 1];
      x[t][J + 2] = xi;
      w[t] = 1.0 / g.sigmaP2();
    }
    double[] pm = {0.5, 0.5, 0.5, 0.5, -0.2, -0.2, 0.1};
    double[] pv = {2, 2, 2, 2, 3, 3, 0.5};
    double[][] post = regressionPosterior(x, ROWS.l, w, pm, pv);
    Gaussian cond = GlobalGibbs.priceEquationConditional(g, s, PRIORS);
    assertClose(post[0], cond.mean(), 1e-9, "price mean ");
    assertClose(post[1], cond.covariance(), 1e-9, "price cov ");

    double[] v1 = {0.1, 0.2, 0.3, 0.4, 0.5, 0.6, 0.7};
    double[] v2 = {1.0, -0.2, 0.0, 0.9, -0.5, 0.1, -0.3};
    Globals a = g.withPriceEquation(new double[] {0.1, 0.2, 0.3, 0.4}, new double[] {0.5, 0.6}, 0.7);
    Globals b =
        g.withPriceEquation(new double[] {1.0, -0.2, 0.0, 0.9}, new double[] {-0.5, 0.1}, -0.3);
    assertSameDifference(
        logJointRows(a, ROWS, PRIORS) - logJointRows(b, ROWS, PRIORS),
        gaussianKernel(cond, v1) - gaussianKernel(cond, v2), "price log density");

    Well19937c rng = new Well19937c(32);
    double[][] draws = new double[N][];
    for (int i = 0; i < N; i++) {
      Globals d = GlobalGibbs.drawPriceEquation(g, s, PRIORS, rng);
      double[] row = new double[k];
      for (int j = 0; j < J; j++) {
        row[j] = d.pi0(j);
      }
      row[J] = d.pi(0);
      row[J + 1] = d.pi(1);
      row[J + 2] = d.lambda();
      draws[i] = row;
    }
    McCheck.checkMoments(draws, post[0], post[1], "price draws");
  }

  // BDA3 ch. 14: regression of (log p - lambda xi) on [one-hot product, c], lambda fixed.
  @Test
  void priceEquationWithFixedLambda() {
    RegressionStats s = ROWS.stats();
    Globals g = CURRENT;
    int n = ROWS.n;
    int k = J + KC;
    double[][] x = new double[n][k];
    double[] target = new double[n];
    double[] w = new double[n];
    for (int t = 0; t < n; t++) {
      double xi = ROWS.y[t] - ROWS.z[t * KZ] * g.gamma(0) - ROWS.z[t * KZ + 1] * g.gamma(1);
      x[t][ROWS.product[t]] = 1.0;
      x[t][J] = ROWS.c[t * KC];
      x[t][J + 1] = ROWS.c[t * KC + 1];
      target[t] = ROWS.l[t] - g.lambda() * xi;
      w[t] = 1.0 / g.sigmaP2();
    }
    double[][] post =
        regressionPosterior(
            x, target, w, new double[] {0.5, 0.5, 0.5, 0.5, -0.2, -0.2},
            new double[] {2, 2, 2, 2, 3, 3});
    Gaussian cond = GlobalGibbs.priceEquationFixedLambdaConditional(g, s, PRIORS);
    assertClose(post[0], cond.mean(), 1e-9, "fixed-lambda mean ");
    assertClose(post[1], cond.covariance(), 1e-9, "fixed-lambda cov ");

    GlobalStats all = new GlobalStats(DIMS);
    all.regression().merge(s);
    Globals d = GlobalGibbs.drawWithFixedLambda(g, all, PRIORS, new Well19937c(33), 0.0);
    assertEquals(0.0, d.lambda());
  }

  // ------------------------------------------------------------------ variances of the rows

  // BDA3 2.6: with known mean, Inv-Gamma(a0, b0) = Inv-chi^2(nu0 = 2 a0, s0^2 = b0/a0) and the
  // posterior is Inv-chi^2(nu0 + n, (nu0 s0^2 + sum r^2)/(nu0 + n)), with mean
  // nu_n s_n^2/(nu_n - 2) and variance 2 nu_n^2 s_n^4/((nu_n - 2)^2 (nu_n - 4)) (appendix A).
  static double[] scaledInvChiSquareMoments(InvGamma prior, double n, double ss) {
    double nu0 = 2 * prior.shape();
    double s02 = prior.scale() / prior.shape();
    double nun = nu0 + n;
    double sn2 = (nu0 * s02 + ss) / nun;
    return new double[] {
      nun * sn2 / (nun - 2), 2 * nun * nun * sn2 * sn2 / ((nun - 2) * (nun - 2) * (nun - 4))
    };
  }

  @Test
  void rowVarianceConditionals() {
    RegressionStats s = ROWS.stats();
    Globals g = CURRENT;
    double ssXi = 0;
    double ssE = 0;
    for (int t = 0; t < ROWS.n; t++) {
      double xi = ROWS.y[t] - ROWS.z[t * KZ] * g.gamma(0) - ROWS.z[t * KZ + 1] * g.gamma(1);
      double e = ROWS.l[t] - g.pi0(ROWS.product[t]) - ROWS.c[t * KC] * g.pi(0)
          - ROWS.c[t * KC + 1] * g.pi(1) - g.lambda() * xi;
      ssXi += xi * xi;
      ssE += e * e;
    }
    double[] xiMoments = scaledInvChiSquareMoments(PRIORS.sigmaXi2(), ROWS.n, ssXi);
    double[] pMoments = scaledInvChiSquareMoments(PRIORS.sigmaP2(), ROWS.n, ssE);
    InvGamma cx = GlobalGibbs.sigmaXi2Conditional(g, s, PRIORS);
    InvGamma cp = GlobalGibbs.sigmaP2Conditional(g, s, PRIORS);
    assertEquals(xiMoments[0], cx.mean(), 1e-10);
    assertEquals(xiMoments[1], cx.variance(), 1e-10);
    assertEquals(pMoments[0], cp.mean(), 1e-10);
    assertEquals(pMoments[1], cp.variance(), 1e-10);

    assertSameDifference(
        logJointRows(g.withSigmaXi2(0.3), ROWS, PRIORS)
            - logJointRows(g.withSigmaXi2(0.9), ROWS, PRIORS),
        logInvGamma(0.3, cx) - logInvGamma(0.9, cx), "sigma_xi2 log density");
    assertSameDifference(
        logJointRows(g.withSigmaP2(0.02), ROWS, PRIORS)
            - logJointRows(g.withSigmaP2(0.2), ROWS, PRIORS),
        logInvGamma(0.02, cp) - logInvGamma(0.2, cp), "sigma_p2 log density");

    Well19937c rng = new Well19937c(34);
    double[] dx = new double[N];
    double[] dp = new double[N];
    for (int i = 0; i < N; i++) {
      dx[i] = GlobalGibbs.drawSigmaXi2(g, s, PRIORS, rng).sigmaXi2();
      dp[i] = GlobalGibbs.drawSigmaP2(g, s, PRIORS, rng).sigmaP2();
    }
    McCheck.checkMoments(dx, xiMoments[0], xiMoments[1], "sigma_xi2 draws");
    McCheck.checkMoments(dp, pMoments[0], pMoments[1], "sigma_p2 draws");
  }

  // ------------------------------------------------------------------ intercept hierarchy

  private static final int[] STOCKED = {12, 5, 1, 0};

  private static double[][] intercepts() {
    Well19937c rng = new Well19937c(41);
    double[][] k = new double[J][];
    for (int j = 0; j < J; j++) {
      k[j] = new double[STOCKED[j]];
      for (int i = 0; i < STOCKED[j]; i++) {
        k[j][i] = j - 1.0 + 0.8 * rng.nextGaussian();
      }
    }
    return k;
  }

  static double logJointIntercepts(double[] kappabar, double tau2, double[][] k, Priors p) {
    double s = logInvGamma(tau2, p.tau2());
    for (int j = 0; j < J; j++) {
      s += logNormal(kappabar[j], p.kappabar().mean(), p.kappabar().var());
      for (double v : k[j]) {
        s += logNormal(v, kappabar[j], tau2);
      }
    }
    return s;
  }

  // BDA3 2.5 (normal mean, known variance): mu_n = (mu0/tau0^2 + n ybar/sigma^2) /
  // (1/tau0^2 + n/sigma^2), 1/tau_n^2 = 1/tau0^2 + n/sigma^2; a product with n = 0 keeps its prior.
  @Test
  void kappabarConditional() {
    double[][] k = intercepts();
    InterceptStats s = new InterceptStats(J);
    for (int j = 0; j < J; j++) {
      for (double v : k[j]) {
        s.add(j, v);
      }
    }
    double tau2 = CURRENT.tau2();
    double mu0 = 1.0;
    double tau02 = 9.0;
    double[] mean = new double[J];
    double[] var = new double[J];
    for (int j = 0; j < J; j++) {
      int n = k[j].length;
      double ybar = 0;
      for (double v : k[j]) {
        ybar += v / Math.max(n, 1);
      }
      var[j] = 1.0 / (1.0 / tau02 + n / tau2);
      mean[j] = (mu0 / tau02 + n * ybar / tau2) * var[j];
    }
    Normal[] cond = GlobalGibbs.kappabarConditional(tau2, s, PRIORS);
    for (int j = 0; j < J; j++) {
      assertEquals(mean[j], cond[j].mean(), 1e-12);
      assertEquals(var[j], cond[j].var(), 1e-12);
    }
    assertEquals(PRIORS.kappabar(), cond[3]);

    double[] a = {0.0, 1.0, 2.0, -1.0};
    double[] b = {-1.0, 0.5, 0.0, 3.0};
    double condDiff = 0;
    for (int j = 0; j < J; j++) {
      condDiff += logNormal(a[j], cond[j].mean(), cond[j].var())
          - logNormal(b[j], cond[j].mean(), cond[j].var());
    }
    assertSameDifference(
        logJointIntercepts(a, tau2, k, PRIORS) - logJointIntercepts(b, tau2, k, PRIORS), condDiff,
        "kappabar log density");

    Well19937c rng = new Well19937c(42);
    double[][] draws = new double[N][];
    for (int i = 0; i < N; i++) {
      draws[i] = GlobalGibbs.drawKappabar(CURRENT, s, PRIORS, rng).kappabar();
    }
    double[] cov = new double[J * J];
    for (int j = 0; j < J; j++) {
      cov[j * J + j] = var[j];
    }
    McCheck.checkMoments(draws, mean, cov, "kappabar draws");
  }

  // BDA3 2.6 (normal variance, known mean) in the scaled-inverse-chi^2 form.
  @Test
  void tau2Conditional() {
    double[][] k = intercepts();
    InterceptStats s = new InterceptStats(J);
    double ss = 0;
    int n = 0;
    for (int j = 0; j < J; j++) {
      for (double v : k[j]) {
        s.add(j, v);
        ss += (v - CURRENT.kappabar(j)) * (v - CURRENT.kappabar(j));
        n++;
      }
    }
    double[] mom = scaledInvChiSquareMoments(PRIORS.tau2(), n, ss);
    InvGamma cond = GlobalGibbs.tau2Conditional(CURRENT.kappabar(), s, PRIORS);
    assertEquals(mom[0], cond.mean(), 1e-12);
    assertEquals(mom[1], cond.variance(), 1e-12);
    double[] kb = CURRENT.kappabar();
    assertSameDifference(
        logJointIntercepts(kb, 0.4, k, PRIORS) - logJointIntercepts(kb, 1.7, k, PRIORS),
        logInvGamma(0.4, cond) - logInvGamma(1.7, cond), "tau2 log density");
    Well19937c rng = new Well19937c(43);
    double[] d = new double[N];
    for (int i = 0; i < N; i++) {
      d[i] = GlobalGibbs.drawTau2(CURRENT, s, PRIORS, rng).tau2();
    }
    McCheck.checkMoments(d, mom[0], mom[1], "tau2 draws");
  }

  // ------------------------------------------------------------------ store hierarchy

  private static final int STORES = 25;

  private static double[][][] stores() {
    Well19937c rng = new Well19937c(51);
    double[][][] out = new double[STORES][][];
    for (int s = 0; s < STORES; s++) {
      double[] d = {1.0, rng.nextGaussian()};
      double[] psi = {
        -0.5 + 0.3 * d[1] + 0.6 * rng.nextGaussian(), -1 + 0.5 * rng.nextGaussian(),
        -0.8 + 0.2 * d[1] + 0.5 * rng.nextGaussian()
      };
      out[s] = new double[][] {d, psi};
    }
    return out;
  }

  private static HierarchyStats hierarchyStats(double[][][] st) {
    HierarchyStats h = new HierarchyStats(KD, KPSI);
    for (double[][] s : st) {
      h.add(s[0], s[1]);
    }
    return h;
  }

  static double logJointStores(double[] gammaPsi, double[] v, double[][][] st, Priors p) {
    double s = logInvWishartKernel(v, p.vPsi());
    double[] pm = p.gammaPsiMean();
    double[] pv = p.gammaPsiVar();
    for (int i = 0; i < gammaPsi.length; i++) {
      s += logNormal(gammaPsi[i], pm[i], pv[i]);
    }
    double[][] cov = new double[KPSI][KPSI];
    for (int i = 0; i < KPSI; i++) {
      for (int k = 0; k < KPSI; k++) {
        cov[i][k] = v[i * KPSI + k];
      }
    }
    for (double[][] store : st) {
      double[] mean = new double[KPSI];
      for (int k = 0; k < KPSI; k++) {
        for (int r = 0; r < KD; r++) {
          mean[k] += gammaPsi[r * KPSI + k] * store[0][r];
        }
      }
      s += Math.log(new MultivariateNormalDistribution(null, mean, cov).density(store[1]));
    }
    return s;
  }

  // Generalised least squares with known data covariance (BDA3 14.7, from memory): stack
  // vec(Psi) (store-major), design X[(s,k), r*Kpsi + k] = d_s[r], data covariance block-diagonal
  // with V_psi per store; precision X' Sigma^-1 X + diag(1/priorVar). Built explicitly, without the
  // Kronecker shortcut the code uses.
  @Test
  void gammaPsiConditional() {
    double[][][] st = stores();
    HierarchyStats h = hierarchyStats(st);
    double[] v = CURRENT.vPsi();
    int rows = STORES * KPSI;
    int p = KD * KPSI;
    RealMatrix x = new Array2DRowRealMatrix(rows, p);
    RealVector psi = new ArrayRealVector(rows);
    RealMatrix sigmaInv = new Array2DRowRealMatrix(rows, rows);
    RealMatrix vInv = new LUDecomposition(m(v, KPSI)).getSolver().getInverse();
    for (int s = 0; s < STORES; s++) {
      for (int k = 0; k < KPSI; k++) {
        psi.setEntry(s * KPSI + k, st[s][1][k]);
        for (int r = 0; r < KD; r++) {
          x.setEntry(s * KPSI + k, r * KPSI + k, st[s][0][r]);
        }
        for (int k2 = 0; k2 < KPSI; k2++) {
          sigmaInv.setEntry(s * KPSI + k, s * KPSI + k2, vInv.getEntry(k, k2));
        }
      }
    }
    RealMatrix prec = x.transpose().multiply(sigmaInv).multiply(x);
    RealVector rhs = x.transpose().multiply(sigmaInv).operate(psi);
    double[] pm = PRIORS.gammaPsiMean();
    double[] pv = PRIORS.gammaPsiVar();
    for (int i = 0; i < p; i++) {
      prec.addToEntry(i, i, 1.0 / pv[i]);
      rhs.addToEntry(i, pm[i] / pv[i]);
    }
    RealMatrix cov = new LUDecomposition(prec).getSolver().getInverse();
    double[] mean = cov.operate(rhs).toArray();
    Gaussian cond = GlobalGibbs.gammaPsiConditional(v, h, PRIORS);
    assertClose(mean, cond.mean(), 1e-9, "Gamma mean ");
    assertClose(flat(cov), cond.covariance(), 1e-9, "Gamma cov ");

    double[] g1 = {0.1, -1.0, -0.5, 0.2, 0.0, 0.4};
    double[] g2 = {-0.4, -0.7, -1.2, 0.5, -0.1, 0.1};
    assertSameDifference(
        logJointStores(g1, v, st, PRIORS) - logJointStores(g2, v, st, PRIORS),
        gaussianKernel(cond, g1) - gaussianKernel(cond, g2), "Gamma log density");

    Well19937c rng = new Well19937c(52);
    double[][] draws = new double[N][];
    for (int i = 0; i < N; i++) {
      draws[i] = GlobalGibbs.drawGammaPsi(CURRENT, h, PRIORS, rng).gammaPsi();
    }
    McCheck.checkMoments(draws, mean, flat(cov), "Gamma draws");
  }

  // BDA3 3.6: with the mean known, V | psi ~ Inv-Wishart(nu0 + S, S0 + sum r r'), mean
  // (S0 + sum r r')/(nu0 + S - p - 1) (appendix A); residuals formed store by store.
  @Test
  void vPsiConditional() {
    double[][][] st = stores();
    HierarchyStats h = hierarchyStats(st);
    double[] gp = CURRENT.gammaPsi();
    double[] scale = PRIORS.vPsi().scale();
    for (double[][] s : st) {
      double[] r = new double[KPSI];
      for (int k = 0; k < KPSI; k++) {
        r[k] = s[1][k];
        for (int q = 0; q < KD; q++) {
          r[k] -= gp[q * KPSI + k] * s[0][q];
        }
      }
      for (int i = 0; i < KPSI; i++) {
        for (int k = 0; k < KPSI; k++) {
          scale[i * KPSI + k] += r[i] * r[k];
        }
      }
    }
    double df = PRIORS.vPsi().df() + STORES;
    InvWishart cond = GlobalGibbs.vPsiConditional(gp, h, PRIORS);
    assertEquals(df, cond.df(), 0.0);
    assertClose(scale, cond.scale(), 1e-11, "V scale ");

    double[] v1 = {0.5, 0.1, 0.0, 0.1, 0.4, -0.05, 0.0, -0.05, 0.3};
    double[] v2 = {0.3, 0.0, 0.05, 0.0, 0.2, 0.0, 0.05, 0.0, 0.6};
    assertSameDifference(
        logJointStores(gp, v1, st, PRIORS) - logJointStores(gp, v2, st, PRIORS),
        logInvWishartKernel(v1, cond) - logInvWishartKernel(v2, cond), "V log density");

    Well19937c rng = new Well19937c(53);
    double[][] draws = new double[N][];
    for (int i = 0; i < N; i++) {
      draws[i] = GlobalGibbs.drawVPsi(CURRENT, h, PRIORS, rng).vPsi();
    }
    for (int e = 0; e < KPSI * KPSI; e++) {
      double sum = 0;
      double sum2 = 0;
      for (double[] d : draws) {
        sum += d[e];
        sum2 += d[e] * d[e];
      }
      double mean = sum / N;
      double se = Math.sqrt((sum2 / N - mean * mean) / N);
      assertEquals(scale[e] / (df - KPSI - 1), mean, McCheck.Z * se, "V draws element " + e);
    }
  }
}
