package aislecast.core.mcmc;

import java.io.Serializable;

/**
 * Running mean and variance per coordinate (Welford 1962; the update in Knuth, TAOCP vol. 2,
 * 4.2.2), used to adapt the diagonal mass matrix. Mutable, reusable: {@link #reset} restarts it.
 */
public final class Welford implements Serializable {
  private static final long serialVersionUID = 1L;
  private final double[] mean;
  private final double[] m2;
  private long n;

  public Welford(int dim) {
    this.mean = new double[dim];
    this.m2 = new double[dim];
  }

  public void add(double[] x) {
    n++;
    for (int i = 0; i < mean.length; i++) {
      double d = x[i] - mean[i];
      mean[i] += d / n;
      m2[i] += d * (x[i] - mean[i]);
    }
  }

  public long count() {
    return n;
  }

  /** Sample variance (n - 1) per coordinate into {@code out} (modified). */
  public void variance(double[] out) {
    for (int i = 0; i < mean.length; i++) {
      out[i] = n > 1 ? m2[i] / (n - 1) : Double.NaN;
    }
  }

  public void reset() {
    n = 0;
    java.util.Arrays.fill(mean, 0);
    java.util.Arrays.fill(m2, 0);
  }

  public Welford copy() {
    Welford w = new Welford(mean.length);
    System.arraycopy(mean, 0, w.mean, 0, mean.length);
    System.arraycopy(m2, 0, w.m2, 0, m2.length);
    w.n = n;
    return w;
  }
}
