package aislecast.core.globals;

import java.io.Serializable;

/**
 * Sizes of the global blocks.
 *
 * @param kd length of {@code d_s = (1, demographics)}, &ge; 1
 * @param kpsi length of {@code psi_s}, &ge; 1
 * @param products number of products J, &ge; 1
 * @param kz number of demand shifters z (length of gamma), &ge; 0
 * @param kc number of cost shifters c (length of pi), &ge; 0
 */
public record Dims(int kd, int kpsi, int products, int kz, int kc) implements Serializable {
  public Dims {
    if (kd < 1 || kpsi < 1 || products < 1 || kz < 0 || kc < 0) {
      throw new IllegalArgumentException(
          "need kd >= 1, kpsi >= 1, products >= 1, kz >= 0, kc >= 0; got kd=" + kd + ", kpsi="
              + kpsi + ", products=" + products + ", kz=" + kz + ", kc=" + kc);
    }
  }

  /** Width of the row design {@code W = [z, one-hot product, c]}. */
  public int width() {
    return kz + products + kc;
  }

  /** Length of {@link Globals#toFlat()}. */
  public int flatLength() {
    return kd * kpsi + kpsi * (kpsi + 1) / 2 + products + 1 + kz + 1 + products + kc + 1 + 1;
  }
}
