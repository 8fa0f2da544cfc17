package aislecast.core.estimate;

import aislecast.core.diag.Diagnostics;
import aislecast.core.globals.Priors;
import aislecast.core.model.ReferenceFixtures;

/** Manual probe (not a test): fit the small reference set and print a summary against truth. */
public final class ReferenceFitProbe {
  public static void main(String[] args) throws Exception {
    var f = ReferenceFixtures.load();
    int warm = Integer.parseInt(args[0]);
    int keep = Integer.parseInt(args[1]);
    var set = new SamplerSettings(4, warm, keep, Integer.parseInt(args[2]), 16, 0.8, 7, false, !"0".equals(System.getenv("RIDGE")));
    long t0 = System.nanoTime();
    var res = InProcessRunner.run(f.stores(), f.catalog(), 1, 1, 1, Priors.defaults(1, 2), set);
    System.out.printf("%.1f s ridge acc %.2f scale %s%n", (System.nanoTime() - t0) / 1e9, res.last().ridgeAcceptance(), java.util.Arrays.toString(res.last().ridgeScale()));
    String[] names = res.parameterNames();
    for (int p = 0; p < names.length; p++) {
      double[][] ch = new double[4][keep];
      for (int c = 0; c < 4; c++) for (int i = 0; i < keep; i++) ch[c][i] = res.globalDraws()[c][i][p];
      var s = Diagnostics.summarize(ch);
      System.out.printf("%-20s mean %8.3f q05 %8.3f q95 %8.3f rhat %.3f essb %.0f%n", names[p], s.mean(), s.q05(), s.q95(), s.rhat(), s.essBulk());
    }
  }
}
