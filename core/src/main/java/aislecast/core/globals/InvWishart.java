package aislecast.core.globals;

import java.io.Serializable;
import org.apache.commons.math3.distribution.ChiSquaredDistribution;
import org.apache.commons.math3.random.RandomGenerator;

/**
 * Inverse-Wishart distribution {@code Inv-Wishart(df, scale)} on p x p matrices, with density
 * proportional to {@code |V|^-(df+p+1)/2 exp(-tr(scale V^-1)/2)} and mean {@code scale/(df-p-1)}
 * (Gelman et al., Bayesian Data Analysis, 3rd ed., appendix A).
 *
 * <p>Construction of a draw: {@code V ~ Inv-Wishart(df, S)} iff {@code V^-1 ~ Wishart(df, S^-1)}.
 * By the Bartlett decomposition (Bartlett 1933; Smith and Hocking 1972, Applied Statistics
 * algorithm AS 53), {@code Wishart(df, Sigma) = K A A' K'} for any {@code K K' = Sigma}, with A
 * lower triangular, {@code A_ii^2 ~ chi-square(df - i)} (i = 0..p-1) and {@code A_ik ~ N(0,1)}
 * for i &gt; k, all independent. Take {@code S = U U'} (lower Cholesky) and {@code K = U'^-1},
 * so {@code K K' = S^-1}; then {@code V = (K A A' K')^-1 = (U A'^-1)(U A'^-1)'}, which needs only
 * the Cholesky factor of S and the inverse of the triangular A (no general matrix inverse).
 * Chi-square variates come from commons-math3's {@link ChiSquaredDistribution}.
 *
 * @param df degrees of freedom, &gt; p - 1
 * @param scale S, p x p row-major, symmetric positive definite
 * @param dim p, &ge; 1
 */
public record InvWishart(double df, double[] scale, int dim) implements Serializable {
  public InvWishart {
    if (dim < 1) {
      throw new IllegalArgumentException("inverse-Wishart dimension must be >= 1, got " + dim);
    }
    if (!(df > dim - 1) || !Double.isFinite(df)) {
      throw new IllegalArgumentException(
          "inverse-Wishart degrees of freedom must exceed dim - 1 = " + (dim - 1) + ", got " + df);
    }
    Linalg.requireLength(scale, dim * dim, "inverse-Wishart scale");
    Linalg.requireSymmetric(scale, dim, "inverse-Wishart scale");
    scale = scale.clone();
    Linalg.symmetrise(scale, dim);
    if (Linalg.choleskyLower(scale, dim) == null) {
      throw new IllegalArgumentException("inverse-Wishart scale is not positive definite");
    }
  }

  @Override
  public double[] scale() {
    return scale.clone();
  }

  /** Mean {@code scale/(df-p-1)}; requires df &gt; p + 1. New array. */
  public double[] mean() {
    if (!(df > dim + 1)) {
      throw new IllegalStateException("inverse-Wishart mean needs df > p + 1, got df = " + df);
    }
    double[] m = scale.clone();
    for (int i = 0; i < m.length; i++) {
      m[i] /= df - dim - 1;
    }
    return m;
  }

  /** One draw, using only {@code rng}; new symmetric p x p array. */
  public double[] sample(RandomGenerator rng) {
    int p = dim;
    double[] u = Linalg.choleskyLower(scale, p);
    double[] a = new double[p * p];
    for (int i = 0; i < p; i++) {
      a[i * p + i] = Math.sqrt(new ChiSquaredDistribution(rng, df - i).sample());
      for (int k = 0; k < i; k++) {
        a[i * p + k] = rng.nextGaussian();
      }
    }
    // ainv = A^-1 (lower); then M = U * ainv' (U lower, ainv' upper).
    double[] ainv = new double[p * p];
    double[] col = new double[p];
    for (int k = 0; k < p; k++) {
      java.util.Arrays.fill(col, 0.0);
      col[k] = 1.0;
      Linalg.solveLower(a, col, p);
      for (int i = 0; i < p; i++) {
        ainv[i * p + k] = col[i];
      }
    }
    double[] m = new double[p * p];
    for (int i = 0; i < p; i++) {
      for (int k = 0; k < p; k++) {
        double s = 0.0;
        // (U ainv')_ik = sum_m U_im ainv_km; both factors are lower triangular, so m <= min(i, k).
        int top = Math.min(i, k);
        for (int mm = 0; mm <= top; mm++) {
          s += u[i * p + mm] * ainv[k * p + mm];
        }
        m[i * p + k] = s;
      }
    }
    double[] v = new double[p * p];
    for (int i = 0; i < p; i++) {
      for (int k = 0; k <= i; k++) {
        double s = 0.0;
        for (int mm = 0; mm < p; mm++) {
          s += m[i * p + mm] * m[k * p + mm];
        }
        v[i * p + k] = s;
        v[k * p + i] = s;
      }
    }
    return v;
  }
}
