package aislecast.core.estimate;

import aislecast.core.mcmc.StoreChainState;
import aislecast.core.model.StoreData;
import java.io.Serializable;

/**
 * One store's data and its state in every chain, plus the store-level draws kept so far
 * ({@code psiDraws[chain]} holds Kpsi values per kept sweep, appended in order). This is the
 * element of the store-keyed state that is replaced every sweep.
 */
public final class StoreBlock implements Serializable {
  private static final long serialVersionUID = 1L;

  public final StoreData data;
  public final StoreChainState[] chains;
  public double[][] psiDraws;
  public int keptDraws;

  public StoreBlock(StoreData data, StoreChainState[] chains, int kpsi, int capacity) {
    this.data = data;
    this.chains = chains;
    this.psiDraws = new double[chains.length][kpsi * capacity];
  }

  /**
   * A copy with room for {@code capacity} kept sweeps of {@code kpsi} values per chain, the
   * draws kept so far carried over (an extended run keeps sampling where this one stopped).
   */
  public StoreBlock withCapacity(int kpsi, int capacity) {
    if (keptDraws > capacity) {
      throw new IllegalArgumentException("capacity " + capacity + " below the " + keptDraws
          + " draws kept");
    }
    StoreBlock b = copy();
    for (int c = 0; c < b.psiDraws.length; c++) {
      b.psiDraws[c] = java.util.Arrays.copyOf(psiDraws[c], kpsi * capacity);
    }
    return b;
  }

  /** Deep copy, so a new sweep never mutates the previous sweep's (possibly cached) blocks. */
  public StoreBlock copy() {
    StoreChainState[] c = new StoreChainState[chains.length];
    for (int i = 0; i < c.length; i++) {
      c[i] = chains[i].copy();
    }
    StoreBlock b = new StoreBlock(data, c, 0, 0);
    b.psiDraws = new double[psiDraws.length][];
    for (int i = 0; i < psiDraws.length; i++) {
      b.psiDraws[i] = psiDraws[i].clone();
    }
    b.keptDraws = keptDraws;
    return b;
  }
}
