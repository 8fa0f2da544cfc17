package aislecast.core.estimate;

import aislecast.core.globals.Dims;
import aislecast.core.globals.Globals;
import aislecast.core.globals.Priors;
import aislecast.core.mcmc.StoreSampler;
import aislecast.core.model.ProductCatalog;
import aislecast.core.model.StoreData;
import java.util.ArrayList;
import java.util.List;

/**
 * The estimation sweep loop in one JVM without Spark: the same {@link Sweeps} functions the Spark
 * job composes, in the same order, so both produce identical draws. Used by tests (calibration,
 * recovery) that need many small runs.
 */
public final class InProcessRunner {
  /** Kept global draws: {@code globalDraws[chain][sweep][flat index]}. */
  public record Result(Dims dims, String[] parameterNames, double[][][] globalDraws,
      List<StoreBlock> stores, DriverState last, double meanLocalAcceptance) {}

  private InProcessRunner() {}

  public static Result run(List<StoreData> stores, ProductCatalog catalog, int kd, int kz,
      int kc, Priors priors, SamplerSettings set) {
    int kx = catalog.attributes();
    Dims dims = new Dims(kd, aislecast.core.demand.Heterogeneity.dim(kx), catalog.size(), kz, kc);
    DriverState st = DriverState.start(InitialGlobals.of(stores, dims, kx, set));
    List<StoreBlock> blocks = new ArrayList<>();
    List<StoreSampler> samplers = new ArrayList<>();
    var params0 = Sweeps.localParams(st.globals());
    for (StoreData d : stores) {
      blocks.add(Sweeps.initStore(d, catalog.x(), kx, params0, set));
      samplers.add(new StoreSampler(d, catalog.x(), kx));
    }
    double[][][] kept = new double[set.chains()][set.samplingSweeps()][];
    double acceptSum = 0;
    for (int sweep = 0; sweep < set.totalSweeps(); sweep++) {
      SweepInput in = Sweeps.input(st, set);
      SweepStats stats = new SweepStats(dims, set.chains());
      for (int i = 0; i < blocks.size(); i++) {
        SweepStats part = new SweepStats(dims, set.chains());
        Sweeps.sweepStore(blocks.get(i), samplers.get(i), catalog.x(), kx, in, set, sweep, part);
        stats.merge(part);
      }
      st = Sweeps.driverStep(st, stats, in, priors, set);
      if (sweep >= set.warmupSweeps()) {
        acceptSum += stats.meanAcceptance();
        for (int c = 0; c < set.chains(); c++) {
          kept[c][sweep - set.warmupSweeps()] = st.globals()[c].toFlat();
        }
      }
    }
    return new Result(dims, Globals.parameterNames(dims), kept, blocks, st,
        acceptSum / set.samplingSweeps());
  }
}
