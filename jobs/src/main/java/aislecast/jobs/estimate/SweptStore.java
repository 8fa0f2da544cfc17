package aislecast.jobs.estimate;

import aislecast.core.estimate.StoreBlock;
import aislecast.core.estimate.SweepStats;
import java.io.Serializable;

/**
 * One element of the state RDD: a store's block after a sweep, with the statistics that sweep
 * produced for the driver (null for a freshly initialised or reloaded block) and the time the
 * store's model work took.
 */
final class SweptStore implements Serializable {
  private static final long serialVersionUID = 1L;

  final StoreBlock block;
  final SweepStats stats;
  final long nanos;

  SweptStore(StoreBlock block, SweepStats stats, long nanos) {
    this.block = block;
    this.stats = stats;
    this.nanos = nanos;
  }

  int storeIndex() {
    return block.data.storeIndex;
  }
}
