package aislecast.jobs.estimate;

import aislecast.core.estimate.DriverState;
import java.io.Serializable;

/**
 * The driver's side of a run between sweeps: the sampler's {@link DriverState}, the global draws
 * kept so far, and running totals for the manifest. It is saved with every checkpoint, so a
 * resumed run continues with exactly these values.
 */
final class ChainRecord implements Serializable {
  private static final long serialVersionUID = 1L;

  /** Identifies the problem and settings; a resume with other ones is refused. */
  final String key;
  /** Catalog product ids, so a warm start can tell whether parameters line up. */
  final String[] productIds;
  DriverState state;
  /** {@code kept[chain][draw]}: flat globals after each kept sweep (null until drawn). */
  final double[][][] kept;
  int keptDraws;
  /**
   * The published run whose sweeps this one continues ({@code --extend}), null otherwise. Added
   * after the first checkpoints were written: those read back with null here, as they should.
   */
  String extendsRun;
  double acceptWarmup;
  double acceptSampling;
  long divergentWarmup;
  long divergentSampling;
  double sweepSeconds;
  double modelSeconds;
  double aggregateSeconds;
  double driverSeconds;

  ChainRecord(String key, String[] productIds, DriverState state, int chains, int sampling) {
    this.key = key;
    this.productIds = productIds.clone();
    this.state = state;
    this.kept = new double[chains][sampling][];
  }

  /**
   * This record with room for {@code capacity} kept draws per chain under a new key, every draw
   * and total so far carried over: the start of a run that extends the one this record ends.
   */
  ChainRecord extendedTo(String newKey, int capacity, String fromRun) {
    if (capacity < keptDraws) {
      throw new IllegalArgumentException(capacity + " kept draws is fewer than the "
          + keptDraws + " kept already");
    }
    ChainRecord r = new ChainRecord(newKey, productIds, state, kept.length, capacity);
    for (int c = 0; c < kept.length; c++) {
      System.arraycopy(kept[c], 0, r.kept[c], 0, keptDraws);
    }
    r.keptDraws = keptDraws;
    r.extendsRun = fromRun;
    r.acceptWarmup = acceptWarmup;
    r.acceptSampling = acceptSampling;
    r.divergentWarmup = divergentWarmup;
    r.divergentSampling = divergentSampling;
    r.sweepSeconds = sweepSeconds;
    r.modelSeconds = modelSeconds;
    r.aggregateSeconds = aggregateSeconds;
    r.driverSeconds = driverSeconds;
    return r;
  }

  /** Kept draws per chain this record has room for. */
  int keptCapacity() {
    return kept.length == 0 ? 0 : kept[0].length;
  }

  int nextSweep() {
    return state.nextSweep();
  }

  /** Kept draws of one flat parameter, chains x draws so far. */
  double[][] chainsOf(int parameter) {
    double[][] out = new double[kept.length][keptDraws];
    for (int c = 0; c < kept.length; c++) {
      for (int d = 0; d < keptDraws; d++) {
        out[c][d] = kept[c][d][parameter];
      }
    }
    return out;
  }
}
