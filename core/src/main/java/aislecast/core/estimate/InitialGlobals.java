package aislecast.core.estimate;

import aislecast.core.globals.Dims;
import aislecast.core.globals.Globals;
import aislecast.core.model.StoreData;
import aislecast.core.rng.SplitMix64;
import aislecast.core.rng.Streams;
import java.util.List;

/**
 * Starting globals for each chain: moment estimates from the data (plain-logit mean utilities
 * {@code ln s_j - ln s_0} per product, mean log price per product), then jittered per chain so
 * that chains start apart, which R-hat needs to be meaningful.
 */
public final class InitialGlobals {
  private InitialGlobals() {}

  public static Globals[] of(List<StoreData> stores, Dims dims, int kx, SamplerSettings set) {
    int j = dims.products();
    double[] sumDelta = new double[j];
    double[] sumLogP = new double[j];
    double[] n = new double[j];
    for (StoreData d : stores) {
      for (int t = 0; t < d.markets(); t++) {
        long inside = 0;
        for (int r = d.rowStart[t]; r < d.rowStart[t + 1]; r++) {
          inside += d.units[r];
        }
        double m = d.marketSize[t];
        double s0 = Math.max(m - inside, 0.5) / m;
        for (int r = d.rowStart[t]; r < d.rowStart[t + 1]; r++) {
          int p = d.product[r];
          sumDelta[p] += Math.log(Math.max(d.units[r], 0.5) / m) - Math.log(s0);
          sumLogP[p] += d.logPrice[r];
          n[p]++;
        }
      }
    }
    Globals[] out = new Globals[set.chains()];
    int kpsi = dims.kpsi();
    for (int c = 0; c < out.length; c++) {
      SplitMix64 rng = Streams.stream(set.seed(), c, -2, -1, 2);
      double[] gammaPsi = new double[dims.kd() * kpsi];
      // alpha around 1 to 2 per unit of currency, modest heterogeneity
      gammaPsi[0] = 0.3 * rng.nextGaussian();
      for (int k = 1; k < 2 + kx; k++) {
        gammaPsi[k] = -1.0 + 0.3 * rng.nextGaussian();
      }
      double[] v = new double[kpsi * kpsi];
      for (int k = 0; k < kpsi; k++) {
        v[k * kpsi + k] = 0.1 * Math.exp(0.3 * rng.nextGaussian());
      }
      double[] kappabar = new double[j];
      double[] pi0 = new double[j];
      for (int p = 0; p < j; p++) {
        double cnt = Math.max(n[p], 1);
        // plain-logit delta ignores price; add back a unit price sensitivity times mean price
        kappabar[p] = sumDelta[p] / cnt + Math.exp(sumLogP[p] / cnt) + 0.3 * rng.nextGaussian();
        pi0[p] = sumLogP[p] / cnt + 0.1 * rng.nextGaussian();
      }
      double lambda = set.fixLambdaZero() ? 0.0 : 0.3 * rng.nextGaussian();
      out[c] = new Globals(dims, gammaPsi, v, kappabar, 0.25 * Math.exp(0.3 * rng.nextGaussian()),
          new double[dims.kz()], 0.1 * Math.exp(0.3 * rng.nextGaussian()), pi0,
          new double[dims.kc()], lambda, 0.05 * Math.exp(0.3 * rng.nextGaussian()));
    }
    return out;
  }
}
