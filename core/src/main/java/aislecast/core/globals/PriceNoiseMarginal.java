package aislecast.core.globals;

import org.apache.commons.math3.random.RandomGenerator;
import org.ejml.data.DMatrixRMaj;
import org.ejml.dense.row.factory.DecompositionFactory_DDRM;
import org.ejml.interfaces.decomposition.EigenDecomposition_F64;

/**
 * The price equation with its coefficients {@code theta = (pi0, pi, lambda)} integrated out, as a
 * function of the price-noise variance {@code sigma_p^2}, given the demand shocks {@code xi} (the
 * locals and {@code gamma}); then {@code sigma_p^2} integrated out too, and drawn from what is
 * left. The ridge move uses the first integral so that {@code sigma_p^2} can follow a shift of
 * the locals, and the driver draws {@code sigma_p^2} from the second before {@code theta}.
 *
 * <p>With {@code y = X theta + e}, {@code e ~ N(0, s I)}, {@code theta ~ N(m0, V0)} ({@code V0}
 * diagonal): {@code y - X m0 ~ N(0, s I + X V0 X')}. With {@code W = V0^(1/2)}, {@code W X'X W =
 * Q diag(mu) Q'}, {@code b = X'(y - X m0)}, {@code c = Q' W b} and {@code S = |y - X m0|^2}, the
 * determinant lemma and the Woodbury identity give
 *
 * <pre>
 *   log p(y | s) = -(n/2) log(2 pi s) - (1/2) sum_i log(1 + mu_i / s)
 *                  - (1 / 2s) [S - sum_i c_i^2 / (s + mu_i)]
 * </pre>
 *
 * (Rasmussen and Williams 2006, Gaussian Processes for Machine Learning, A.3 and A.9), O(k) per
 * value of {@code s} after one k x k eigen-decomposition. The integral over {@code s} is a
 * trapezoid sum over {@code u = log s} on a grid around its mode (for a smooth integrand that
 * decays like a normal the trapezoid rule's error falls faster than any power of the spacing;
 * checked against commons-math3 Gauss-Legendre quadrature in the tests). The draw is exact for the
 * piecewise log-linear interpolant of a finer grid.
 */
public final class PriceNoiseMarginal {
  /**
   * Grid points over +-15 curvature scales around the mode: for the integral (spacing 0.1
   * scales; for an integrand that decays like a normal the trapezoid rule's relative error is
   * about {@code 2 exp(-2 pi^2 / h^2)} at spacing h, far below rounding here) and for the draw
   * (spacing 0.025 scales, so the log-linear interpolant is within about 1e-4 of the log density).
   */
  static final int GRID_INTEGRAL = 301;

  static final int GRID_DRAW = 1201;

  private static final double HALF_WIDTH = 15.0;

  private final double n;
  private final double[] mu;
  private final double[] c2;
  private final double sq;

  private PriceNoiseMarginal(double n, double[] mu, double[] c2, double sq) {
    this.n = n;
    this.mu = mu;
    this.c2 = c2;
    this.sq = sq;
  }

  /**
   * The price equation of {@code g}'s demand shocks ({@code gamma} from {@code g}); with {@code
   * fixedLambda}, {@code lambda} stays at {@code g.lambda()} and only (pi0, pi) are integrated.
   */
  public static PriceNoiseMarginal of(Globals g, RegressionStats s, Priors priors,
      boolean fixedLambda) {
    Globals unit = g.withSigmaP2(1.0);
    Gaussian at1 = fixedLambda
        ? GlobalGibbs.priceEquationFixedLambdaConditional(unit, s, priors)
        : GlobalGibbs.priceEquationConditional(unit, s, priors);
    int m = at1.dim();
    int j = s.products();
    int kc = s.kc();
    double[] m0 = new double[m];
    double[] v0 = new double[m];
    for (int i = 0; i < m; i++) {
      Normal prior = i < j ? priors.pi0() : (i < j + kc ? priors.pi() : priors.lambda());
      m0[i] = prior.mean();
      v0[i] = prior.var();
    }
    // with sigma_p^2 = 1 the conditional's precision is X'X + V0^-1 and its linear term
    // X'y + V0^-1 m0, so X'X and X'y come back out exactly
    double[] xx = at1.precision();
    double[] xy = at1.linear();
    for (int i = 0; i < m; i++) {
      xx[i * m + i] -= 1.0 / v0[i];
      xy[i] -= m0[i] / v0[i];
    }
    double yy = s.ll();
    if (fixedLambda) {
      double lambda = g.lambda();
      double xixi = GlobalGibbs.demandResidualSquares(g, s);
      double[] h = new double[s.width()];
      for (int a = 0; a < s.kz(); a++) {
        h[a] = g.gamma(a);
      }
      double xil = s.yl() - s.crossL(h);
      yy = s.ll() - 2 * lambda * xil + lambda * lambda * xixi;
    }
    double[] xxm = new double[m];
    for (int i = 0; i < m; i++) {
      double v = 0;
      for (int q = 0; q < m; q++) {
        v += xx[i * m + q] * m0[q];
      }
      xxm[i] = v;
    }
    double sq = yy;
    double[] b = new double[m];
    for (int i = 0; i < m; i++) {
      sq += -2 * m0[i] * xy[i] + m0[i] * xxm[i];
      b[i] = xy[i] - xxm[i];
    }
    DMatrixRMaj a = new DMatrixRMaj(m, m);
    for (int i = 0; i < m; i++) {
      for (int q = 0; q < m; q++) {
        a.set(i, q, Math.sqrt(v0[i]) * xx[i * m + q] * Math.sqrt(v0[q]));
      }
    }
    EigenDecomposition_F64<DMatrixRMaj> eig = DecompositionFactory_DDRM.eig(m, true, true);
    if (!eig.decompose(a)) {
      throw new IllegalStateException("eigen-decomposition of the price equation's Gram failed");
    }
    double[] mu = new double[m];
    double[] c2 = new double[m];
    for (int i = 0; i < m; i++) {
      mu[i] = Math.max(0.0, eig.getEigenvalue(i).getReal());
      DMatrixRMaj vec = eig.getEigenVector(i);
      double c = 0;
      for (int q = 0; q < m; q++) {
        c += vec.get(q) * Math.sqrt(v0[q]) * b[q];
      }
      c2[i] = c * c;
    }
    return new PriceNoiseMarginal(s.n(), mu, c2, sq);
  }

  /** {@code log p(y | sigma_p^2 = s)} with the coefficients integrated out. */
  public double logLikelihood(double s) {
    double logDet = 0;
    double fit = 0;
    for (int i = 0; i < mu.length; i++) {
      logDet += Math.log1p(mu[i] / s);
      fit += c2[i] / (s + mu[i]);
    }
    return -0.5 * n * Math.log(2 * Math.PI * s) - 0.5 * logDet - 0.5 * (sq - fit) / s;
  }

  /**
   * log of the integrand over {@code u = log sigma_p^2}: likelihood times the inverse-gamma prior
   * density of {@code s = e^u} times {@code ds/du = s}; {@code priorConstant = a log b - log
   * Gamma(a)}.
   */
  private double logIntegrand(double u, InvGamma prior, double priorConstant) {
    return logLikelihood(Math.exp(u)) + priorConstant - prior.shape() * u
        - prior.scale() * Math.exp(-u);
  }

  /** The grid of {@code u = log sigma_p^2} and the log integrand on it. */
  private double[][] grid(InvGamma prior, int points) {
    double c0 = prior.shape() * Math.log(prior.scale())
        - org.apache.commons.math3.special.Gamma.logGamma(prior.shape());
    // the grid only needs to sit near the mode with about the right width: Newton's method on
    // u with central differences, from the moment estimate, steps capped at 1, stopped within
    // 0.001 curvature scales (rounding in the differences allows no more)
    double u = Math.log(Math.max((sq + 2 * prior.scale()) / (n + 2 * prior.shape()), 1e-300));
    double h = 1e-3;
    double curv = Double.NaN;
    for (int it = 0; it < 50; it++) {
      double f0 = logIntegrand(u, prior, c0);
      double fp = logIntegrand(u + h, prior, c0);
      double fm = logIntegrand(u - h, prior, c0);
      double d1 = (fp - fm) / (2 * h);
      double d2 = (fp - 2 * f0 + fm) / (h * h);
      curv = d2;
      double step = d2 < 0 ? -d1 / d2 : Math.signum(d1) * 0.5;
      step = Math.max(-1.0, Math.min(1.0, step));
      u += step;
      if (d2 < 0 && Math.abs(step) < 1e-3 / Math.sqrt(-d2)) {
        break;
      }
    }
    double scale = curv < 0 ? 1.0 / Math.sqrt(-curv) : 1.0;
    double[] us = new double[points];
    double[] fs = new double[points];
    double du = 2 * HALF_WIDTH * scale / (points - 1);
    for (int k = 0; k < points; k++) {
      us[k] = u - HALF_WIDTH * scale + k * du;
      fs[k] = logIntegrand(us[k], prior, c0);
    }
    return new double[][] {us, fs};
  }

  /** {@code log int p(y | s) InvGamma(s; prior) ds}. */
  public double logMarginal(InvGamma prior) {
    double[][] gr = grid(prior, GRID_INTEGRAL);
    double[] f = gr[1];
    double max = Double.NEGATIVE_INFINITY;
    for (double v : f) {
      max = Math.max(max, v);
    }
    double sum = 0;
    for (int k = 0; k < f.length; k++) {
      double w = (k == 0 || k == f.length - 1) ? 0.5 : 1.0;
      sum += w * Math.exp(f[k] - max);
    }
    return max + Math.log(sum * (gr[0][1] - gr[0][0]));
  }

  /**
   * A draw of {@code sigma_p^2} from {@code p(s | y) ∝ p(y | s) InvGamma(s; prior)}: a cell of the
   * grid chosen by its mass under the piecewise log-linear interpolant, then {@code u} within
   * the cell by inverting that interpolant's exponential CDF.
   */
  public double draw(InvGamma prior, RandomGenerator rng) {
    return draws(prior, rng, 1)[0];
  }

  /** {@code count} independent draws as in {@link #draw}, sharing one grid. */
  double[] draws(InvGamma prior, RandomGenerator rng, int count) {
    double[][] gr = grid(prior, GRID_DRAW);
    double[] us = gr[0];
    double[] f = gr[1];
    double max = Double.NEGATIVE_INFINITY;
    for (double v : f) {
      max = Math.max(max, v);
    }
    double du = us[1] - us[0];
    double[] mass = new double[f.length - 1];
    double total = 0;
    for (int k = 0; k < mass.length; k++) {
      mass[k] = cellMass(f[k] - max, f[k + 1] - max, du);
      total += mass[k];
    }
    double[] out = new double[count];
    for (int i = 0; i < count; i++) {
      double pick = rng.nextDouble() * total;
      int k = 0;
      while (k < mass.length - 1 && pick >= mass[k]) {
        pick -= mass[k];
        k++;
      }
      double slope = (f[k + 1] - f[k]) / du;
      double v = rng.nextDouble();
      double t;
      if (Math.abs(slope * du) < 1e-12) {
        t = v * du;
      } else {
        // inverse CDF of the density proportional to exp(slope * t) on [0, du]
        t = Math.log1p(v * Math.expm1(slope * du)) / slope;
      }
      out[i] = Math.exp(us[k] + t);
    }
    return out;
  }

  /** {@code int_0^du exp(a + (b - a) t / du) dt}. */
  private static double cellMass(double a, double b, double du) {
    double d = b - a;
    if (Math.abs(d) < 1e-12) {
      return Math.exp(a) * du;
    }
    return du * (Math.exp(b) - Math.exp(a)) / d;
  }
}
