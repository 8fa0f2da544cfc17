package aislecast.core.model;

import org.apache.commons.math3.special.Gamma;
import org.ejml.data.DMatrixRMaj;
import org.ejml.dense.row.CommonOps_DDRM;

/**
 * Log densities of the conjugate priors, with all normalising constants (forms as in Gelman et
 * al., Bayesian Data Analysis, 3rd ed., appendix A).
 */
public final class PriorDensity {
  private PriorDensity() {}

  /** Sum of log N(y_i | mean, var) over the components of y. */
  public static double normals(double[] y, double mean, double var) {
    double s = 0;
    for (double v : y) {
      s += StoreDensity.normal(v, mean, var);
    }
    return s;
  }

  /** log Inv-Gamma(x | shape a, scale b) = a log b - log Gamma(a) - (a+1) log x - b / x. */
  public static double invGamma(double x, double shape, double scale) {
    return shape * Math.log(scale) - Gamma.logGamma(shape) - (shape + 1) * Math.log(x) - scale / x;
  }

  /**
   * log Inv-Wishart(V | nu, S) for p x p matrices (row-major):
   * {@code (nu/2) log|S| - (nu p/2) log 2 - log Gamma_p(nu/2) - ((nu+p+1)/2) log|V|
   * - tr(S V^-1)/2}.
   */
  public static double invWishart(double[] v, double nu, double[] s, int p) {
    DMatrixRMaj vm = new DMatrixRMaj(p, p, true, v);
    DMatrixRMaj sm = new DMatrixRMaj(p, p, true, s);
    DMatrixRMaj vinv = new DMatrixRMaj(p, p);
    if (!CommonOps_DDRM.invertSPD(vm.copy(), vinv)) {
      throw new IllegalArgumentException("V is not positive definite");
    }
    DMatrixRMaj prod = new DMatrixRMaj(p, p);
    CommonOps_DDRM.mult(sm, vinv, prod);
    double tr = CommonOps_DDRM.trace(prod);
    double logDetS = Math.log(CommonOps_DDRM.det(sm));
    double logDetV = Math.log(CommonOps_DDRM.det(vm));
    return 0.5 * nu * logDetS - 0.5 * nu * p * Math.log(2) - logMultivariateGamma(p, 0.5 * nu)
        - 0.5 * (nu + p + 1) * logDetV - 0.5 * tr;
  }

  /** log Gamma_p(a) = p(p-1)/4 log pi + sum_{j=1..p} log Gamma(a + (1-j)/2). */
  public static double logMultivariateGamma(int p, double a) {
    double s = 0.25 * p * (p - 1) * Math.log(Math.PI);
    for (int j = 1; j <= p; j++) {
      s += Gamma.logGamma(a + 0.5 * (1 - j));
    }
    return s;
  }
}
