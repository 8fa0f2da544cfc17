package aislecast.core.estimate;

import aislecast.core.demand.Heterogeneity;
import aislecast.core.globals.GlobalGibbs;
import aislecast.core.globals.GlobalStats;
import aislecast.core.globals.Globals;
import aislecast.core.globals.Priors;
import aislecast.core.mcmc.Hmc;
import aislecast.core.mcmc.StoreChainState;
import aislecast.core.mcmc.StoreSampler;
import aislecast.core.model.LocalParams;
import aislecast.core.model.StoreData;
import aislecast.core.rng.SplitMix64;
import aislecast.core.rng.Streams;

/**
 * The pieces of one sweep (DESIGN section 5), as pure functions that a Spark job or an in-process
 * loop composes in the same order:
 *
 * <ol>
 *   <li>driver: {@link #input} builds the broadcast for sweep k from the {@link DriverState};
 *   <li>every store: {@link #sweepStore} applies the ridge shift accepted last sweep, runs its
 *       local transitions for every chain, and returns {@link SweepStats} (sufficient statistics
 *       of its locals as they are and under this sweep's proposed ridge shift);
 *   <li>driver: {@link #driverStep} takes the merged statistics, accepts or rejects each chain's
 *       ridge shift, and draws the globals from their conditionals.
 * </ol>
 *
 * <p>Streams: store work for (chain c, store s, sweep k) draws from key (seed, c, s, k, 0); the
 * driver's draws for (chain c, sweep k) from (seed, c, -1, k, 1); initialisation uses sweep -1.
 * So a retried task, another partitioning or a resumed run repeats every number exactly.
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

  /**
   * Whether an accepted ridge shift reuses the position computed when it was proposed
   * ({@link aislecast.core.mcmc.StoreChainState#ridgeNatural}); false only in the test that shows
   * both ways give the same draws.
   */
  static boolean reuseRidgePositions = true;

  /** A new block with every chain started from its own globals (sweep -1 streams). */
  public static StoreBlock initStore(StoreData d, double[] x, int kx, LocalParams[] params,
      SamplerSettings set) {
    StoreSampler sampler = new StoreSampler(d, x, kx);
    StoreChainState[] chains = new StoreChainState[params.length];
    for (int c = 0; c < params.length; c++) {
      chains[c] = sampler.init(storeStream(set.seed(), c, d.storeIndex, -1), params[c], x, kx);
    }
    return new StoreBlock(d, chains, Heterogeneity.dim(kx), set.keptDraws());
  }

  /** The broadcast for the driver state's next sweep: globals, shifts to apply and to propose. */
  public static SweepInput input(DriverState st, SamplerSettings set) {
    int sweep = st.nextSweep();
    double[][] propose = new double[st.chains()][];
    if (set.ridgeMove()) {
      int k = st.globals()[0].dims().kpsi();
      for (int c = 0; c < propose.length; c++) {
        SplitMix64 rng = Streams.stream(set.seed(), c, -1, sweep, 3);
        double[] z = new double[k];
        for (int q = 0; q < k; q++) {
          z[q] = rng.nextGaussian();
        }
        double[] l = st.ridgeChol()[c];
        double[] shift = new double[k];
        for (int q = 0; q < k; q++) {
          double v = 0;
          for (int m = 0; m <= q; m++) {
            v += l[q * k + m] * z[m];
          }
          shift[q] = st.ridgeScale()[c] * v;
        }
        propose[c] = shift;
      }
    }
    return new SweepInput(localParams(st.globals()), st.pendingShift().clone(), propose);
  }

  /**
   * Sweep {@code sweep} for one store, updating the block in place (callers copy first when the
   * old block must survive), and adding its statistics into {@code out}.
   */
  public static void sweepStore(StoreBlock b, StoreSampler sampler, double[] x, int kx,
      SweepInput in, SamplerSettings set, int sweep, SweepStats out) {
    StoreData d = b.data;
    int kpsi = Heterogeneity.dim(kx);
    StoreSampler.Settings local =
        new StoreSampler.Settings(set.localWarmup(), set.leapfrogSteps(), set.targetAccept(),
            set.momentumPersistence());
    boolean keep = set.isKept(sweep);
    for (int c = 0; c < b.chains.length; c++) {
      StoreChainState s = b.chains[c];
      double[] accepted = in.applyShift()[c];
      if (accepted != null) {
        if (reuseRidgePositions && s.ridgeNatural != null
            && java.util.Arrays.equals(s.ridgeShift, accepted)) {
          // evaluated at the end of the last sweep from this very position
          s.position = sampler.fromNatural(s.ridgeNatural);
        } else {
          double[] nat = sampler.natural(s.position);
          RidgeMove.apply(d, x, kx, nat, accepted);
          s.position = sampler.fromNatural(nat);
        }
      }
      s.ridgeShift = null;
      s.ridgeNatural = null;
      SplitMix64 rng = storeStream(set.seed(), c, d.storeIndex, sweep);
      for (int k = 0; k < set.localSteps(); k++) {
        Hmc.Info info = sampler.step(rng, s, in.params()[c], local);
        out.acceptSum[c] += info.acceptProb();
        out.transitions[c]++;
        if (info.divergent()) {
          out.divergent[c]++;
        }
      }
      if (keep) {
        System.arraycopy(s.position, 0, b.psiDraws[c], b.keptDraws * kpsi, kpsi);
      }
      double[] nat = sampler.natural(s.position);
      addStatistics(d, nat, kpsi, out.current[c]);
      double[] shift = in.proposeShift()[c];
      if (shift != null) {
        double[] moved = nat.clone();
        double logJac = RidgeMove.apply(d, x, kx, moved, shift);
        // predicted shares are unchanged by construction, so the sales term only carries the
        // inversion's rounding; it is computed anyway rather than assumed
        out.salesDelta[c] += logJac + sampler.salesLogLikelihood(moved)
            - sampler.salesLogLikelihood(nat);
        addStatistics(d, moved, kpsi, out.proposed[c]);
        s.ridgeShift = shift;
        s.ridgeNatural = moved;
      }
    }
    if (keep) {
      b.keptDraws++;
    }
  }

  /** The store's contribution to the global conditionals at natural locals [psi, kappa, delta]. */
  public static void addStatistics(StoreData d, double[] position, int kpsi, GlobalStats out) {
    out.addStore(d.demographics, java.util.Arrays.copyOfRange(position, 0, kpsi));
    int np = d.products.length;
    for (int l = 0; l < np; l++) {
      out.addIntercept(d.products[l], position[kpsi + l]);
    }
    for (int row = 0; row < d.rows(); row++) {
      double y = position[kpsi + np + row] - position[kpsi + d.local[row]];
      out.addRow(d.z, row * d.kz, d.product[row], d.c, row * d.kc, y, d.logPrice[row]);
    }
  }

  /**
   * The driver's half of a sweep: per chain, the ridge shift's Metropolis-Hastings decision
   * (collapsed over Gamma, kappabar and the price equation's coefficients, see {@link
   * RidgeMove}), then the globals drawn from the statistics of the chosen locals, collapsed
   * block first.
   */
  public static DriverState driverStep(DriverState st, SweepStats merged, SweepInput in,
      Priors priors, SamplerSettings set) {
    int sweep = st.nextSweep();
    int chains = st.chains();
    int kpsi = st.globals()[0].dims().kpsi();
    Globals[] next = new Globals[chains];
    double[] scale = st.ridgeScale().clone();
    double[][] chol = new double[chains][];
    aislecast.core.mcmc.Welford[] hist = new aislecast.core.mcmc.Welford[chains];
    double[][] pending = new double[chains][];
    long[] acc = st.ridgeAccepted().clone();
    long[] prop = st.ridgeProposed().clone();
    boolean fixed = set.fixLambdaZero();
    boolean warm = sweep < set.warmupSweeps();
    for (int c = 0; c < chains; c++) {
      Globals g = st.globals()[c];
      chol[c] = st.ridgeChol()[c];
      hist[c] = st.ridgeHistory()[c];
      SplitMix64 rng = driverStream(set.seed(), c, sweep);
      GlobalStats chosen = merged.current[c];
      double[] shift = in.proposeShift()[c];
      if (shift != null) {
        double logRatio = merged.salesDelta[c]
            + RidgeMove.collapsedLogDensity(g, merged.proposed[c], priors, fixed)
            - RidgeMove.collapsedLogDensity(g, merged.current[c], priors, fixed);
        // a non-finite ratio (a failed inversion, or a log determinant that over- or underflowed
        // at a near-singular share Jacobian) is a rejection, never an acceptance
        double a = Double.isFinite(logRatio) ? Math.min(1.0, Math.exp(logRatio)) : 0.0;
        boolean accept = rng.nextDouble() < a;
        prop[c]++;
        if (accept) {
          acc[c]++;
          pending[c] = shift;
          chosen = merged.proposed[c];
        }
        if (warm) {
          // Robbins-Monro on the log scale towards 25% acceptance, the usual target for a
          // multivariate random-walk proposal (Roberts, Gelman and Gilks 1997)
          scale[c] *= Math.exp((a - 0.25) / Math.sqrt(sweep + 1.0));
        }
      }
      next[c] = drawGlobals(g, chosen, priors, fixed, rng);
      if (warm && set.ridgeMove()) {
        hist[c] = hist[c].copy();
        double[] row0 = java.util.Arrays.copyOf(next[c].gammaPsi(), kpsi);
        hist[c].add(row0);
        if (hist[c].count() >= 20 && sweep % 10 == 9) {
          chol[c] = RidgeMove.proposalFactor(hist[c], kpsi);
        }
      }
    }
    return new DriverState(next, scale, chol, hist, pending, acc, prop, sweep + 1);
  }

  /**
   * Globals from their conditionals, the ridge move's collapsed block first (Gamma | V, kappabar |
   * tau2, sigma_p2 | gamma with the price-equation coefficients integrated out, those
   * coefficients | sigma_p2, sigma_xi2 | gamma: given the locals and gamma the four are
   * independent, so this is one joint draw), then V_psi, tau2, gamma, and sigma_p2 again from its
   * full conditional.
   */
  static Globals drawGlobals(Globals g, GlobalStats s, Priors priors, boolean fixedLambda,
      SplitMix64 rng) {
    g = GlobalGibbs.drawGammaPsi(g, s.hierarchy(), priors, rng);
    g = GlobalGibbs.drawKappabar(g, s.intercepts(), priors, rng);
    if (RidgeMove.collapsePriceNoise) {
      g = g.withSigmaP2(aislecast.core.globals.PriceNoiseMarginal
          .of(g, s.regression(), priors, fixedLambda).draw(priors.sigmaP2(), rng));
    }
    g = fixedLambda
        ? GlobalGibbs.drawPriceEquationFixedLambda(g, s.regression(), priors, rng)
        : GlobalGibbs.drawPriceEquation(g, s.regression(), priors, rng);
    g = GlobalGibbs.drawSigmaXi2(g, s.regression(), priors, rng);
    g = GlobalGibbs.drawVPsi(g, s.hierarchy(), priors, rng);
    g = GlobalGibbs.drawTau2(g, s.intercepts(), priors, rng);
    g = GlobalGibbs.drawGamma(g, s.regression(), priors, rng);
    return GlobalGibbs.drawSigmaP2(g, s.regression(), priors, rng);
  }
}
