package aislecast.core.estimate;

import aislecast.core.globals.GlobalGibbs;
import aislecast.core.globals.Priors;
import aislecast.core.mcmc.StoreSampler;
import aislecast.core.model.StoreData;
import aislecast.core.sim.SimSettings;

/**
 * Manual probe: the ridge move's target, term by term, along single psi axes (all stores shifted
 * together) at the state after a short run on simulated data (20 stores x 26 weeks x args[0]
 * products), and the same with sigma_p^2 integrated out numerically. Shows which term makes the
 * move's target narrow in which direction.
 */
public final class AxisScanProbe {
  /** The price-equation term with its coefficients and sigma_p2 integrated out. */
  static double integratedSp(aislecast.core.globals.Globals g, aislecast.core.globals.GlobalStats st, Priors pr) {
    return aislecast.core.globals.PriceNoiseMarginal.of(g, st.regression(), pr, false).logMarginal(pr.sigmaP2());
  }

  public static void main(String[] args) throws Exception {
    SimSettings st = SimSettings.demo().withSizes(20, 26, Integer.parseInt(args[0]), 3, 3, 50);
    SimFixture f = new SimFixture(st);
    var set = new SamplerSettings(1, 150, 10, 1, 8, 0.8, 11, false, true);
    Priors pr = Priors.defaults(2, 3);
    var res = InProcessRunner.run(f.stores, f.catalog, 2, 1, 1, pr, set);
    // the "price" column is the term at the chain's sigma_p2; the integrated one is printed apart
    RidgeMove.collapsePriceNoise = false;
    var g = res.last().globals()[0];
    int kpsi = res.dims().kpsi();
    double[] x = f.catalog.x();
    int kx = f.catalog.attributes();
    for (int axis : new int[] {0, 1, 2, 3, 5}) {
      for (double c : new double[] {-0.2, -0.1, -0.05, -0.02, 0.02, 0.05, 0.1, 0.2}) {
        SweepStats cur = new SweepStats(res.dims(), 1);
        SweepStats prop = new SweepStats(res.dims(), 1);
        double sales = 0;
        double[] shift = new double[kpsi];
        shift[axis] = c;
        for (StoreBlock b : res.stores()) {
          StoreData d = b.data;
          StoreSampler sm = new StoreSampler(d, x, kx);
          double[] pos = sm.natural(b.chains[0].position);
          double[] moved = pos.clone();
          double lj = RidgeMove.apply(d, x, kx, moved, shift);
          sales += lj + sm.salesLogLikelihood(moved) - sm.salesLogLikelihood(pos);
          Sweeps.addStatistics(d, pos, kpsi, cur.current[0]);
          Sweeps.addStatistics(d, moved, kpsi, prop.current[0]);
        }
        var pc = prop.current[0];
        var cc = cur.current[0];
        double h = RidgeMove.hierarchy(g, pc.hierarchy(), pr) - RidgeMove.hierarchy(g, cc.hierarchy(), pr);
        double i = RidgeMove.intercepts(g, pc.intercepts(), pr) - RidgeMove.intercepts(g, cc.intercepts(), pr);
        double r = RidgeMove.regression(g, pc.regression(), pr, false) - RidgeMove.regression(g, cc.regression(), pr, false);
        double dFixed = -0.5 * (GlobalGibbs.demandResidualSquares(g, pc.regression()) - GlobalGibbs.demandResidualSquares(g, cc.regression())) / g.sigmaXi2();
        double dColl = RidgeMove.collapsedDemand(g, pc.regression(), pr) - RidgeMove.collapsedDemand(g, cc.regression(), pr);
        double demandUsed = RidgeMove.collapseNoiseVariance ? dColl : dFixed;
        double colP = integratedSp(g, pc, pr) - integratedSp(g, cc, pr);
        System.out.printf("   with sigma_p2 integrated: total %9.3f%n", sales + h + i + RidgeMove.collapsedDemand(g, pc.regression(), pr) - RidgeMove.collapsedDemand(g, cc.regression(), pr) + colP);
        System.out.printf("axis %d c=%5.2f sales+jac %9.3f hier %9.3f int %9.3f demand(fixed) %9.3f demand(coll) %9.3f price %9.3f total %9.3f%n",
            axis, c, sales, h, i, dFixed, dColl, r - demandUsed, sales + h + i + r);
      }
    }
  }
}
