package aislecast.core.globals;

import java.io.Serializable;

/**
 * All mergeable statistics one sweep needs for the global draws: one {@link HierarchyStats}, one
 * {@link InterceptStats} and one {@link RegressionStats}. Built to be the zero value, sequence
 * operation ({@code add...}) and combine operation ({@link #merge}) of Spark's {@code
 * treeAggregate}: Serializable, flat arrays, merge in place.
 */
public final class GlobalStats implements Serializable {
  private static final long serialVersionUID = 1L;

  private final Dims dims;
  private final HierarchyStats hierarchy;
  private final InterceptStats intercepts;
  private final RegressionStats regression;

  public GlobalStats(Dims dims) {
    if (dims == null) {
      throw new IllegalArgumentException("dims must be set");
    }
    this.dims = dims;
    this.hierarchy = new HierarchyStats(dims.kd(), dims.kpsi());
    this.intercepts = new InterceptStats(dims.products());
    this.regression = new RegressionStats(dims.kz(), dims.products(), dims.kc());
  }

  public Dims dims() {
    return dims;
  }

  /** Adds one store's {@code d_s = (1, demographics)} and {@code psi_s}. */
  public GlobalStats addStore(double[] d, double[] psi) {
    hierarchy.add(d, psi);
    return this;
  }

  /** Adds one stocked store-product intercept. */
  public GlobalStats addIntercept(int j, double kappa) {
    intercepts.add(j, kappa);
    return this;
  }

  /** Adds one (market, product) row; see {@link RegressionStats#add}. */
  public GlobalStats addRow(
      double[] z, int zOff, int j, double[] c, int cOff, double y, double logPrice) {
    regression.add(z, zOff, j, c, cOff, y, logPrice);
    return this;
  }

  /** Adds {@code other} into this (other not modified); returns this. */
  public GlobalStats merge(GlobalStats other) {
    if (!dims.equals(other.dims)) {
      throw new IllegalArgumentException(
          "cannot merge statistics of " + other.dims + " into " + dims);
    }
    hierarchy.merge(other.hierarchy);
    intercepts.merge(other.intercepts);
    regression.merge(other.regression);
    return this;
  }

  public void reset() {
    hierarchy.reset();
    intercepts.reset();
    regression.reset();
  }

  /** The live hierarchy block (modifications show through). */
  public HierarchyStats hierarchy() {
    return hierarchy;
  }

  /** The live intercept block. */
  public InterceptStats intercepts() {
    return intercepts;
  }

  /** The live regression block. */
  public RegressionStats regression() {
    return regression;
  }
}
