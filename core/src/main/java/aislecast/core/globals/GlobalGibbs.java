package aislecast.core.globals;

import org.apache.commons.math3.random.RandomGenerator;

/**
 * Driver-side Gibbs steps for the global parameters: pure functions of the current {@link
 * Globals}, the merged {@link GlobalStats}, the {@link Priors} and an explicit generator.
 *
 * <p>{@link #draw} runs the sub-steps in the fixed order Gamma, V_psi, kappabar, tau^2, gamma,
 * (pi0, pi, lambda), sigma_p^2, sigma_xi^2, each conditioning on the values drawn before it. Each
 * sub-step is also public on its own, and each conditional distribution is exposed ({@code
 * ...Conditional}) so it can be checked against its closed form.
 *
 * <p>Model (DESIGN section 4). Stores: {@code psi_s = Gamma' d_s + u_s, u_s ~ N(0, V_psi)}.
 * Intercepts: {@code kappa_sj ~ N(kappabar_j, tau^2)}. Rows t (market, product j), with
 * {@code y_t = delta_t - kappa_sj} and {@code l_t = log p_t}:
 *
 * <pre>
 *   y_t = z_t' gamma + xi_t,                          xi_t ~ N(0, sigma_xi^2)
 *   l_t = pi0_j + c_t' pi + lambda xi_t + e_t,        e_t  ~ N(0, sigma_p^2)
 * </pre>
 *
 * Writing {@code W_t = [z_t, one-hot j, c_t]} and, for a coefficient vector h over W,
 * {@code ||v - W h||^2 = v'v - 2 h'W'v + h'W'W h}, every sum of squares below is a function of
 * the statistics in {@link RegressionStats}.
 */
public final class GlobalGibbs {
  private GlobalGibbs() {}

  /**
   * One full global sweep. {@code current} is not modified; returns a new value.
   *
   * @param rng the only source of randomness
   */
  public static Globals draw(
      Globals current, GlobalStats stats, Priors priors, RandomGenerator rng) {
    checkDims(current, stats, priors);
    Globals g = drawGammaPsi(current, stats.hierarchy(), priors, rng);
    g = drawVPsi(g, stats.hierarchy(), priors, rng);
    g = drawKappabar(g, stats.intercepts(), priors, rng);
    g = drawTau2(g, stats.intercepts(), priors, rng);
    g = drawGamma(g, stats.regression(), priors, rng);
    g = drawPriceEquation(g, stats.regression(), priors, rng);
    g = drawSigmaP2(g, stats.regression(), priors, rng);
    return drawSigmaXi2(g, stats.regression(), priors, rng);
  }

  /**
   * One global sweep with lambda held at {@code lambda} (e.g. 0: prices treated as exogenous).
   * Same order as {@link #draw}, with the (pi0, pi, lambda) step replaced by (pi0, pi) given lambda
   * ({@link #priceEquationFixedLambdaConditional}). {@code current} is not modified.
   */
  public static Globals drawWithFixedLambda(
      Globals current, GlobalStats stats, Priors priors, RandomGenerator rng, double lambda) {
    checkDims(current, stats, priors);
    Globals g = current.withPriceEquation(current.pi0(), current.pi(), lambda);
    g = drawGammaPsi(g, stats.hierarchy(), priors, rng);
    g = drawVPsi(g, stats.hierarchy(), priors, rng);
    g = drawKappabar(g, stats.intercepts(), priors, rng);
    g = drawTau2(g, stats.intercepts(), priors, rng);
    g = drawGamma(g, stats.regression(), priors, rng);
    g = drawPriceEquationFixedLambda(g, stats.regression(), priors, rng);
    g = drawSigmaP2(g, stats.regression(), priors, rng);
    return drawSigmaXi2(g, stats.regression(), priors, rng);
  }

  private static void checkDims(Globals current, GlobalStats stats, Priors priors) {
    Dims d = current.dims();
    if (!d.equals(stats.dims())) {
      throw new IllegalArgumentException(
          "globals have " + d + " but statistics have " + stats.dims());
    }
    if (priors.kd() != d.kd() || priors.kpsi() != d.kpsi()) {
      throw new IllegalArgumentException(
          "priors are for Kd=" + priors.kd() + ", Kpsi=" + priors.kpsi() + " but globals have "
              + d);
    }
  }

  // ---------------------------------------------------------------- Gamma | V_psi, psi

  /**
   * {@code vec(Gamma) | V_psi, psi}. With {@code Q = V_psi^-1} the log likelihood is {@code -1/2
   * sum_s (psi_s - Gamma'd_s)' Q (psi_s - Gamma'd_s)}; its quadratic term in Gamma is {@code
   * sum_{r,r',k,k'} Gamma_rk Gamma_r'k' (D'D)_rr' Q_kk'} and its linear term {@code sum_{r,k}
   * Gamma_rk (D'Psi Q)_rk}. With the elements of Gamma ordered row-major ({@code r*Kpsi + k}), the
   * conditional is Gaussian with precision {@code kron(D'D, Q) + diag(1/priorVar)} and linear term
   * {@code vec_row(D'Psi Q) + priorMean/priorVar} (the multivariate-regression form of Gelman et
   * al., BDA3, sections 3.6 and 14.7, with V known).
   */
  public static Gaussian gammaPsiConditional(double[] vPsi, HierarchyStats s, Priors priors) {
    int kd = s.kd();
    int kpsi = s.kpsi();
    Linalg.requireLength(vPsi, kpsi * kpsi, "V_psi");
    double[] lv = Linalg.choleskyLower(vPsi, kpsi);
    if (lv == null) {
      throw new IllegalArgumentException("V_psi is not positive definite");
    }
    double[] q = Linalg.inverseFromCholesky(lv, kpsi);
    int n = kd * kpsi;
    double[] prec = new double[n * n];
    double[] lin = new double[n];
    double[] pm = priors.gammaPsiMean();
    double[] pv = priors.gammaPsiVar();
    for (int r = 0; r < kd; r++) {
      for (int k = 0; k < kpsi; k++) {
        int row = r * kpsi + k;
        for (int r2 = 0; r2 < kd; r2++) {
          double ddv = s.dd(r, r2);
          for (int k2 = 0; k2 < kpsi; k2++) {
            prec[row * n + r2 * kpsi + k2] = ddv * q[k * kpsi + k2];
          }
        }
        prec[row * n + row] += 1.0 / pv[row];
        double b = pm[row] / pv[row];
        for (int k2 = 0; k2 < kpsi; k2++) {
          b += s.dpsi(r, k2) * q[k2 * kpsi + k];
        }
        lin[row] = b;
      }
    }
    return new Gaussian(prec, lin, n);
  }

  /** Draws Gamma from {@link #gammaPsiConditional}. */
  public static Globals drawGammaPsi(
      Globals g, HierarchyStats s, Priors priors, RandomGenerator rng) {
    return g.withGammaPsi(gammaPsiConditional(g.vPsi(), s, priors).sample(rng));
  }

  // ---------------------------------------------------------------- V_psi | Gamma, psi

  /**
   * {@code V_psi | Gamma, psi ~ Inv-Wishart(nu0 + S, S0 + sum_s r_s r_s')} with residuals {@code
   * r_s = psi_s - Gamma'd_s} (normal model with known mean and Inverse-Wishart prior, Gelman et
   * al., BDA3, section 3.6); the scatter comes from {@link HierarchyStats#residualScatter}.
   */
  public static InvWishart vPsiConditional(double[] gammaPsi, HierarchyStats s, Priors priors) {
    int kpsi = s.kpsi();
    double[] scale = s.residualScatter(gammaPsi);
    double[] s0 = priors.vPsi().scale();
    for (int i = 0; i < scale.length; i++) {
      scale[i] += s0[i];
    }
    return new InvWishart(priors.vPsi().df() + s.count(), scale, kpsi);
  }

  /** Draws V_psi from {@link #vPsiConditional}. */
  public static Globals drawVPsi(Globals g, HierarchyStats s, Priors priors, RandomGenerator rng) {
    return g.withVPsi(vPsiConditional(g.gammaPsi(), s, priors).sample(rng));
  }

  // ---------------------------------------------------------------- kappabar | tau2, kappa

  /**
   * {@code kappabar_j | tau^2, kappa}: normal mean with known variance (Gelman et al., BDA3,
   * section 2.5): precision {@code 1/v0 + n_j/tau^2}, mean {@code (m0/v0 + sum_s kappa_sj/tau^2) /
   * precision}. A product with no stocked pair gets its prior.
   *
   * @return one conditional per product
   */
  public static Normal[] kappabarConditional(double tau2, InterceptStats s, Priors priors) {
    Normal prior = priors.kappabar();
    Normal[] out = new Normal[s.products()];
    for (int j = 0; j < out.length; j++) {
      double prec = 1.0 / prior.var() + s.count(j) / tau2;
      double mean = (prior.mean() / prior.var() + s.sum(j) / tau2) / prec;
      out[j] = new Normal(mean, 1.0 / prec);
    }
    return out;
  }

  /** Draws every kappabar_j from {@link #kappabarConditional}. */
  public static Globals drawKappabar(
      Globals g, InterceptStats s, Priors priors, RandomGenerator rng) {
    Normal[] c = kappabarConditional(g.tau2(), s, priors);
    double[] kb = new double[c.length];
    for (int j = 0; j < kb.length; j++) {
      kb[j] = c[j].sample(rng);
    }
    return g.withKappabar(kb);
  }

  // ---------------------------------------------------------------- tau2 | kappabar, kappa

  /**
   * {@code tau^2 | kappabar, kappa ~ Inv-Gamma(a0 + N/2, b0 + SS/2)} with {@code N = sum_j n_j}
   * and {@code SS = sum_j (sumsq_j - 2 kappabar_j sum_j + n_j kappabar_j^2)} (normal variance with
   * known mean, Gelman et al., BDA3, section 2.6, in the inverse-gamma parametrisation).
   */
  public static InvGamma tau2Conditional(double[] kappabar, InterceptStats s, Priors priors) {
    Linalg.requireLength(kappabar, s.products(), "kappabar");
    double n = 0.0;
    double ss = 0.0;
    for (int j = 0; j < kappabar.length; j++) {
      double kb = kappabar[j];
      n += s.count(j);
      ss += s.sumOfSquares(j) - 2.0 * kb * s.sum(j) + s.count(j) * kb * kb;
    }
    InvGamma prior = priors.tau2();
    return new InvGamma(prior.shape() + 0.5 * n, prior.scale() + 0.5 * ss);
  }

  /** Draws tau^2 from {@link #tau2Conditional}. */
  public static Globals drawTau2(Globals g, InterceptStats s, Priors priors, RandomGenerator rng) {
    return g.withTau2(tau2Conditional(g.kappabar(), s, priors).sample(rng));
  }

  // ---------------------------------------------------------------- gamma | rest

  /**
   * {@code gamma | rest}. gamma enters both equations: through {@code y = Z gamma + xi} and,
   * since {@code xi = y - Z gamma}, through the price equation as {@code u = -lambda Z gamma + e}
   * with {@code u_t = l_t - pi0_j - c_t'pi - lambda y_t}. Stacking the two as a regression with
   * known error variances (Gelman et al., BDA3, chapter 14, with a normal prior) gives a Gaussian
   * with precision {@code Z'Z (1/sigma_xi^2 + lambda^2/sigma_p^2) + I/v0} and linear term {@code
   * Z'y/sigma_xi^2 - lambda Z'u/sigma_p^2 + m0/v0}, where {@code Z'u = Z'l - lambda Z'y -
   * Z'X pi0 - Z'C pi} is read from W'W, W'y and W'l.
   *
   * @throws IllegalArgumentException if Kz = 0 (there is no gamma)
   */
  public static Gaussian gammaConditional(Globals g, RegressionStats s, Priors priors) {
    int kz = s.kz();
    if (kz == 0) {
      throw new IllegalArgumentException("no demand shifters: gamma has length 0");
    }
    int j = s.products();
    double lambda = g.lambda();
    double w = 1.0 / g.sigmaXi2() + lambda * lambda / g.sigmaP2();
    Normal prior = priors.gamma();
    double[] prec = new double[kz * kz];
    double[] lin = new double[kz];
    for (int a = 0; a < kz; a++) {
      for (int b = 0; b < kz; b++) {
        prec[a * kz + b] = w * s.ww(a, b);
      }
      prec[a * kz + a] += 1.0 / prior.var();
      double zu = s.wl(a) - lambda * s.wy(a);
      for (int p = 0; p < j; p++) {
        zu -= s.ww(a, kz + p) * g.pi0(p);
      }
      for (int k = 0; k < s.kc(); k++) {
        zu -= s.ww(a, kz + j + k) * g.pi(k);
      }
      lin[a] = s.wy(a) / g.sigmaXi2() - lambda * zu / g.sigmaP2() + prior.mean() / prior.var();
    }
    return new Gaussian(prec, lin, kz);
  }

  /** Draws gamma from {@link #gammaConditional}; a no-op when Kz = 0. */
  public static Globals drawGamma(
      Globals g, RegressionStats s, Priors priors, RandomGenerator rng) {
    if (s.kz() == 0) {
      return g;
    }
    return g.withGamma(gammaConditional(g, s, priors).sample(rng));
  }

  // ---------------------------------------------------------------- (pi0, pi, lambda) | rest

  /**
   * {@code (pi0, pi, lambda) | rest}: normal linear regression of {@code l} on {@code X2 = [one-hot
   * product, c, xi]} with known variance sigma_p^2 and independent normal priors (Gelman et al.,
   * BDA3, chapter 14): precision {@code X2'X2/sigma_p^2 + diag(1/v0)}, linear term {@code
   * X2'l/sigma_p^2 + diag(m0/v0)}. With {@code xi = y - Z gamma}: {@code X'xi = X'y - X'Z gamma}
   * for the product and c columns, {@code xi'xi = y'y - 2 gamma'Z'y + gamma'Z'Z gamma} and {@code
   * xi'l = y'l - gamma'Z'l}. Order of the result: pi0 (J), pi (Kc), lambda.
   */
  public static Gaussian priceEquationConditional(Globals g, RegressionStats s, Priors priors) {
    int kz = s.kz();
    int j = s.products();
    int kc = s.kc();
    int m = j + kc + 1;
    int last = m - 1;
    double sp2 = g.sigmaP2();
    double[] gamma = g.gamma();
    double[] prec = new double[m * m];
    double[] lin = new double[m];
    priceGram(s, last, m, sp2, prec);
    for (int i = 0; i < last; i++) {
      double xxi = crossXi(g, s, kz + i);
      prec[i * m + last] = xxi / sp2;
      prec[last * m + i] = xxi / sp2;
      lin[i] = s.wl(kz + i) / sp2;
    }
    double[] h = new double[s.width()];
    System.arraycopy(gamma, 0, h, 0, kz);
    double xixi = s.yy() - 2.0 * s.crossY(h) + s.quadraticForm(h);
    double xil = s.yl() - s.crossL(h);
    prec[last * m + last] = xixi / sp2;
    lin[last] = xil / sp2;
    for (int i = 0; i < m; i++) {
      Normal prior = i < j ? priors.pi0() : (i < last ? priors.pi() : priors.lambda());
      prec[i * m + i] += 1.0 / prior.var();
      lin[i] += prior.mean() / prior.var();
    }
    return new Gaussian(prec, lin, m);
  }

  /**
   * The product and cost-shifter block of the price equation's Gram matrix, {@code X'X /
   * sigma_p^2} for its first {@code n} columns, into {@code prec} (m x m, row-major, modified).
   */
  private static void priceGram(RegressionStats s, int n, int m, double sp2, double[] prec) {
    int kz = s.kz();
    for (int i = 0; i < n; i++) {
      for (int i2 = 0; i2 <= i; i2++) {
        double v = s.ww(kz + i, kz + i2) / sp2;
        prec[i * m + i2] = v;
        prec[i2 * m + i] = v;
      }
    }
  }

  /** {@code W_a' xi = W_a'y - W_a'Z gamma} for one column a of W. */
  private static double crossXi(Globals g, RegressionStats s, int a) {
    double v = s.wy(a);
    for (int b = 0; b < s.kz(); b++) {
      v -= s.ww(a, b) * g.gamma(b);
    }
    return v;
  }

  /** Draws (pi0, pi, lambda) jointly from {@link #priceEquationConditional}. */
  public static Globals drawPriceEquation(
      Globals g, RegressionStats s, Priors priors, RandomGenerator rng) {
    double[] x = priceEquationConditional(g, s, priors).sample(rng);
    int j = s.products();
    int kc = s.kc();
    double[] pi0 = java.util.Arrays.copyOfRange(x, 0, j);
    double[] pi = java.util.Arrays.copyOfRange(x, j, j + kc);
    return g.withPriceEquation(pi0, pi, x[j + kc]);
  }

  /**
   * {@code (pi0, pi) | rest} with lambda fixed at {@code g.lambda()}: normal linear regression of
   * {@code l - lambda xi} on {@code X = [one-hot product, c]} with known variance sigma_p^2 (Gelman
   * et al., BDA3, chapter 14): precision {@code X'X/sigma_p^2 + diag(1/v0)}, linear term {@code
   * X'(l - lambda xi)/sigma_p^2 + diag(m0/v0)}, with {@code X'xi = X'y - X'Z gamma}. Order of the
   * result: pi0 (J), pi (Kc).
   */
  public static Gaussian priceEquationFixedLambdaConditional(
      Globals g, RegressionStats s, Priors priors) {
    int kz = s.kz();
    int j = s.products();
    int m = j + s.kc();
    double sp2 = g.sigmaP2();
    double lambda = g.lambda();
    double[] prec = new double[m * m];
    double[] lin = new double[m];
    priceGram(s, m, m, sp2, prec);
    for (int i = 0; i < m; i++) {
      double xxi = crossXi(g, s, kz + i);
      Normal prior = i < j ? priors.pi0() : priors.pi();
      prec[i * m + i] += 1.0 / prior.var();
      lin[i] = (s.wl(kz + i) - lambda * xxi) / sp2 + prior.mean() / prior.var();
    }
    return new Gaussian(prec, lin, m);
  }

  /** Draws (pi0, pi) from {@link #priceEquationFixedLambdaConditional}; lambda unchanged. */
  public static Globals drawPriceEquationFixedLambda(
      Globals g, RegressionStats s, Priors priors, RandomGenerator rng) {
    double[] x = priceEquationFixedLambdaConditional(g, s, priors).sample(rng);
    int j = s.products();
    double[] pi0 = java.util.Arrays.copyOfRange(x, 0, j);
    double[] pi = java.util.Arrays.copyOfRange(x, j, j + s.kc());
    return g.withPriceEquation(pi0, pi, g.lambda());
  }

  // ---------------------------------------------------------------- sigma_p2 | rest

  /**
   * Sum of squared price-equation errors {@code e = l - pi0_j - c'pi - lambda xi}. Since {@code
   * e = (l - lambda y) - W h} with {@code h = (-lambda gamma, pi0, pi)}: {@code e'e = l'l -
   * 2 lambda y'l + lambda^2 y'y - 2 h'(W'l - lambda W'y) + h'W'W h}.
   */
  public static double priceResidualSquares(Globals g, RegressionStats s) {
    int kz = s.kz();
    int j = s.products();
    double lambda = g.lambda();
    double[] h = new double[s.width()];
    for (int a = 0; a < kz; a++) {
      h[a] = -lambda * g.gamma(a);
    }
    for (int p = 0; p < j; p++) {
      h[kz + p] = g.pi0(p);
    }
    for (int k = 0; k < s.kc(); k++) {
      h[kz + j + k] = g.pi(k);
    }
    return s.ll() - 2.0 * lambda * s.yl() + lambda * lambda * s.yy()
        - 2.0 * (s.crossL(h) - lambda * s.crossY(h)) + s.quadraticForm(h);
  }

  /**
   * {@code sigma_p^2 | rest ~ Inv-Gamma(a0 + n/2, b0 + e'e/2)} (Gelman et al., BDA3, section
   * 2.6), e'e from {@link #priceResidualSquares}.
   */
  public static InvGamma sigmaP2Conditional(Globals g, RegressionStats s, Priors priors) {
    InvGamma prior = priors.sigmaP2();
    return new InvGamma(
        prior.shape() + 0.5 * s.n(), prior.scale() + 0.5 * priceResidualSquares(g, s));
  }

  /** Draws sigma_p^2 from {@link #sigmaP2Conditional}. */
  public static Globals drawSigmaP2(
      Globals g, RegressionStats s, Priors priors, RandomGenerator rng) {
    return g.withSigmaP2(sigmaP2Conditional(g, s, priors).sample(rng));
  }

  // ---------------------------------------------------------------- sigma_xi2 | rest

  /** {@code xi'xi = y'y - 2 gamma'Z'y + gamma'Z'Z gamma}. */
  public static double demandResidualSquares(Globals g, RegressionStats s) {
    double[] h = new double[s.width()];
    for (int a = 0; a < s.kz(); a++) {
      h[a] = g.gamma(a);
    }
    return s.yy() - 2.0 * s.crossY(h) + s.quadraticForm(h);
  }

  /**
   * {@code sigma_xi^2 | rest ~ Inv-Gamma(a0 + n/2, b0 + xi'xi/2)}: given gamma (hence xi) only the
   * demand term {@code prod_t N(xi_t; 0, sigma_xi^2)} involves sigma_xi^2; the price equation
   * depends on xi, not on its variance (Gelman et al., BDA3, section 2.6).
   */
  public static InvGamma sigmaXi2Conditional(Globals g, RegressionStats s, Priors priors) {
    InvGamma prior = priors.sigmaXi2();
    return new InvGamma(
        prior.shape() + 0.5 * s.n(), prior.scale() + 0.5 * demandResidualSquares(g, s));
  }

  /** Draws sigma_xi^2 from {@link #sigmaXi2Conditional}. */
  public static Globals drawSigmaXi2(
      Globals g, RegressionStats s, Priors priors, RandomGenerator rng) {
    return g.withSigmaXi2(sigmaXi2Conditional(g, s, priors).sample(rng));
  }
}
