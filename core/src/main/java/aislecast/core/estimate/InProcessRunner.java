package aislecast.core.estimate;

import aislecast.core.globals.Dims;
import aislecast.core.globals.GlobalStats;
import aislecast.core.globals.Globals;
import aislecast.core.globals.Priors;
import aislecast.core.mcmc.StoreSampler;
import aislecast.core.model.LocalParams;
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
  /** Kept global draws: {@code draws[chain][sweep][flat index]}. */
  public record Result(Dims dims, String[] parameterNames, double[][][] globalDraws,
      List<StoreBlock> stores) {}

  private InProcessRunner() {}

  public static Result run(List<StoreData> stores, ProductCatalog catalog, int kd, int kz,
      int kc, Priors priors, SamplerSettings set) {
    int kx = catalog.attributes();
    Dims dims = new Dims(kd, aislecast.core.demand.Heterogeneity.dim(kx), catalog.size(), kz, kc);
    Globals[] globals = InitialGlobals.of(stores, dims, kx, set);
    LocalParams[] params = Sweeps.localParams(globals);
    List<StoreBlock> blocks = new ArrayList<>();
    List<StoreSampler> samplers = new ArrayList<>();
    for (StoreData d : stores) {
      blocks.add(Sweeps.initStore(d, catalog.x(), kx, params, set));
      samplers.add(new StoreSampler(d, catalog.x(), kx));
    }
    double[][][] kept = new double[set.chains()][set.samplingSweeps()][];
    for (int sweep = 0; sweep < set.totalSweeps(); sweep++) {
      GlobalStats[] stats = Sweeps.emptyStats(globals);
      for (int i = 0; i < blocks.size(); i++) {
        GlobalStats[] part = Sweeps.emptyStats(globals);
        Sweeps.updateStore(blocks.get(i), samplers.get(i), params, set, sweep, part);
        Sweeps.merge(stats, part);
      }
      globals = Sweeps.drawGlobals(globals, stats, priors, set, sweep);
      params = Sweeps.localParams(globals);
      if (sweep >= set.warmupSweeps()) {
        for (int c = 0; c < globals.length; c++) {
          kept[c][sweep - set.warmupSweeps()] = globals[c].toFlat();
        }
      }
    }
    return new Result(dims, Globals.parameterNames(dims), kept, blocks);
  }
}
