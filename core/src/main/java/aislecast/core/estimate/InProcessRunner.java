package aislecast.core.estimate;

import aislecast.core.globals.Dims;
import aislecast.core.globals.Globals;
import aislecast.core.globals.Priors;
import aislecast.core.mcmc.StoreSampler;
import aislecast.core.model.ProductCatalog;
import aislecast.core.model.StoreData;
import java.util.ArrayList;
import java.util.List;
import java.util.function.Function;

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
    return run(stores, catalog, kd, kz, kc, priors, set, Start.DEFAULT);
  }

  /**
   * Diagnostic starts and holds for the probes: every chain's globals, each store's locals in
   * natural coordinates [psi, kappa, delta] (the same for every chain), whether the globals stay
   * where they started (only the locals are sampled: a conditional posterior), and a hook called
   * after each sweep with the sweep index, the blocks and their samplers.
   */
  public record Start(Globals[] globals, Function<StoreData, double[]> locals,
      boolean holdGlobals, SweepHook afterSweep) {
    static final Start DEFAULT = new Start(null, null, false, null);
  }

  /** Called after each sweep (see {@link Start}). */
  public interface SweepHook {
    void accept(int sweep, List<StoreBlock> blocks, List<StoreSampler> samplers, DriverState st);
  }

  public static Result run(List<StoreData> stores, ProductCatalog catalog, int kd, int kz,
      int kc, Priors priors, SamplerSettings set, Start start) {
    int kx = catalog.attributes();
    Dims dims = new Dims(kd, aislecast.core.demand.Heterogeneity.dim(kx), catalog.size(), kz, kc);
    DriverState st = DriverState.start(start.globals() != null ? start.globals()
        : InitialGlobals.of(stores, dims, kx, set));
    List<StoreBlock> blocks = new ArrayList<>();
    List<StoreSampler> samplers = new ArrayList<>();
    var params0 = Sweeps.localParams(st.globals());
    for (StoreData d : stores) {
      StoreBlock b = Sweeps.initStore(d, catalog.x(), kx, params0, set);
      StoreSampler sampler = new StoreSampler(d, catalog.x(), kx);
      if (start.locals() != null) {
        double[] pos = sampler.fromNatural(start.locals().apply(d));
        for (var chain : b.chains) {
          chain.position = pos.clone();
        }
      }
      blocks.add(b);
      samplers.add(sampler);
    }
    double[][][] kept = new double[set.chains()][set.keptDraws()][];
    double acceptSum = 0;
    for (int sweep = 0; sweep < set.totalSweeps(); sweep++) {
      SweepInput in = Sweeps.input(st, set);
      SweepStats stats = new SweepStats(dims, set.chains());
      for (int i = 0; i < blocks.size(); i++) {
        SweepStats part = new SweepStats(dims, set.chains());
        Sweeps.sweepStore(blocks.get(i), samplers.get(i), catalog.x(), kx, in, set, sweep, part);
        stats.merge(part);
      }
      if (!start.holdGlobals()) {
        st = Sweeps.driverStep(st, stats, in, priors, set);
      }
      if (start.afterSweep() != null) {
        start.afterSweep().accept(sweep, blocks, samplers, st);
      }
      if (sweep >= set.warmupSweeps()) {
        acceptSum += stats.meanAcceptance();
      }
      if (set.isKept(sweep)) {
        for (int c = 0; c < set.chains(); c++) {
          kept[c][set.keptIndex(sweep)] = st.globals()[c].toFlat();
        }
      }
    }
    return new Result(dims, Globals.parameterNames(dims), kept, blocks, st,
        acceptSum / set.samplingSweeps());
  }
}
