package aislecast.core.model;

import java.io.Serializable;
import java.util.Arrays;

/**
 * The products of a run, in a fixed order (sorted ids), with their owners and standardised
 * attributes {@code x} (J x Kx, row-major): each attribute minus its mean over products, divided
 * by its standard deviation with n - 1 (DESIGN section 4 data conventions).
 */
public final class ProductCatalog implements Serializable {
  private static final long serialVersionUID = 1L;

  private final String[] ids;
  private final String[] owners;
  private final String[] attributeNames;
  private final double[] x;
  private final double[] rawMean;
  private final double[] rawSd;

  /**
   * @param ids product ids, in the order used everywhere in the run; not modified
   * @param owners owner per product; not modified
   * @param attributeNames attribute column names
   * @param raw raw attribute values J x Kx row-major; not modified
   */
  public ProductCatalog(String[] ids, String[] owners, String[] attributeNames, double[] raw) {
    int j = ids.length;
    int kx = attributeNames.length;
    if (owners.length != j || raw.length != j * kx) {
      throw new IllegalArgumentException("catalog arrays disagree in size");
    }
    this.ids = ids.clone();
    this.owners = owners.clone();
    this.attributeNames = attributeNames.clone();
    this.rawMean = new double[kx];
    this.rawSd = new double[kx];
    this.x = new double[j * kx];
    for (int k = 0; k < kx; k++) {
      double m = 0;
      for (int p = 0; p < j; p++) {
        m += raw[p * kx + k];
      }
      m /= j;
      double ss = 0;
      for (int p = 0; p < j; p++) {
        double d = raw[p * kx + k] - m;
        ss += d * d;
      }
      double sd = j > 1 ? Math.sqrt(ss / (j - 1)) : 0.0;
      if (!(sd > 0)) {
        throw new IllegalArgumentException(
            "attribute " + attributeNames[k] + " does not vary over products; drop it");
      }
      rawMean[k] = m;
      rawSd[k] = sd;
      for (int p = 0; p < j; p++) {
        x[p * kx + k] = (raw[p * kx + k] - m) / sd;
      }
    }
  }

  public int size() {
    return ids.length;
  }

  public int attributes() {
    return attributeNames.length;
  }

  public String id(int p) {
    return ids[p];
  }

  public String owner(int p) {
    return owners[p];
  }

  public int indexOf(String id) {
    for (int p = 0; p < ids.length; p++) {
      if (ids[p].equals(id)) {
        return p;
      }
    }
    return -1;
  }

  public String[] attributeNames() {
    return attributeNames.clone();
  }

  /** Standardised attributes J x Kx; do not modify. */
  public double[] x() {
    return x;
  }

  public double[] rawMean() {
    return rawMean.clone();
  }

  public double[] rawSd() {
    return rawSd.clone();
  }

  @Override
  public String toString() {
    return "ProductCatalog" + Arrays.toString(ids);
  }
}
