package aislecast.core.estimate;

import aislecast.core.globals.Globals;
import aislecast.core.mcmc.Welford;
import java.io.Serializable;

/**
 * Everything the driver carries from one sweep to the next (and checkpoints): each chain's
 * globals; the ridge move's proposal per chain (a scale adapted towards 25% acceptance during
 * warmup, times the Cholesky factor of the covariance of that chain's warmup draws of the
 * hierarchy's intercept row; both fixed after warmup); the shift the stores must apply at the
 * start of the next sweep; and counters.
 */
public record DriverState(
    Globals[] globals,
    double[] ridgeScale,
    double[][] ridgeChol,
    Welford[] ridgeHistory,
    double[][] pendingShift,
    long[] ridgeAccepted,
    long[] ridgeProposed,
    int nextSweep)
    implements Serializable {

  /** Proposal sd per component before any history: 0.05 on every psi component. */
  static final double INITIAL_SD = 0.05;

  public static DriverState start(Globals[] globals) {
    int c = globals.length;
    int k = globals[0].dims().kpsi();
    double[] scale = new double[c];
    double[][] chol = new double[c][k * k];
    Welford[] hist = new Welford[c];
    double[][] pending = new double[c][k];
    for (int i = 0; i < c; i++) {
      scale[i] = 1.0;
      for (int q = 0; q < k; q++) {
        chol[i][q * k + q] = INITIAL_SD;
      }
      hist[i] = new Welford(k, true);
    }
    return new DriverState(globals, scale, chol, hist, pending, new long[c], new long[c], 0);
  }

  public int chains() {
    return globals.length;
  }

  /**
   * Chain {@code c}'s ridge proposal sd along each component of {@code psi}: its scale times the
   * length of each row of its factor (the proposal is {@code scale * L z}, {@code z ~ N(0, I)}).
   */
  public double[] ridgeProposalSd(int c) {
    double[] l = ridgeChol[c];
    int k = (int) Math.round(Math.sqrt(l.length));
    double[] sd = new double[k];
    for (int i = 0; i < k; i++) {
      double v = 0;
      for (int q = 0; q < k; q++) {
        v += l[i * k + q] * l[i * k + q];
      }
      sd[i] = ridgeScale[c] * Math.sqrt(v);
    }
    return sd;
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
