package aislecast.core.globals;

import java.io.Serializable;
import java.util.Arrays;

/**
 * One value of the global parameters (DESIGN section 5): {@code Gamma} (Kd x Kpsi), {@code V_psi}
 * (Kpsi x Kpsi), {@code kappabar} (J), {@code tau2}, {@code gamma} (Kz), {@code sigma_xi2},
 * {@code pi0} (J), {@code pi} (Kc), {@code lambda}, {@code sigma_p2}.
 *
 * <p>Immutable: array accessors return copies, element accessors read in place, and the
 * {@code with...} methods return new values. Matrices are row-major ({@code Gamma[r][k]} at
 * {@code r*Kpsi + k}).
 *
 * <p>Flat layout ({@link #toFlat()}, {@link #parameterNames(Dims)}), length {@link
 * Dims#flatLength()}: Gamma row-major; V_psi lower triangle row by row (V00, V10, V11, V20, ...);
 * kappabar; tau2; gamma; sigma_xi2; pi0; pi; lambda; sigma_p2.
 */
public final class Globals implements Serializable {
  private static final long serialVersionUID = 1L;

  private final Dims dims;
  private final double[] gammaPsi;
  private final double[] vPsi;
  private final double[] kappabar;
  private final double tau2;
  private final double[] gamma;
  private final double sigmaXi2;
  private final double[] pi0;
  private final double[] pi;
  private final double lambda;
  private final double sigmaP2;

  /**
   * Validates and copies every array (none is modified). V_psi must be symmetric (to a relative
   * 1e-10; it is stored symmetrised) and positive definite; variances must be &gt; 0.
   */
  public Globals(
      Dims dims,
      double[] gammaPsi,
      double[] vPsi,
      double[] kappabar,
      double tau2,
      double[] gamma,
      double sigmaXi2,
      double[] pi0,
      double[] pi,
      double lambda,
      double sigmaP2) {
    if (dims == null) {
      throw new IllegalArgumentException("dims must be set");
    }
    this.dims = dims;
    int kpsi = dims.kpsi();
    Linalg.requireLength(gammaPsi, dims.kd() * kpsi, "Gamma");
    Linalg.requireLength(vPsi, kpsi * kpsi, "V_psi");
    Linalg.requireLength(kappabar, dims.products(), "kappabar");
    Linalg.requireLength(gamma, dims.kz(), "gamma");
    Linalg.requireLength(pi0, dims.products(), "pi0");
    Linalg.requireLength(pi, dims.kc(), "pi");
    Linalg.requireFinite(gammaPsi, "Gamma");
    Linalg.requireSymmetric(vPsi, kpsi, "V_psi");
    Linalg.requireFinite(kappabar, "kappabar");
    Linalg.requireFinite(gamma, "gamma");
    Linalg.requireFinite(pi0, "pi0");
    Linalg.requireFinite(pi, "pi");
    requirePositive(tau2, "tau2");
    requirePositive(sigmaXi2, "sigma_xi2");
    requirePositive(sigmaP2, "sigma_p2");
    if (!Double.isFinite(lambda)) {
      throw new IllegalArgumentException("lambda must be finite, got " + lambda);
    }
    this.gammaPsi = gammaPsi.clone();
    this.vPsi = vPsi.clone();
    Linalg.symmetrise(this.vPsi, kpsi);
    if (Linalg.choleskyLower(this.vPsi, kpsi) == null) {
      throw new IllegalArgumentException("V_psi is not positive definite");
    }
    this.kappabar = kappabar.clone();
    this.tau2 = tau2;
    this.gamma = gamma.clone();
    this.sigmaXi2 = sigmaXi2;
    this.pi0 = pi0.clone();
    this.pi = pi.clone();
    this.lambda = lambda;
    this.sigmaP2 = sigmaP2;
  }

  private static void requirePositive(double v, String what) {
    if (!(v > 0.0) || !Double.isFinite(v)) {
      throw new IllegalArgumentException(what + " must be finite and > 0, got " + v);
    }
  }

  public Dims dims() {
    return dims;
  }

  /** Copy of Gamma, Kd x Kpsi row-major. */
  public double[] gammaPsi() {
    return gammaPsi.clone();
  }

  public double gammaPsi(int r, int k) {
    return gammaPsi[r * dims.kpsi() + k];
  }

  /** Copy of V_psi, Kpsi x Kpsi row-major, symmetric. */
  public double[] vPsi() {
    return vPsi.clone();
  }

  public double vPsi(int i, int k) {
    return vPsi[i * dims.kpsi() + k];
  }

  public double[] kappabar() {
    return kappabar.clone();
  }

  public double kappabar(int j) {
    return kappabar[j];
  }

  public double tau2() {
    return tau2;
  }

  public double[] gamma() {
    return gamma.clone();
  }

  public double gamma(int k) {
    return gamma[k];
  }

  public double sigmaXi2() {
    return sigmaXi2;
  }

  public double[] pi0() {
    return pi0.clone();
  }

  public double pi0(int j) {
    return pi0[j];
  }

  public double[] pi() {
    return pi.clone();
  }

  public double pi(int k) {
    return pi[k];
  }

  public double lambda() {
    return lambda;
  }

  public double sigmaP2() {
    return sigmaP2;
  }

  public Globals withGammaPsi(double[] v) {
    return new Globals(dims, v, vPsi, kappabar, tau2, gamma, sigmaXi2, pi0, pi, lambda, sigmaP2);
  }

  public Globals withVPsi(double[] v) {
    return new Globals(
        dims, gammaPsi, v, kappabar, tau2, gamma, sigmaXi2, pi0, pi, lambda, sigmaP2);
  }

  public Globals withKappabar(double[] v) {
    return new Globals(dims, gammaPsi, vPsi, v, tau2, gamma, sigmaXi2, pi0, pi, lambda, sigmaP2);
  }

  public Globals withTau2(double v) {
    return new Globals(
        dims, gammaPsi, vPsi, kappabar, v, gamma, sigmaXi2, pi0, pi, lambda, sigmaP2);
  }

  public Globals withGamma(double[] v) {
    return new Globals(
        dims, gammaPsi, vPsi, kappabar, tau2, v, sigmaXi2, pi0, pi, lambda, sigmaP2);
  }

  public Globals withSigmaXi2(double v) {
    return new Globals(dims, gammaPsi, vPsi, kappabar, tau2, gamma, v, pi0, pi, lambda, sigmaP2);
  }

  /** Copy with a new price equation {@code (pi0, pi, lambda)}. */
  public Globals withPriceEquation(double[] newPi0, double[] newPi, double newLambda) {
    return new Globals(
        dims, gammaPsi, vPsi, kappabar, tau2, gamma, sigmaXi2, newPi0, newPi, newLambda, sigmaP2);
  }

  public Globals withSigmaP2(double v) {
    return new Globals(
        dims, gammaPsi, vPsi, kappabar, tau2, gamma, sigmaXi2, pi0, pi, lambda, v);
  }

  /** Flat copy in the layout of the class comment; new array. */
  public double[] toFlat() {
    double[] out = new double[dims.flatLength()];
    int p = 0;
    System.arraycopy(gammaPsi, 0, out, p, gammaPsi.length);
    p += gammaPsi.length;
    int kpsi = dims.kpsi();
    for (int i = 0; i < kpsi; i++) {
      for (int k = 0; k <= i; k++) {
        out[p++] = vPsi[i * kpsi + k];
      }
    }
    System.arraycopy(kappabar, 0, out, p, kappabar.length);
    p += kappabar.length;
    out[p++] = tau2;
    System.arraycopy(gamma, 0, out, p, gamma.length);
    p += gamma.length;
    out[p++] = sigmaXi2;
    System.arraycopy(pi0, 0, out, p, pi0.length);
    p += pi0.length;
    System.arraycopy(pi, 0, out, p, pi.length);
    p += pi.length;
    out[p++] = lambda;
    out[p] = sigmaP2;
    return out;
  }

  /** Inverse of {@link #toFlat()}; validates like the constructor. */
  public static Globals fromFlat(Dims dims, double[] flat) {
    Linalg.requireLength(flat, dims.flatLength(), "flat globals");
    int p = 0;
    int kpsi = dims.kpsi();
    double[] g = Arrays.copyOfRange(flat, p, p += dims.kd() * kpsi);
    double[] v = new double[kpsi * kpsi];
    for (int i = 0; i < kpsi; i++) {
      for (int k = 0; k <= i; k++) {
        v[i * kpsi + k] = flat[p];
        v[k * kpsi + i] = flat[p++];
      }
    }
    int j = dims.products();
    double[] kb = Arrays.copyOfRange(flat, p, p += j);
    double t2 = flat[p++];
    double[] gm = Arrays.copyOfRange(flat, p, p += dims.kz());
    double sx = flat[p++];
    double[] p0 = Arrays.copyOfRange(flat, p, p += j);
    double[] pc = Arrays.copyOfRange(flat, p, p += dims.kc());
    double lam = flat[p++];
    double sp = flat[p];
    return new Globals(dims, g, v, kb, t2, gm, sx, p0, pc, lam, sp);
  }

  /**
   * Names of the flat elements, in {@link #toFlat()} order: {@code Gamma[r,k]}, {@code V_psi[i,k]}
   * (i &ge; k), {@code kappabar[j]}, {@code tau2}, {@code gamma[k]}, {@code sigma_xi2},
   * {@code pi0[j]}, {@code pi[k]}, {@code lambda}, {@code sigma_p2}; indices are 0-based.
   */
  public static String[] parameterNames(Dims dims) {
    String[] out = new String[dims.flatLength()];
    int p = 0;
    for (int r = 0; r < dims.kd(); r++) {
      for (int k = 0; k < dims.kpsi(); k++) {
        out[p++] = "Gamma[" + r + "," + k + "]";
      }
    }
    for (int i = 0; i < dims.kpsi(); i++) {
      for (int k = 0; k <= i; k++) {
        out[p++] = "V_psi[" + i + "," + k + "]";
      }
    }
    for (int j = 0; j < dims.products(); j++) {
      out[p++] = "kappabar[" + j + "]";
    }
    out[p++] = "tau2";
    for (int k = 0; k < dims.kz(); k++) {
      out[p++] = "gamma[" + k + "]";
    }
    out[p++] = "sigma_xi2";
    for (int j = 0; j < dims.products(); j++) {
      out[p++] = "pi0[" + j + "]";
    }
    for (int k = 0; k < dims.kc(); k++) {
      out[p++] = "pi[" + k + "]";
    }
    out[p++] = "lambda";
    out[p] = "sigma_p2";
    return out;
  }

  @Override
  public boolean equals(Object o) {
    return o instanceof Globals g && dims.equals(g.dims) && Arrays.equals(toFlat(), g.toFlat());
  }

  @Override
  public int hashCode() {
    return 31 * dims.hashCode() + Arrays.hashCode(toFlat());
  }

  @Override
  public String toString() {
    return "Globals" + dims + Arrays.toString(toFlat());
  }
}
