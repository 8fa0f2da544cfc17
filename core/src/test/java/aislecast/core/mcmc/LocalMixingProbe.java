package aislecast.core.mcmc;

import aislecast.core.model.ReferenceFixtures;
import aislecast.core.model.StoreData;
import aislecast.core.rng.Streams;

/** Manual probe (not a test): mixing of one store's local block at the true globals. */
public final class LocalMixingProbe {
  public static void main(String[] args) throws Exception {
    var f = ReferenceFixtures.load();
    int warm = Integer.parseInt(args[0]);
    int n = Integer.parseInt(args[1]);
    int steps = Integer.parseInt(args[2]);
    for (StoreData d : f.stores().subList(0, 3)) {
      StoreSampler sampler = new StoreSampler(d, f.x(), f.kx());
      var rng = Streams.stream(1, 0, d.storeIndex);
      var s = sampler.init(rng, f.params(), f.x(), f.kx());
      var set = new StoreSampler.Settings(warm, steps, 0.8);
      double[][] psi = new double[5][n];
      long t0 = System.nanoTime();
      for (int i = 0; i < warm + n; i++) {
        sampler.step(rng, s, f.params(), set);
        if (i >= warm) {
          for (int k = 0; k < 5; k++) psi[k][i - warm] = s.position[k];
        }
      }
      double sec = (System.nanoTime() - t0) / 1e9;
      StringBuilder sb = new StringBuilder(d.storeId + String.format(" %.2fs acc=%.2f div=%d eps=%.4f ess:", sec, s.acceptSum / s.transitions, s.divergent, s.stepSize));
      double[] truth = f.psi(d);
      for (int k = 0; k < 5; k++) {
        sb.append(String.format(" %.0f(m=%.2f t=%.2f)", essBatch(psi[k]), mean(psi[k]), truth[k]));
      }
      System.out.println(sb);
    }
  }

  static double mean(double[] x) { double m = 0; for (double v : x) m += v; return m / x.length; }

  /** Crude ESS by batch means (50 batches). */
  static double essBatch(double[] x) {
    int b = 50, len = x.length / b;
    double m = mean(x), var = 0;
    for (double v : x) var += (v - m) * (v - m);
    var /= x.length - 1;
    double bv = 0;
    for (int i = 0; i < b; i++) {
      double s = 0; for (int k = 0; k < len; k++) s += x[i * len + k];
      s /= len; bv += (s - m) * (s - m);
    }
    bv /= b - 1;
    return x.length * var / (len * bv);
  }
}
