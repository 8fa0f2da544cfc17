package aislecast.core.estimate;

import aislecast.core.globals.Dims;
import aislecast.core.globals.GlobalStats;
import java.io.Serializable;

/**
 * What every store returns from a sweep, mergeable (associative and commutative) so Spark can
 * {@code treeAggregate} it: per chain, the sufficient statistics of the locals after the local
 * transitions ({@code current}), those of the locals under the proposed ridge shift
 * ({@code proposed}), the change of the sales log likelihood that shift causes plus the shift's
 * log Jacobian, and sampler
 * counters.
 */
public final class SweepStats implements Serializable {
  private static final long serialVersionUID = 1L;

  public final GlobalStats[] current;
  public final GlobalStats[] proposed;
  public final double[] salesDelta;
  public final double[] acceptSum;
  public final long[] transitions;
  public final long[] divergent;

  public SweepStats(Dims dims, int chains) {
    current = new GlobalStats[chains];
    proposed = new GlobalStats[chains];
    for (int c = 0; c < chains; c++) {
      current[c] = new GlobalStats(dims);
      proposed[c] = new GlobalStats(dims);
    }
    salesDelta = new double[chains];
    acceptSum = new double[chains];
    transitions = new long[chains];
    divergent = new long[chains];
  }

  public int chains() {
    return current.length;
  }

  /** Adds {@code o} into this; returns this. */
  public SweepStats merge(SweepStats o) {
    for (int c = 0; c < current.length; c++) {
      current[c].merge(o.current[c]);
      proposed[c].merge(o.proposed[c]);
      salesDelta[c] += o.salesDelta[c];
      acceptSum[c] += o.acceptSum[c];
      transitions[c] += o.transitions[c];
      divergent[c] += o.divergent[c];
    }
    return this;
  }

  /** Mean local HMC acceptance over chains in this sweep. */
  public double meanAcceptance() {
    double a = 0;
    long n = 0;
    for (int c = 0; c < current.length; c++) {
      a += acceptSum[c];
      n += transitions[c];
    }
    return n == 0 ? Double.NaN : a / n;
  }

  public long totalDivergent() {
    long d = 0;
    for (long v : divergent) {
      d += v;
    }
    return d;
  }
}
