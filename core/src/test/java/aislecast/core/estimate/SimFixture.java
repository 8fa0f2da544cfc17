package aislecast.core.estimate;

import aislecast.core.globals.Dims;
import aislecast.core.globals.Globals;
import aislecast.core.model.ProductCatalog;
import aislecast.core.model.StoreAssembler;
import aislecast.core.model.StoreData;
import aislecast.core.sim.DemandSimulator;
import aislecast.core.sim.SimSettings;
import aislecast.core.sim.SimulatedData;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;

/** Data simulated from the model, in the estimator's structures, with the true globals. */
public final class SimFixture {
  public final SimulatedData sim;
  public final ProductCatalog catalog;
  public final List<StoreData> stores = new ArrayList<>();
  public final Globals truth;
  public final Dims dims;

  public SimFixture(SimSettings settings) {
    sim = DemandSimulator.simulate(settings);
    int kx = sim.kx();
    String[] owners = new String[sim.products()];
    for (int p = 0; p < owners.length; p++) {
      owners[p] = sim.ownerNames[sim.productOwner[p]];
    }
    catalog = new ProductCatalog(sim.productIds, owners, sim.attributeNames, sim.xRaw);
    for (int p = 0; p < sim.products(); p++) {
      if (!catalog.id(p).equals(sim.productIds[p])) {
        throw new IllegalStateException("simulator product ids are not in sorted order");
      }
    }
    Map<Integer, List<StoreAssembler.Row>> rows = new HashMap<>();
    for (int i = 0; i < sim.rows; i++) {
      rows.computeIfAbsent(sim.rowStore[i], s -> new ArrayList<>()).add(new StoreAssembler.Row(
          sim.weekDates[sim.rowWeek[i]], sim.rowProduct[i], sim.units[i], sim.price[i],
          new double[] {sim.onDisplay[i]}, new double[] {Math.log(sim.unitCost[i])}));
    }
    for (int s = 0; s < sim.stores(); s++) {
      Map<String, Long> size = new HashMap<>();
      for (String w : sim.weekDates) {
        size.put(w, (long) sim.shoppers[s]);
      }
      double d1 = (sim.medianIncome[s] - sim.incomeMean) / sim.incomeSd;
      stores.add(StoreAssembler.assemble(sim.storeIds[s], s, new double[] {1.0, d1},
          sim.draws[s], sim.settings.draws(), rows.get(s), size, 1, 1));
    }
    SimSettings st = sim.settings;
    dims = new Dims(2, st.psiDim(), sim.products(), 1, 1);
    truth = new Globals(dims, sim.gamma, sim.vPsi, sim.kappabar, st.tau() * st.tau(),
        new double[] {st.displayEffect()}, st.sigmaXi() * st.sigmaXi(), sim.pi0,
        new double[] {st.costPassThrough()}, st.lambda(), st.sigmaP() * st.sigmaP());
    if (kx != catalog.attributes()) {
      throw new IllegalStateException("attribute count mismatch");
    }
  }
}
