package aislecast.core.globals;

import java.io.Serializable;
import org.apache.commons.math3.random.RandomGenerator;

/**
 * Multivariate normal in canonical form: density proportional to {@code exp(-x'Qx/2 + b'x)}, i.e.
 * mean {@code Q^-1 b} and covariance {@code Q^-1}. Conjugate normal conditionals come out in this
 * form directly (precision = prior precision + data precision, b = prior precision times prior
 * mean + data term), so no inverse is ever formed.
 *
 * <p>Sampling (Rue and Held 2005, Gaussian Markov Random Fields, algorithm 2.5): with
 * {@code Q = L L'}, {@code x = L'^-1 (L^-1 b + z)}, {@code z ~ N(0, I)}, which has mean
 * {@code L'^-1 L^-1 b = Q^-1 b} and covariance {@code L'^-1 L^-1 = Q^-1}.
 *
 * @param precision Q, dim x dim row-major, symmetric positive definite
 * @param linear b, length dim
 * @param dim dimension, &ge; 1
 */
public record Gaussian(double[] precision, double[] linear, int dim) implements Serializable {
  public Gaussian {
    if (dim < 1) {
      throw new IllegalArgumentException("Gaussian dimension must be >= 1, got " + dim);
    }
    Linalg.requireLength(precision, dim * dim, "precision");
    Linalg.requireLength(linear, dim, "linear term");
    Linalg.requireSymmetric(precision, dim, "precision");
    Linalg.requireFinite(linear, "linear term");
    precision = precision.clone();
    linear = linear.clone();
    Linalg.symmetrise(precision, dim);
  }

  @Override
  public double[] precision() {
    return precision.clone();
  }

  @Override
  public double[] linear() {
    return linear.clone();
  }

  /** The mean {@code Q^-1 b}; new array. */
  public double[] mean() {
    double[] l = factor();
    double[] m = linear.clone();
    Linalg.solveLower(l, m, dim);
    Linalg.solveLowerTransposed(l, m, dim);
    return m;
  }

  /** {@code log det Q}, from the Cholesky factor. */
  public double logDetPrecision() {
    double[] l = factor();
    double s = 0;
    for (int i = 0; i < dim; i++) {
      s += 2 * Math.log(l[i * dim + i]);
    }
    return s;
  }

  /**
   * Log density at the mean: {@code -dim/2 log(2 pi) + log det(Q) / 2}; the last term of Chib's
   * identity (log marginal = log likelihood + log prior - log posterior, at any point).
   */
  public double logDensityAtMean() {
    return -0.5 * dim * Math.log(2 * Math.PI) + 0.5 * logDetPrecision();
  }

  /** The covariance {@code Q^-1}; new dim x dim array. */
  public double[] covariance() {
    return Linalg.inverseFromCholesky(factor(), dim);
  }

  /** One draw, using only {@code rng} (dim standard normals); new array. */
  public double[] sample(RandomGenerator rng) {
    double[] l = factor();
    double[] x = linear.clone();
    Linalg.solveLower(l, x, dim);
    for (int i = 0; i < dim; i++) {
      x[i] += rng.nextGaussian();
    }
    Linalg.solveLowerTransposed(l, x, dim);
    return x;
  }

  private double[] factor() {
    double[] l = Linalg.choleskyLower(precision, dim);
    if (l == null) {
      throw new IllegalStateException(
          "conditional precision matrix (dimension " + dim + ") is not positive definite");
    }
    return l;
  }
}
