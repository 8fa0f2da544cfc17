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

  /**
   * The block a new sweep advances, so that it never changes what the previous sweep's (possibly
   * cached) block holds: the chains' states are copied. The kept draws' arrays are shared, not
   * copied. A sweep only writes past {@code keptDraws}, which the earlier block does not count as
   * its own, and a sweep computed again (a retried or recomputed task) writes the very same values
   * there, every random stream being keyed by sweep. Copying them would cost every kept draw of
   * every store on every sweep, which in a long unthinned run grows to most of the sweep's memory
   * traffic.
   */
  public StoreBlock copy() {
    StoreChainState[] c = new StoreChainState[chains.length];
    for (int i = 0; i < c.length; i++) {
      c[i] = chains[i].copy();
    }
    StoreBlock b = new StoreBlock(data, c, 0, 0);
    b.psiDraws = psiDraws.clone();
    b.keptDraws = keptDraws;
    return b;
  }
}
