package aislecast.core.globals;

import java.io.Serializable;
import java.util.Arrays;

/**
 * Mergeable sufficient statistics of the store-heterogeneity regression
 * {@code psi_s ~ N(Gamma' d_s, V_psi)}: the store count S, {@code sum d d'}, {@code sum d psi'} and
 * {@code sum psi psi'}, from which the residual scatter at any Gamma follows.
 *
 * <p>Layout of the single flat array: {@code [S, dd (packed lower Kd, row by row),
 * dpsi (Kd x Kpsi row-major), psipsi (packed lower Kpsi)]}. {@link #merge} adds element by element,
 * so it is commutative exactly and associative up to rounding.
 */
public final class HierarchyStats implements Serializable {
  private static final long serialVersionUID = 1L;

  private final int kd;
  private final int kpsi;
  private final int offDpsi;
  private final int offPsipsi;
  private final double[] data;

  public HierarchyStats(int kd, int kpsi) {
    if (kd < 1 || kpsi < 1) {
      throw new IllegalArgumentException("need kd >= 1 and kpsi >= 1, got " + kd + ", " + kpsi);
    }
    this.kd = kd;
    this.kpsi = kpsi;
    this.offDpsi = 1 + kd * (kd + 1) / 2;
    this.offPsipsi = offDpsi + kd * kpsi;
    this.data = new double[offPsipsi + kpsi * (kpsi + 1) / 2];
  }

  /**
   * Adds one store.
   *
   * @param d {@code (1, demographics)}, first Kd elements read, not modified
   * @param psi first Kpsi elements read, not modified
   */
  public void add(double[] d, double[] psi) {
    if (d.length < kd || psi.length < kpsi) {
      throw new IllegalArgumentException(
          "need d of length >= " + kd + " and psi of length >= " + kpsi + ", got " + d.length
              + ", " + psi.length);
    }
    for (int i = 0; i < kd; i++) {
      checkFinite(d[i], "d");
    }
    for (int i = 0; i < kpsi; i++) {
      checkFinite(psi[i], "psi");
    }
    data[0] += 1.0;
    int p = 1;
    for (int i = 0; i < kd; i++) {
      double di = d[i];
      for (int k = 0; k <= i; k++) {
        data[p++] += di * d[k];
      }
    }
    p = offDpsi;
    for (int i = 0; i < kd; i++) {
      double di = d[i];
      for (int k = 0; k < kpsi; k++) {
        data[p++] += di * psi[k];
      }
    }
    p = offPsipsi;
    for (int i = 0; i < kpsi; i++) {
      double pi = psi[i];
      for (int k = 0; k <= i; k++) {
        data[p++] += pi * psi[k];
      }
    }
  }

  private static void checkFinite(double v, String what) {
    if (!Double.isFinite(v)) {
      throw new IllegalArgumentException(what + " has a non-finite element: " + v);
    }
  }

  /** Adds {@code other} into this (other not modified); returns this. */
  public HierarchyStats merge(HierarchyStats other) {
    if (other.kd != kd || other.kpsi != kpsi) {
      throw new IllegalArgumentException("cannot merge hierarchy statistics of other sizes");
    }
    for (int i = 0; i < data.length; i++) {
      data[i] += other.data[i];
    }
    return this;
  }

  public void reset() {
    Arrays.fill(data, 0.0);
  }

  public int kd() {
    return kd;
  }

  public int kpsi() {
    return kpsi;
  }

  /** Number of stores S. */
  public double count() {
    return data[0];
  }

  /** Element (r, c) of {@code sum d d'}. */
  public double dd(int r, int c) {
    return r >= c ? data[1 + Linalg.packed(r, c)] : data[1 + Linalg.packed(c, r)];
  }

  /** Element (r, k) of {@code sum d psi'}. */
  public double dpsi(int r, int k) {
    return data[offDpsi + r * kpsi + k];
  }

  /** Element (i, k) of {@code sum psi psi'}. */
  public double psipsi(int i, int k) {
    return i >= k ? data[offPsipsi + Linalg.packed(i, k)] : data[offPsipsi + Linalg.packed(k, i)];
  }

  /** Copy of the flat array (layout in the class comment). */
  public double[] data() {
    return data.clone();
  }

  /**
   * Residual scatter {@code sum (psi - Gamma'd)(psi - Gamma'd)'
   * = sum psi psi' - Gamma' D'Psi - Psi'D Gamma + Gamma' D'D Gamma}.
   *
   * @param gammaPsi Kd x Kpsi row-major, not modified
   * @return new Kpsi x Kpsi row-major symmetric array
   */
  public double[] residualScatter(double[] gammaPsi) {
    Linalg.requireLength(gammaPsi, kd * kpsi, "Gamma");
    // ddg = D'D Gamma (Kd x Kpsi)
    double[] ddg = new double[kd * kpsi];
    for (int r = 0; r < kd; r++) {
      for (int k = 0; k < kpsi; k++) {
        double s = 0.0;
        for (int m = 0; m < kd; m++) {
          s += dd(r, m) * gammaPsi[m * kpsi + k];
        }
        ddg[r * kpsi + k] = s;
      }
    }
    double[] out = new double[kpsi * kpsi];
    for (int i = 0; i < kpsi; i++) {
      for (int k = 0; k <= i; k++) {
        double s = psipsi(i, k);
        for (int r = 0; r < kd; r++) {
          double gi = gammaPsi[r * kpsi + i];
          double gk = gammaPsi[r * kpsi + k];
          s += -gi * dpsi(r, k) - dpsi(r, i) * gk + gi * ddg[r * kpsi + k];
        }
        out[i * kpsi + k] = s;
        out[k * kpsi + i] = s;
      }
    }
    return out;
  }
}
