package aislecast.core.globals;

import aislecast.core.demand.Heterogeneity;
import java.io.Serializable;

/**
 * Priors of the global parameters (DESIGN section 4); every one is a setting.
 *
 * <p>Defaults ({@link #defaults}): Gamma elements independent normal, intercept row N(0, 10^2)
 * for the {@code a} component (index 0), N(-1, 1) for the log-scale components (indices 1 ..
 * 1+Kx: {@code log sigma, log L11 .. log LKK}), N(0, 10^2) for the off-diagonal components;
 * demographic rows N(0, 10^2). {@code V_psi ~ Inv-Wishart(nu0 = Kpsi + 3, 0.1 nu0 I)}.
 * {@code kappabar_j, gamma, pi0_j, pi, lambda}: N(0, 10^2) per component.
 * {@code tau^2, sigma_xi^2, sigma_p^2}: Inv-Gamma(shape 2, scale 0.5).
 *
 * @param kd rows of Gamma
 * @param kpsi columns of Gamma
 * @param gammaPsiMean prior means of Gamma, Kd x Kpsi row-major (element (r, k) at r*Kpsi + k)
 * @param gammaPsiVar prior variances of Gamma, same layout, all &gt; 0
 * @param vPsi prior of V_psi, dimension Kpsi
 * @param kappabar prior of each kappabar_j
 * @param tau2 prior of tau^2
 * @param gamma prior of each element of gamma
 * @param pi0 prior of each pi0_j
 * @param pi prior of each element of pi
 * @param lambda prior of lambda
 * @param sigmaXi2 prior of sigma_xi^2
 * @param sigmaP2 prior of sigma_p^2
 */
public record Priors(
    int kd,
    int kpsi,
    double[] gammaPsiMean,
    double[] gammaPsiVar,
    InvWishart vPsi,
    Normal kappabar,
    InvGamma tau2,
    Normal gamma,
    Normal pi0,
    Normal pi,
    Normal lambda,
    InvGamma sigmaXi2,
    InvGamma sigmaP2)
    implements Serializable {

  public Priors {
    if (kd < 1 || kpsi < 1) {
      throw new IllegalArgumentException("need kd >= 1 and kpsi >= 1, got " + kd + ", " + kpsi);
    }
    Linalg.requireLength(gammaPsiMean, kd * kpsi, "Gamma prior mean");
    Linalg.requireLength(gammaPsiVar, kd * kpsi, "Gamma prior variance");
    Linalg.requireFinite(gammaPsiMean, "Gamma prior mean");
    for (int i = 0; i < gammaPsiVar.length; i++) {
      if (!(gammaPsiVar[i] > 0.0) || !Double.isFinite(gammaPsiVar[i])) {
        throw new IllegalArgumentException(
            "Gamma prior variance[" + i + "] must be finite and > 0, got " + gammaPsiVar[i]);
      }
    }
    if (vPsi == null || vPsi.dim() != kpsi) {
      throw new IllegalArgumentException(
          "V_psi prior must be an inverse-Wishart of dimension " + kpsi);
    }
    if (kappabar == null || tau2 == null || gamma == null || pi0 == null || pi == null
        || lambda == null || sigmaXi2 == null || sigmaP2 == null) {
      throw new IllegalArgumentException("every prior must be set (one is null)");
    }
    gammaPsiMean = gammaPsiMean.clone();
    gammaPsiVar = gammaPsiVar.clone();
  }

  @Override
  public double[] gammaPsiMean() {
    return gammaPsiMean.clone();
  }

  @Override
  public double[] gammaPsiVar() {
    return gammaPsiVar.clone();
  }

  /**
   * The documented defaults for {@code kd} rows of Gamma and {@code kx} product attributes
   * ({@code Kpsi = 2 + Kx + Kx(Kx-1)/2}, layout of {@link Heterogeneity}).
   */
  public static Priors defaults(int kd, int kx) {
    if (kd < 1 || kx < 0) {
      throw new IllegalArgumentException("need kd >= 1 and kx >= 0, got " + kd + ", " + kx);
    }
    int kpsi = Heterogeneity.dim(kx);
    double[] mean = new double[kd * kpsi];
    double[] var = new double[kd * kpsi];
    java.util.Arrays.fill(var, 100.0);
    // Log-scale components of the intercept row: N(-1, 1) keeps the posterior off the flat
    // "no heterogeneity" tail (DESIGN section 4).
    for (int k = 1; k <= 1 + kx; k++) {
      mean[k] = -1.0;
      var[k] = 1.0;
    }
    double nu0 = kpsi + 3;
    double[] s0 = new double[kpsi * kpsi];
    for (int i = 0; i < kpsi; i++) {
      s0[i * kpsi + i] = 0.1 * nu0;
    }
    Normal wide = new Normal(0.0, 100.0);
    InvGamma variance = new InvGamma(2.0, 0.5);
    return new Priors(
        kd, kpsi, mean, var, new InvWishart(nu0, s0, kpsi), wide, variance, wide, wide, wide, wide,
        variance, variance);
  }

  /** Copy with another V_psi prior. */
  public Priors withVPsi(InvWishart prior) {
    return new Priors(
        kd, kpsi, gammaPsiMean, gammaPsiVar, prior, kappabar, tau2, gamma, pi0, pi, lambda,
        sigmaXi2, sigmaP2);
  }

  /** Copy with other Gamma prior means and variances (Kd x Kpsi row-major). */
  public Priors withGammaPsi(double[] mean, double[] var) {
    return new Priors(
        kd, kpsi, mean, var, vPsi, kappabar, tau2, gamma, pi0, pi, lambda, sigmaXi2, sigmaP2);
  }
}
