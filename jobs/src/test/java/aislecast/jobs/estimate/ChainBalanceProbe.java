package aislecast.jobs.estimate;

import aislecast.core.diag.Diagnostics;
import aislecast.core.estimate.DriverState;
import aislecast.core.globals.Globals;
import java.util.Locale;

/**
 * Manual probe (not a test): how evenly the chains of a checkpointed run mix. For every global
 * parameter beyond the limits (bulk ESS below 400 or R-hat above 1.01 over all chains) it prints
 * each chain's own bulk ESS; then, per chain, the ridge move's proposal sd along each component
 * of the hierarchy's intercept row (its scale times the warmup-tuned factor, fixed after warmup)
 * next to that chain's spread of the kept draws of the same component.
 *
 * <p>Usage: {@code ChainBalanceProbe <checkpoint>/sweep-N/driver.bin}, on the jobs test class
 * path.
 */
public final class ChainBalanceProbe {
  private ChainBalanceProbe() {}

  public static void main(String[] args) throws Exception {
    ChainRecord r = ProbeFiles.readRecord(args[0]);
    DriverState st = r.state;
    String[] names = Globals.parameterNames(st.globals()[0].dims());
    System.out.printf(Locale.ROOT, "%d kept draws per chain, %d chains%n", r.keptDraws,
        st.chains());
    System.out.println("parameter           all chains: ESS   R-hat | each chain's bulk ESS");
    for (int p = 0; p < names.length; p++) {
      double[][] chains = r.chainsOf(p);
      double ess = Diagnostics.essBulk(chains);
      double rhat = Diagnostics.rankRhat(chains);
      if (!(ess < 400 || rhat > 1.01)) {
        continue;
      }
      StringBuilder each = new StringBuilder();
      for (double[] chain : chains) {
        each.append(String.format(Locale.ROOT, " %6.0f",
            Diagnostics.essBulk(new double[][] {chain})));
      }
      System.out.printf(Locale.ROOT, "%-18s %17.0f %7.4f |%s%n", names[p], ess, rhat, each);
    }
    int k = st.globals()[0].dims().kpsi();
    System.out.println("ridge proposal sd / sd of the kept draws, per component of Gamma's"
        + " intercept row");
    for (int c = 0; c < st.chains(); c++) {
      double[] sd = st.ridgeProposalSd(c);
      StringBuilder b = new StringBuilder();
      for (int i = 0; i < k; i++) {
        double[] x = r.chainsOf(i)[c];
        double m = 0;
        double m2 = 0;
        for (double y : x) {
          m += y;
          m2 += y * y;
        }
        m /= x.length;
        b.append(String.format(Locale.ROOT, " %.4f/%.4f", sd[i],
            Math.sqrt(Math.max(0, m2 / x.length - m * m))));
      }
      System.out.printf(Locale.ROOT, "chain %d (accepted %d of %d):%s%n", c,
          st.ridgeAccepted()[c], st.ridgeProposed()[c], b);
    }
  }
}
