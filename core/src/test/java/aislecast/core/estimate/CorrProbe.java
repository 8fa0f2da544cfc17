package aislecast.core.estimate;

import aislecast.core.globals.Priors;
import aislecast.core.model.ReferenceFixtures;

/** Manual probe: correlations of global draws with a chosen parameter, pooled over chains. */
public final class CorrProbe {
  public static void main(String[] args) throws Exception {
    var f = ReferenceFixtures.load();
    var set = new SamplerSettings(4, 150, 300, 2, 16, 0.8, 7, false, !"0".equals(System.getenv("RIDGE")));
    var res = InProcessRunner.run(f.stores(), f.catalog(), 1, 1, 1, Priors.defaults(1, 2), set);
    String[] names = res.parameterNames();
    int n = 4 * 300;
    double[][] x = new double[names.length][n];
    for (int c = 0; c < 4; c++) for (int i = 0; i < 300; i++) for (int p = 0; p < names.length; p++) x[p][c * 300 + i] = res.globalDraws()[c][i][p];
    var pc = new org.apache.commons.math3.stat.correlation.PearsonsCorrelation();
    for (int p = 0; p < names.length; p++) {
      StringBuilder sb = new StringBuilder(String.format("%-14s", names[p]));
      for (int q : new int[] {0, 1, 2, 3, 4}) sb.append(String.format(" %6.2f", pc.correlation(x[p], x[q])));
      System.out.println(sb);
    }
    System.out.println("ridge acc " + res.last().ridgeAcceptance());
  }
}
