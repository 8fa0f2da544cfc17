package aislecast.core.model;

import java.util.List;

/** Public view of the outside reference set for tests in other packages (truth point A). */
public final class ReferenceFixtures {
  private final ReferenceSet ref;
  private final ReferenceSet.Point point;

  private ReferenceFixtures(ReferenceSet ref) {
    this.ref = ref;
    this.point = ref.new Point("A_truth");
  }

  public static ReferenceFixtures load() throws java.io.IOException {
    return new ReferenceFixtures(new ReferenceSet());
  }

  public List<StoreData> stores() {
    return ref.stores;
  }

  public ProductCatalog catalog() {
    return ref.catalog;
  }

  public double[] x() {
    return ref.catalog.x();
  }

  public int kx() {
    return ref.catalog.attributes();
  }

  public LocalParams params() {
    return point.params;
  }

  public double[] psi(StoreData d) {
    return point.psi.get(d.storeId).clone();
  }

  public double[] kappa(StoreData d) {
    return point.kappa.get(d.storeId).clone();
  }

  public double[] delta(StoreData d) {
    return point.delta.get(d.storeId).clone();
  }

  /** [psi, kappa, delta] at the true point. */
  public double[] position(StoreData d) {
    double[] psi = psi(d);
    double[] kappa = kappa(d);
    double[] delta = delta(d);
    double[] pos = new double[psi.length + kappa.length + delta.length];
    System.arraycopy(psi, 0, pos, 0, psi.length);
    System.arraycopy(kappa, 0, pos, psi.length, kappa.length);
    System.arraycopy(delta, 0, pos, psi.length + kappa.length, delta.length);
    return pos;
  }
}
