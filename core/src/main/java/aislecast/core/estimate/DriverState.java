package aislecast.core.estimate;

import aislecast.core.globals.Globals;
import java.io.Serializable;

/**
 * Everything the driver carries from one sweep to the next (and checkpoints): each chain's
 * globals, the ridge move's proposal scale (adapted during warmup, fixed after), the shift the
 * stores must apply at the start of the next sweep, and counters.
 */
public record DriverState(
    Globals[] globals,
    double[] ridgeScale,
    double[] pendingShift,
    long[] ridgeAccepted,
    long[] ridgeProposed,
    int nextSweep)
    implements Serializable {

  public static DriverState start(Globals[] globals) {
    int c = globals.length;
    double[] scale = new double[c];
    java.util.Arrays.fill(scale, 0.05);
    return new DriverState(globals, scale, new double[c], new long[c], new long[c], 0);
  }

  public int chains() {
    return globals.length;
  }

  /** Share of ridge proposals accepted, over chains. */
  public double ridgeAcceptance() {
    long a = 0;
    long p = 0;
    for (int c = 0; c < globals.length; c++) {
      a += ridgeAccepted[c];
      p += ridgeProposed[c];
    }
    return p == 0 ? Double.NaN : (double) a / p;
  }
}
