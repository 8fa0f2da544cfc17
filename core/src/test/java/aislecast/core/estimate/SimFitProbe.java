package aislecast.core.estimate;

import aislecast.core.diag.Diagnostics;
import aislecast.core.globals.Priors;
import aislecast.core.sim.SimSettings;

/**
 * Manual probe (not a test): fit simulated data and print summaries against the truth, the ridge
 * proposal's final sd per psi component, and the slowest joint directions of the global draws.
 * Environment: LF (leapfrog steps, default 16), RIDGE=0 (ridge move off), SEED (sampler seed,
 * default 11), COLLAPSE_XI=0 (ridge target with sigma_xi^2 held instead of integrated out),
 * DUMP=prefix (write prefix_globals.csv, prefix_truth.csv, prefix_psi.csv).
 */
public final class SimFitProbe {
  /**
   * The slowest joint directions of the global draws: eigenvectors of the covariance of batch
   * means (batches of {@code batch} sweeps, every chain) of the standardised draws. For
   * independent draws every eigenvalue would be about 1 / batch; a large one is a mode the
   * sampler crosses slowly, and its loadings say which parameters move together in it.
   */
  static void slowDirections(double[][][] draws, String[] names, int batch) {
    int chains = draws.length;
    int n = draws[0].length;
    int p = names.length;
    double[] mean = new double[p];
    double[] sd = new double[p];
    for (int q = 0; q < p; q++) {
      double s = 0, ss = 0;
      for (double[][] ch : draws) for (double[] d : ch) { s += d[q]; ss += d[q] * d[q]; }
      mean[q] = s / (chains * n);
      sd[q] = Math.sqrt(Math.max(ss / (chains * n) - mean[q] * mean[q], 0));
    }
    java.util.List<double[]> bm = new java.util.ArrayList<>();
    for (double[][] ch : draws) {
      for (int b = 0; b + batch <= n; b += batch) {
        double[] m = new double[p];
        for (int i = b; i < b + batch; i++) for (int q = 0; q < p; q++) m[q] += sd[q] > 0 ? (ch[i][q] - mean[q]) / sd[q] / batch : 0;
        bm.add(m);
      }
    }
    var cov = new org.ejml.data.DMatrixRMaj(p, p);
    for (double[] m : bm) for (int i = 0; i < p; i++) for (int j = 0; j < p; j++) cov.add(i, j, m[i] * m[j] / (bm.size() - 1));
    var eig = org.ejml.dense.row.factory.DecompositionFactory_DDRM.eig(p, true, true);
    eig.decompose(cov);
    Integer[] order = new Integer[p];
    for (int i = 0; i < p; i++) order[i] = i;
    java.util.Arrays.sort(order, (a, b) -> Double.compare(eig.getEigenvalue(b).real, eig.getEigenvalue(a).real));
    System.out.printf("slow directions (batch-mean covariance eigenvalues; independent draws ~ %.3f):%n", 1.0 / batch);
    for (int e = 0; e < 2; e++) {
      var v = eig.getEigenVector(order[e]);
      Integer[] idx = new Integer[p];
      for (int i = 0; i < p; i++) idx[i] = i;
      java.util.Arrays.sort(idx, (a, b) -> Double.compare(Math.abs(v.get(b)), Math.abs(v.get(a))));
      StringBuilder sb = new StringBuilder(String.format("  %.2f:", eig.getEigenvalue(order[e]).real));
      for (int i = 0; i < 10; i++) sb.append(String.format(" %s %+.2f", names[idx[i]], v.get(idx[i])));
      System.out.println(sb);
    }
  }

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
    var set = new SamplerSettings(4, warm, keep, local, leapfrog, 0.8, Long.parseLong(System.getenv().getOrDefault("SEED", "11")), false, !"0".equals(System.getenv("RIDGE")));
    RidgeMove.collapseNoiseVariance = !"0".equals(System.getenv("COLLAPSE_XI"));
    RidgeMove.collapsePriceNoise = !"0".equals(System.getenv("COLLAPSE_P"));
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
    slowDirections(res.globalDraws(), names, 25);
    String dump = System.getenv("DUMP");
    if (dump != null) {
      try (var w = new java.io.PrintWriter(dump + "_globals.csv")) {
        w.println("chain,iter," + String.join(",", names) );
        for (int c = 0; c < 4; c++) for (int i = 0; i < keep; i++) {
          StringBuilder b = new StringBuilder(c + "," + i);
          for (double v : res.globalDraws()[c][i]) b.append(',').append(v);
          w.println(b);
        }
      }
      try (var w = new java.io.PrintWriter(dump + "_truth.csv")) {
        w.println(String.join(",", names));
        StringBuilder b = new StringBuilder();
        for (int p = 0; p < truth.length; p++) b.append(p == 0 ? "" : ",").append(truth[p]);
        w.println(b);
      }
      try (var w = new java.io.PrintWriter(dump + "_psi.csv")) {
        int kp = res.dims().kpsi();
        for (int s = 0; s < res.stores().size(); s++) {
          var blk = res.stores().get(s);
          for (int c = 0; c < 4; c++) for (int i = 0; i < blk.keptDraws; i++) {
            StringBuilder b = new StringBuilder(s + "," + c + "," + i);
            for (int k = 0; k < kp; k++) b.append(',').append(blk.psiDraws[c][i * kp + k]);
            w.println(b);
          }
        }
      }
    }
    {
      int kp = res.dims().kpsi();
      for (int c = 0; c < 4; c++) {
        double[] l = res.last().ridgeChol()[c];
        StringBuilder b = new StringBuilder("ridge proposal sd chain " + c + ":");
        for (int i = 0; i < kp; i++) { double v = 0; for (int m = 0; m <= i; m++) v += l[i * kp + m] * l[i * kp + m]; b.append(String.format(" %.3f", res.last().ridgeScale()[c] * Math.sqrt(v))); }
        System.out.println(b);
      }
    }
    System.out.printf("covered %d/%d, max rhat %.3f, min ess %.0f, ridge acceptance %.2f, local acceptance %.2f%n", covered, names.length, maxRhat, minEss, res.last().ridgeAcceptance(), res.meanLocalAcceptance());
  }
}
