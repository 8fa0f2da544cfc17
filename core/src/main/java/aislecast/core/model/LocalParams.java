package aislecast.core.model;

import java.io.Serializable;
import org.ejml.data.DMatrixRMaj;
import org.ejml.dense.row.CommonOps_DDRM;
import org.ejml.dense.row.factory.DecompositionFactory_DDRM;
import org.ejml.interfaces.decomposition.CholeskyDecomposition_F64;

/**
 * The global values a store's local block depends on, in the form the local update needs them:
 * the hierarchy's mean coefficients and the Cholesky factor of {@code V_psi} (factored once per
 * sweep on the driver, then broadcast), intercept hierarchy, demand shifters and the price
 * equation.
 *
 * @param gammaPsi Gamma, Kd x Kpsi row-major: psi_s ~ N(Gamma' d_s, V_psi)
 * @param vPsiChol lower Cholesky factor of V_psi, Kpsi x Kpsi row-major
 * @param logDetVPsi log det V_psi
 * @param kappabar per catalog product
 * @param gamma demand-shifter effects, length Kz
 * @param pi0 price-equation intercept per catalog product
 * @param pi cost-shifter effects, length Kc
 */
public record LocalParams(
    int kpsi,
    double[] gammaPsi,
    double[] vPsiChol,
    double logDetVPsi,
    double[] kappabar,
    double tau2,
    double[] gamma,
    double sigmaXi2,
    double[] pi0,
    double[] pi,
    double lambda,
    double sigmaP2)
    implements Serializable {

  /**
   * Builds the local view from natural parameters; fails if V_psi is not positive definite.
   *
   * @param vPsi Kpsi x Kpsi row-major covariance, not modified
   */
  public static LocalParams of(int kpsi, double[] gammaPsi, double[] vPsi, double[] kappabar,
      double tau2, double[] gamma, double sigmaXi2, double[] pi0, double[] pi, double lambda,
      double sigmaP2) {
    DMatrixRMaj v = new DMatrixRMaj(kpsi, kpsi, true, vPsi);
    CholeskyDecomposition_F64<DMatrixRMaj> chol = DecompositionFactory_DDRM.chol(kpsi, true);
    if (!chol.decompose(v)) {
      throw new IllegalArgumentException("V_psi is not positive definite");
    }
    DMatrixRMaj l = chol.getT(null);
    double logDet = 0;
    for (int k = 0; k < kpsi; k++) {
      logDet += 2 * Math.log(l.get(k, k));
    }
    return new LocalParams(kpsi, gammaPsi.clone(), l.getData().clone(), logDet, kappabar.clone(),
        tau2, gamma.clone(), sigmaXi2, pi0.clone(), pi.clone(), lambda, sigmaP2);
  }

  /** Prior mean of psi for a store: Gamma' d. Output {@code out} (length Kpsi) is modified. */
  public void psiMean(double[] d, double[] out) {
    int kd = d.length;
    for (int k = 0; k < kpsi; k++) {
      double m = 0;
      for (int q = 0; q < kd; q++) {
        m += d[q] * gammaPsi[q * kpsi + k];
      }
      out[k] = m;
    }
  }

  /** V_psi = L L' (for reporting). */
  public double[] vPsi() {
    DMatrixRMaj l = new DMatrixRMaj(kpsi, kpsi, true, vPsiChol);
    DMatrixRMaj v = new DMatrixRMaj(kpsi, kpsi);
    CommonOps_DDRM.multTransB(l, l, v);
    return v.getData();
  }
}
