package aislecast.core.mcmc;

import java.io.Serializable;

/**
 * Running mean and variance, or full covariance, per coordinate (Welford 1962; the update in
 * Knuth, TAOCP vol. 2, 4.2.2, and its cross-product form for co-moments). Used to adapt the
 * local samplers' diagonal mass matrices (variances only: their dimension is in the hundreds) and
 * the ridge move's proposal (full covariance of a few coordinates). Mutable and reusable:
 * {@link #reset} restarts it.
 */
public final class Welford implements Serializable {
  private static final long serialVersionUID = 1L;
  private final int dim;
  private final boolean full;
  private final double[] mean;
  /** Sums of squared deviations: dim values, or dim x dim co-moments when full. */
  private final double[] m2;
  private final double[] dev;
  private long n;

  /** Variances only. */
  public Welford(int dim) {
    this(dim, false);
  }

  /** @param full keep the full covariance (dim x dim), not just the variances */
  public Welford(int dim, boolean full) {
    this.dim = dim;
    this.full = full;
    this.mean = new double[dim];
    this.m2 = new double[full ? dim * dim : dim];
    this.dev = new double[dim];
  }

  public void add(double[] x) {
    n++;
    for (int i = 0; i < dim; i++) {
      dev[i] = x[i] - mean[i];
      mean[i] += dev[i] / n;
    }
    if (full) {
      // co-moment update: C += (x - mean_old)(x - mean_new)'
      for (int i = 0; i < dim; i++) {
        for (int k = 0; k < dim; k++) {
          m2[i * dim + k] += dev[i] * (x[k] - mean[k]);
        }
      }
    } else {
      for (int i = 0; i < dim; i++) {
        m2[i] += dev[i] * (x[i] - mean[i]);
      }
    }
  }

  public long count() {
    return n;
  }

  /** Sample variance (n - 1) per coordinate into {@code out} (modified); NaN before 2 draws. */
  public void variance(double[] out) {
    for (int i = 0; i < dim; i++) {
      double s = full ? m2[i * dim + i] : m2[i];
      out[i] = n > 1 ? s / (n - 1) : Double.NaN;
    }
  }

  /** Sample covariance (n - 1), dim x dim row-major; new array. Needs {@code full}. */
  public double[] covariance() {
    if (!full) {
      throw new IllegalStateException("this accumulator keeps variances only");
    }
    double[] c = new double[dim * dim];
    for (int i = 0; i < c.length; i++) {
      c[i] = n > 1 ? m2[i] / (n - 1) : Double.NaN;
    }
    return c;
  }

  public void reset() {
    n = 0;
    java.util.Arrays.fill(mean, 0);
    java.util.Arrays.fill(m2, 0);
  }

  public Welford copy() {
    Welford w = new Welford(dim, full);
    System.arraycopy(mean, 0, w.mean, 0, mean.length);
    System.arraycopy(m2, 0, w.m2, 0, m2.length);
    w.n = n;
    return w;
  }
}
