package aislecast.core.estimate;

import aislecast.core.diag.Diagnostics;
import aislecast.core.globals.Priors;
import aislecast.core.sim.SimSettings;

/** Manual probe (not a test): fit simulated data and print summaries against the truth. */
public final class SimFitProbe {
  public static void main(String[] args) throws Exception {
    int stores = Integer.parseInt(args[0]);
    int weeks = Integer.parseInt(args[1]);
    int products = Integer.parseInt(args[2]);
    int warm = Integer.parseInt(args[3]);
    int keep = Integer.parseInt(args[4]);
    int local = Integer.parseInt(args[5]);
    int draws = Integer.parseInt(args[6]);
    SimSettings st = SimSettings.demo().withSizes(stores, weeks, products, 3, 3, draws);
    SimFixture f = new SimFixture(st);
    int leapfrog = Integer.parseInt(System.getenv().getOrDefault("LF", "16"));
    var set = new SamplerSettings(4, warm, keep, local, leapfrog, 0.8, 11, false, !"0".equals(System.getenv("RIDGE")));
    long t0 = System.nanoTime();
    var res = InProcessRunner.run(f.stores, f.catalog, 2, 1, 1, Priors.defaults(2, 3), set);
    System.out.printf("%.1f s%n", (System.nanoTime() - t0) / 1e9);
    String[] names = res.parameterNames();
    double[] truth = f.truth.toFlat();
    int covered = 0;
    double minEss = 1e9, maxRhat = 0;
    for (int p = 0; p < names.length; p++) {
      double[][] ch = new double[4][keep];
      for (int c = 0; c < 4; c++) for (int i = 0; i < keep; i++) ch[c][i] = res.globalDraws()[c][i][p];
      var s = Diagnostics.summarize(ch);
      boolean in = truth[p] >= s.q05() && truth[p] <= s.q95();
      covered += in ? 1 : 0;
      minEss = Math.min(minEss, s.essBulk());
      maxRhat = Math.max(maxRhat, s.rhat());
      System.out.printf("%-22s truth %8.3f mean %8.3f [%8.3f %8.3f] %s rhat %.3f essb %.0f%n", names[p], truth[p], s.mean(), s.q05(), s.q95(), in ? " " : "*", s.rhat(), s.essBulk());
    }
    System.out.printf("covered %d/%d, max rhat %.3f, min ess %.0f, ridge acceptance %.2f, local acceptance %.2f%n", covered, names.length, maxRhat, minEss, res.last().ridgeAcceptance(), res.meanLocalAcceptance());
  }
}
