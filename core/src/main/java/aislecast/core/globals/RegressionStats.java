package aislecast.core.globals;

import java.io.Serializable;
import java.util.Arrays;

/**
 * Mergeable sufficient statistics of the demand and price equations, one row per (market,
 * product): with {@code W = [z (Kz), one-hot product (J), c (Kc)]}, {@code y = delta - kappa_sj}
 * and {@code l = log p}, it holds {@code n, y'y, l'l, y'l, W'W, W'y, W'l}. Every quadratic form the
 * global conditionals need follows from these at any parameter value (see {@link GlobalGibbs}).
 *
 * <p>W'W is stored by blocks, skipping the product-product block's zero off-diagonal, so the size
 * grows linearly in J. Layout of the single flat array:
 *
 * <pre>
 *   [0] n   [1] y'y   [2] l'l   [3] y'l
 *   zz  packed lower Kz x Kz (row by row)     sum z z'
 *   jz  J x Kz row-major                      row j: sum of z over rows of product j
 *   jn  J                                     rows per product (diagonal of the one-hot block)
 *   jc  J x Kc row-major                      row j: sum of c over rows of product j
 *   cz  Kc x Kz row-major                     sum c z'
 *   cc  packed lower Kc x Kc                  sum c c'
 *   wy  Kz + J + Kc                           W'y
 *   wl  Kz + J + Kc                           W'l
 * </pre>
 *
 * {@link #merge} adds element by element (commutative exactly, associative up to rounding).
 */
public final class RegressionStats implements Serializable {
  private static final long serialVersionUID = 1L;

  private final int kz;
  private final int products;
  private final int kc;
  private final int width;
  private final int offZz;
  private final int offJz;
  private final int offJn;
  private final int offJc;
  private final int offCz;
  private final int offCc;
  private final int offWy;
  private final int offWl;
  private final double[] data;

  public RegressionStats(int kz, int products, int kc) {
    if (kz < 0 || products < 1 || kc < 0) {
      throw new IllegalArgumentException(
          "need kz >= 0, products >= 1, kc >= 0, got " + kz + ", " + products + ", " + kc);
    }
    this.kz = kz;
    this.products = products;
    this.kc = kc;
    this.width = kz + products + kc;
    this.offZz = 4;
    this.offJz = offZz + kz * (kz + 1) / 2;
    this.offJn = offJz + products * kz;
    this.offJc = offJn + products;
    this.offCz = offJc + products * kc;
    this.offCc = offCz + kc * kz;
    this.offWy = offCc + kc * (kc + 1) / 2;
    this.offWl = offWy + width;
    this.data = new double[offWl + width];
  }

  /**
   * Adds one row. Allocation-free.
   *
   * @param z demand shifters, elements {@code zOff .. zOff+Kz-1} read, not modified
   * @param j product index in [0, J)
   * @param c cost shifters, elements {@code cOff .. cOff+Kc-1} read, not modified
   * @param y {@code delta - kappa_sj}
   * @param logPrice {@code log p}
   */
  public void add(double[] z, int zOff, int j, double[] c, int cOff, double y, double logPrice) {
    if (j < 0 || j >= products) {
      throw new IllegalArgumentException("product index " + j + " outside [0, " + products + ")");
    }
    if (!Double.isFinite(y) || !Double.isFinite(logPrice)) {
      throw new IllegalArgumentException(
          "row of product " + j + " has a non-finite y or log price: " + y + ", " + logPrice);
    }
    for (int a = 0; a < kz; a++) {
      if (!Double.isFinite(z[zOff + a])) {
        throw new IllegalArgumentException("demand shifter " + a + " is not finite");
      }
    }
    for (int k = 0; k < kc; k++) {
      if (!Double.isFinite(c[cOff + k])) {
        throw new IllegalArgumentException("cost shifter " + k + " is not finite");
      }
    }
    double[] s = data;
    s[0] += 1.0;
    s[1] += y * y;
    s[2] += logPrice * logPrice;
    s[3] += y * logPrice;
    int p = offZz;
    for (int a = 0; a < kz; a++) {
      double za = z[zOff + a];
      for (int b = 0; b <= a; b++) {
        s[p++] += za * z[zOff + b];
      }
    }
    int jzRow = offJz + j * kz;
    for (int a = 0; a < kz; a++) {
      s[jzRow + a] += z[zOff + a];
    }
    s[offJn + j] += 1.0;
    int jcRow = offJc + j * kc;
    for (int k = 0; k < kc; k++) {
      s[jcRow + k] += c[cOff + k];
    }
    p = offCz;
    for (int k = 0; k < kc; k++) {
      double ck = c[cOff + k];
      for (int a = 0; a < kz; a++) {
        s[p++] += ck * z[zOff + a];
      }
    }
    p = offCc;
    for (int k = 0; k < kc; k++) {
      double ck = c[cOff + k];
      for (int m = 0; m <= k; m++) {
        s[p++] += ck * c[cOff + m];
      }
    }
    for (int a = 0; a < kz; a++) {
      s[offWy + a] += z[zOff + a] * y;
      s[offWl + a] += z[zOff + a] * logPrice;
    }
    s[offWy + kz + j] += y;
    s[offWl + kz + j] += logPrice;
    int cBase = kz + products;
    for (int k = 0; k < kc; k++) {
      s[offWy + cBase + k] += c[cOff + k] * y;
      s[offWl + cBase + k] += c[cOff + k] * logPrice;
    }
  }

  /** Adds {@code other} into this (other not modified); returns this. */
  public RegressionStats merge(RegressionStats other) {
    if (other.kz != kz || other.products != products || other.kc != kc) {
      throw new IllegalArgumentException("cannot merge regression statistics of other sizes");
    }
    for (int i = 0; i < data.length; i++) {
      data[i] += other.data[i];
    }
    return this;
  }

  public void reset() {
    Arrays.fill(data, 0.0);
  }

  public int kz() {
    return kz;
  }

  public int products() {
    return products;
  }

  public int kc() {
    return kc;
  }

  /** Width of W, {@code Kz + J + Kc}. */
  public int width() {
    return width;
  }

  public double n() {
    return data[0];
  }

  public double yy() {
    return data[1];
  }

  public double ll() {
    return data[2];
  }

  public double yl() {
    return data[3];
  }

  /** Element (a, b) of W'W, indices over {@code [z, products, c]}. */
  public double ww(int a, int b) {
    if (a < b) {
      int t = a;
      a = b;
      b = t;
    }
    if (a < kz) {
      return data[offZz + Linalg.packed(a, b)];
    }
    if (a < kz + products) {
      int j = a - kz;
      if (b < kz) {
        return data[offJz + j * kz + b];
      }
      return b == a ? data[offJn + j] : 0.0;
    }
    int k = a - kz - products;
    if (b < kz) {
      return data[offCz + k * kz + b];
    }
    if (b < kz + products) {
      return data[offJc + (b - kz) * kc + k];
    }
    return data[offCc + Linalg.packed(k, b - kz - products)];
  }

  /** Element a of W'y. */
  public double wy(int a) {
    return data[offWy + a];
  }

  /** Element a of W'l. */
  public double wl(int a) {
    return data[offWl + a];
  }

  /** {@code h' W'y}. */
  public double crossY(double[] h) {
    double s = 0.0;
    for (int a = 0; a < width; a++) {
      s += h[a] * data[offWy + a];
    }
    return s;
  }

  /** {@code h' W'l}. */
  public double crossL(double[] h) {
    double s = 0.0;
    for (int a = 0; a < width; a++) {
      s += h[a] * data[offWl + a];
    }
    return s;
  }

  /**
   * {@code h' W'W h} in O(Kz^2 + J (Kz + Kc) + Kc^2), using the block structure.
   *
   * @param h length {@link #width()}, not modified
   */
  public double quadraticForm(double[] h) {
    Linalg.requireLength(h, width, "h");
    double diag = 0.0;
    double off = 0.0;
    int p = offZz;
    for (int a = 0; a < kz; a++) {
      for (int b = 0; b < a; b++) {
        off += h[a] * h[b] * data[p++];
      }
      diag += h[a] * h[a] * data[p++];
    }
    for (int j = 0; j < products; j++) {
      double hj = h[kz + j];
      if (hj == 0.0) {
        continue;
      }
      diag += hj * hj * data[offJn + j];
      double sz = 0.0;
      for (int a = 0; a < kz; a++) {
        sz += data[offJz + j * kz + a] * h[a];
      }
      double sc = 0.0;
      for (int k = 0; k < kc; k++) {
        sc += data[offJc + j * kc + k] * h[kz + products + k];
      }
      off += hj * (sz + sc);
    }
    int cBase = kz + products;
    p = offCz;
    for (int k = 0; k < kc; k++) {
      double hk = h[cBase + k];
      for (int a = 0; a < kz; a++) {
        off += hk * h[a] * data[p++];
      }
    }
    p = offCc;
    for (int k = 0; k < kc; k++) {
      double hk = h[cBase + k];
      for (int m = 0; m < k; m++) {
        off += hk * h[cBase + m] * data[p++];
      }
      diag += hk * hk * data[p++];
    }
    return diag + 2.0 * off;
  }

  /** Copy of the flat array (layout in the class comment). */
  public double[] data() {
    return data.clone();
  }
}
