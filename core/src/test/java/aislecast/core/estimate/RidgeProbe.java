package aislecast.core.estimate;

import aislecast.core.globals.Priors;
import aislecast.core.mcmc.StoreSampler;
import aislecast.core.model.ReferenceFixtures;
import aislecast.core.model.StoreData;

/** Manual probe: the ridge move's log-ratio components at the end of a short run. */
public final class RidgeProbe {
  public static void main(String[] args) throws Exception {
    var f = ReferenceFixtures.load();
    var set = new SamplerSettings(4, 100, 50, 2, 16, 0.8, 7, false, true);
    Priors pr = Priors.defaults(1, 2);
    var res = InProcessRunner.run(f.stores(), f.catalog(), 1, 1, 1, pr, set);
    var g = res.last().globals()[0];
    for (double c : new double[] {-0.2, -0.1, -0.05, 0.05, 0.1, 0.2}) {
      SweepStats cur = new SweepStats(res.dims(), 1);
      double sales = 0;
      SweepStats prop = new SweepStats(res.dims(), 1);
      for (StoreBlock b : res.stores()) {
        StoreData d = b.data;
        StoreSampler sm = new StoreSampler(d, f.x(), f.kx());
        double[] pos = sm.natural(b.chains[0].position);
        double[] moved = pos.clone();
        double lj = RidgeMove.apply(d, f.x(), f.kx(), moved, new double[] {c, 0, 0, 0, 0});
        sales += lj + sm.salesLogLikelihood(moved) - sm.salesLogLikelihood(pos);
        Sweeps.addStatistics(d, pos, 5, cur.current[0]);
        Sweeps.addStatistics(d, moved, 5, prop.current[0]);
      }
      double h = RidgeMove.hierarchy(g, prop.current[0].hierarchy(), pr) - RidgeMove.hierarchy(g, cur.current[0].hierarchy(), pr);
      double i = RidgeMove.intercepts(g, prop.current[0].intercepts(), pr) - RidgeMove.intercepts(g, cur.current[0].intercepts(), pr);
      double r = RidgeMove.regression(g, prop.current[0].regression(), pr, false) - RidgeMove.regression(g, cur.current[0].regression(), pr, false);
      System.out.printf("c=%5.2f sales %9.3f hier %9.3f int %9.3f reg %9.3f%n", c, sales, h, i, r);
    }
  }
}
