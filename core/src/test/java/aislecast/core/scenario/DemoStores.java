package aislecast.core.scenario;

import aislecast.core.sim.DemandSimulator;
import aislecast.core.sim.SimSettings;
import aislecast.core.sim.SimulatedData;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Set;

/**
 * The demo data set (SimSettings.demo()) with its true parameters as a one-draw posterior: per
 * store, the latest week as base period, its true psi and true mean utilities.
 */
final class DemoStores {
  private static SimulatedData cached;

  final SimulatedData sim;

  DemoStores() {
    synchronized (DemoStores.class) {
      if (cached == null) {
        cached = DemandSimulator.simulate(SimSettings.demo());
      }
      sim = cached;
    }
  }

  /** The user's portfolio: owner 0 of the simulator. */
  String portfolioOwner() {
    return sim.ownerNames[0];
  }

  /** Store s in its latest week, with the true psi and mean utilities. */
  Store store(int s) {
    int lastWeek = sim.weekDates.length - 1;
    List<Integer> rows = new ArrayList<>();
    for (int i = 0; i < sim.rows; i++) {
      if (sim.rowStore[i] == s && sim.rowWeek[i] == lastWeek) {
        rows.add(i);
      }
    }
    int j = rows.size();
    int kx = sim.kx();
    String[] ids = new String[j];
    String[] owners = new String[j];
    double[] x = new double[j * kx];
    double[] price = new double[j];
    double[] delta = new double[j];
    for (int q = 0; q < j; q++) {
      int i = rows.get(q);
      int p = sim.rowProduct[i];
      ids[q] = sim.productIds[p];
      owners[q] = sim.ownerNames[sim.productOwner[p]];
      System.arraycopy(sim.xStd, p * kx, x, q * kx, kx);
      price[q] = sim.price[i];
      delta[q] = sim.delta[i];
    }
    int kpsi = sim.settings.psiDim();
    double[] psi = Arrays.copyOfRange(sim.psi, s * kpsi, (s + 1) * kpsi);
    BaseMarket market = new BaseMarket(sim.storeIds[s], ids, owners, kx, x, price,
        sim.shoppers[s], sim.draws[s], sim.settings.draws(), null, Set.of(portfolioOwner()));
    return new Store(market, psi, delta);
  }

  record Store(BaseMarket market, double[] psi, double[] delta) {}
}
