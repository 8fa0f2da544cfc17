package aislecast.core.estimate;

import aislecast.core.demand.Heterogeneity;
import aislecast.core.globals.GlobalGibbs;
import aislecast.core.globals.GlobalStats;
import aislecast.core.globals.Globals;
import aislecast.core.globals.Priors;
import aislecast.core.mcmc.StoreChainState;
import aislecast.core.mcmc.StoreSampler;
import aislecast.core.model.LocalParams;
import aislecast.core.model.StoreData;
import aislecast.core.rng.SplitMix64;
import aislecast.core.rng.Streams;

/**
 * The pieces of one sweep (DESIGN section 5), as pure functions that a Spark job or an in-process
 * loop composes: locals of a store given the globals of every chain, returning the store's
 * sufficient statistics per chain; then the globals of each chain from the merged statistics.
 *
 * <p>Streams: store work for (chain c, store s, sweep k) draws from key (seed, c, s, k, 0);
 * the driver's global draw for (chain c, sweep k) from (seed, c, -1, k, 1); initialisation from
 * sweep -1. So a retried task, a different partitioning or a resumed run repeats every number.
 */
public final class Sweeps {
  private Sweeps() {}

  /** The local view of each chain's globals, built once per sweep on the driver. */
  public static LocalParams[] localParams(Globals[] globals) {
    LocalParams[] out = new LocalParams[globals.length];
    for (int c = 0; c < globals.length; c++) {
      Globals g = globals[c];
      out[c] = LocalParams.of(g.dims().kpsi(), g.gammaPsi(), g.vPsi(), g.kappabar(), g.tau2(),
          g.gamma(), g.sigmaXi2(), g.pi0(), g.pi(), g.lambda(), g.sigmaP2());
    }
    return out;
  }

  public static SplitMix64 storeStream(long seed, int chain, int store, int sweep) {
    return Streams.stream(seed, chain, store, sweep, 0);
  }

  public static SplitMix64 driverStream(long seed, int chain, int sweep) {
    return Streams.stream(seed, chain, -1, sweep, 1);
  }

  /** A new block with every chain started from its own globals (sweep -1 streams). */
  public static StoreBlock initStore(StoreData d, double[] x, int kx, LocalParams[] params,
      SamplerSettings set) {
    StoreSampler sampler = new StoreSampler(d, x, kx);
    StoreChainState[] chains = new StoreChainState[params.length];
    for (int c = 0; c < params.length; c++) {
      chains[c] = sampler.init(storeStream(set.seed(), c, d.storeIndex, -1), params[c], x, kx);
    }
    return new StoreBlock(d, chains, Heterogeneity.dim(kx), set.samplingSweeps());
  }

  /**
   * Runs sweep {@code sweep} for one store: {@code localSteps} local transitions per chain, keeps
   * psi if the sweep is past warmup, and adds the store's statistics to {@code stats[chain]}.
   * The block is updated in place (callers copy first when the old one must survive).
   */
  public static void updateStore(StoreBlock b, StoreSampler sampler, LocalParams[] params,
      SamplerSettings set, int sweep, GlobalStats[] stats) {
    StoreData d = b.data;
    int kpsi = params[0].kpsi();
    StoreSampler.Settings local =
        new StoreSampler.Settings(set.localWarmup(), set.leapfrogSteps(), set.targetAccept());
    boolean keep = sweep >= set.warmupSweeps();
    for (int c = 0; c < b.chains.length; c++) {
      StoreChainState s = b.chains[c];
      SplitMix64 rng = storeStream(set.seed(), c, d.storeIndex, sweep);
      for (int k = 0; k < set.localSteps(); k++) {
        sampler.step(rng, s, params[c], local);
      }
      if (keep) {
        System.arraycopy(s.position, 0, b.psiDraws[c], b.keptDraws * kpsi, kpsi);
      }
      addStatistics(d, s, kpsi, stats[c]);
    }
    if (keep) {
      b.keptDraws++;
    }
  }

  /** The store's contribution to the global conditionals at its current locals. */
  public static void addStatistics(StoreData d, StoreChainState s, int kpsi, GlobalStats out) {
    out.addStore(d.demographics, java.util.Arrays.copyOfRange(s.position, 0, kpsi));
    int np = d.products.length;
    for (int l = 0; l < np; l++) {
      out.addIntercept(d.products[l], s.position[kpsi + l]);
    }
    for (int row = 0; row < d.rows(); row++) {
      double y = s.position[kpsi + np + row] - s.position[kpsi + d.local[row]];
      out.addRow(d.z, row * d.kz, d.product[row], d.c, row * d.kc, y, d.logPrice[row]);
    }
  }

  /** Draws every chain's globals from its merged statistics (driver side). */
  public static Globals[] drawGlobals(Globals[] current, GlobalStats[] merged, Priors priors,
      SamplerSettings set, int sweep) {
    Globals[] next = new Globals[current.length];
    for (int c = 0; c < current.length; c++) {
      SplitMix64 rng = driverStream(set.seed(), c, sweep);
      next[c] = set.fixLambdaZero()
          ? GlobalGibbs.drawWithFixedLambda(current[c], merged[c], priors, rng, 0.0)
          : GlobalGibbs.draw(current[c], merged[c], priors, rng);
    }
    return next;
  }

  public static GlobalStats[] emptyStats(Globals[] globals) {
    GlobalStats[] s = new GlobalStats[globals.length];
    for (int c = 0; c < s.length; c++) {
      s[c] = new GlobalStats(globals[c].dims());
    }
    return s;
  }

  /** Element-wise merge of per-chain statistics (for treeAggregate's combine). */
  public static GlobalStats[] merge(GlobalStats[] a, GlobalStats[] b) {
    for (int c = 0; c < a.length; c++) {
      a[c].merge(b[c]);
    }
    return a;
  }
}
