package aislecast.core.globals;

import java.io.Serializable;
import java.util.Arrays;

/**
 * Mergeable sufficient statistics of the intercept hierarchy {@code kappa_sj ~ N(kappabar_j,
 * tau^2)} over stocked store-product pairs: per product the count n_j, {@code sum kappa_sj} and
 * {@code sum kappa_sj^2}.
 *
 * <p>Layout of the single flat array: {@code [n (J), sum (J), sum of squares (J)]}.
 */
public final class InterceptStats implements Serializable {
  private static final long serialVersionUID = 1L;

  private final int products;
  private final double[] data;

  public InterceptStats(int products) {
    if (products < 1) {
      throw new IllegalArgumentException("need products >= 1, got " + products);
    }
    this.products = products;
    this.data = new double[3 * products];
  }

  /** Adds one stocked store-product intercept {@code kappa_sj}. */
  public void add(int j, double kappa) {
    if (j < 0 || j >= products) {
      throw new IllegalArgumentException("product index " + j + " outside [0, " + products + ")");
    }
    if (!Double.isFinite(kappa)) {
      throw new IllegalArgumentException("kappa for product " + j + " is not finite: " + kappa);
    }
    data[j] += 1.0;
    data[products + j] += kappa;
    data[2 * products + j] += kappa * kappa;
  }

  /** Adds {@code other} into this (other not modified); returns this. */
  public InterceptStats merge(InterceptStats other) {
    if (other.products != products) {
      throw new IllegalArgumentException("cannot merge intercept statistics of other sizes");
    }
    for (int i = 0; i < data.length; i++) {
      data[i] += other.data[i];
    }
    return this;
  }

  public void reset() {
    Arrays.fill(data, 0.0);
  }

  public int products() {
    return products;
  }

  public double count(int j) {
    return data[j];
  }

  public double sum(int j) {
    return data[products + j];
  }

  public double sumOfSquares(int j) {
    return data[2 * products + j];
  }

  /** Copy of the flat array (layout in the class comment). */
  public double[] data() {
    return data.clone();
  }
}
