package aislecast.core.estimate;

import aislecast.core.globals.Globals;
import aislecast.core.globals.Priors;
import aislecast.core.mcmc.Hmc;
import aislecast.core.mcmc.StoreChainState;
import aislecast.core.mcmc.StoreSampler;
import aislecast.core.mcmc.StoreTarget;
import aislecast.core.model.LocalParams;
import aislecast.core.rng.SplitMix64;
import aislecast.core.rng.Streams;
import java.util.List;
import org.apache.commons.math3.random.RandomGenerator;

/**
 * Probe (in-process only): after each sweep, per chain, an annealed joint move of Gamma's
 * intercept row, the intercept means and every store's locals ({@link
 * #annealedPath}). The shift {@code c} of Gamma's intercept row comes from the ridge
 * move's adapted proposal shape times a scale adapted in warmup; the intercept means follow by
 * {@code b = B c}, {@code B} the mean intercept response of the stores to a unit psi shift
 * (estimated in warmup, fixed while sampling, so the proposal stays symmetric). Other globals
 * are held during the move (a Metropolis-Hastings step on (Gamma, kappabar, locals) given them).
 */
final class AnnealedMoveHook implements InProcessRunner.SweepHook {
  private final int levels;
  private final int hmcPerLevel;
  private final int leapfrog;
  private final int warmup;
  private final Priors priors;
  private final double[] x;
  private final int kx;
  private final long seed;
  private double[] scale;
  private final boolean tasteOnly = System.getenv("ATASTE") != null;
  private double[][] bMatrix;
  long proposed;
  long accepted;
  double sumLogW;
  double sumLogW2;
  double[] sumAbsShift;

  AnnealedMoveHook(int levels, int hmcPerLevel, int leapfrog, int warmup, Priors priors,
      double[] x, int kx, long seed) {
    this.levels = levels;
    this.hmcPerLevel = hmcPerLevel;
    this.leapfrog = leapfrog;
    this.warmup = warmup;
    this.priors = priors;
    this.x = x;
    this.kx = kx;
    this.seed = seed;
  }

  @Override
  public void accept(int sweep, List<StoreBlock> blocks, List<StoreSampler> samplers,
      DriverState st) {
    int chains = st.chains();
    int kpsi = st.globals()[0].dims().kpsi();
    int nProd = st.globals()[0].dims().products();
    if (scale == null) {
      scale = new double[chains];
      java.util.Arrays.fill(scale,
          Double.parseDouble(System.getenv().getOrDefault("ASCALE", "2.0")));
      bMatrix = new double[chains][];
      sumAbsShift = new double[kpsi];
    }
    applyPendingShifts(blocks, samplers, st, x, kx);
    for (int c = 0; c < chains; c++) {
      if (sweep < 20) {
        continue;
      }
      if (sweep < warmup && (bMatrix[c] == null || sweep % 50 == 0)) {
        bMatrix[c] = interceptResponse(blocks, samplers, c, kpsi, nProd);
      }
      SplitMix64 rng = Streams.stream(seed, c, -2, sweep, 7);
      double[] l = st.ridgeChol()[c];
      double[] z = new double[kpsi];
      for (int q = 0; q < kpsi; q++) {
        z[q] = rng.nextGaussian();
      }
      double[] shift = new double[kpsi];
      for (int q = 0; q < kpsi; q++) {
        double v = 0;
        for (int m = 0; m <= q; m++) {
          v += l[q * kpsi + m] * z[m];
        }
        // ATASTE=1: along the log L_kk axes only, each with sd = scale
        shift[q] = tasteOnly ? (q >= 2 && q < 2 + kx ? scale[c] * z[q] : 0.0) : scale[c] * v;
      }
      double[] bShift = new double[nProd];
      for (int j = 0; j < nProd; j++) {
        for (int q = 0; q < kpsi; q++) {
          bShift[j] += bMatrix[c][j * kpsi + q] * shift[q];
        }
      }
      Globals g0 = st.globals()[c];
      LocalParams[] lv = new LocalParams[levels + 1];
      Globals gk = g0;
      for (int k = 0; k <= levels; k++) {
        double f = (double) k / levels;
        double[] gp = g0.gammaPsi();
        for (int q = 0; q < kpsi; q++) {
          gp[q] += f * shift[q];
        }
        double[] kb = g0.kappabar();
        for (int j = 0; j < nProd; j++) {
          kb[j] += f * bShift[j];
        }
        gk = g0.withGammaPsi(gp).withKappabar(kb);
        lv[k] = Sweeps.localParams(new Globals[] {gk})[0];
      }
      double[] step = new double[kpsi];
      for (int q = 0; q < kpsi; q++) {
        step[q] = shift[q] / levels;
      }
      double logW = 0;
      double[][] saved = new double[blocks.size()][];
      for (int i = 0; i < blocks.size(); i++) {
        StoreChainState s = blocks.get(i).chains[c];
        saved[i] = s.position.clone();
        logW += annealedPath(samplers.get(i).target(), kpsi, rng, s.position, s, lv, step,
            hmcPerLevel, leapfrog, sweep < warmup);
      }
      double[] pm = priors.gammaPsiMean();
      double[] pv = priors.gammaPsiVar();
      double[] gOld = g0.gammaPsi();
      for (int q = 0; q < kpsi; q++) {
        double a = gOld[q] - pm[q];
        double bb = gOld[q] + shift[q] - pm[q];
        logW += -0.5 * (bb * bb - a * a) / pv[q];
      }
      double[] kOld = g0.kappabar();
      for (int j = 0; j < nProd; j++) {
        double a = kOld[j] - priors.kappabar().mean();
        double bb = kOld[j] + bShift[j] - priors.kappabar().mean();
        logW += -0.5 * (bb * bb - a * a) / priors.kappabar().var();
      }
      double acc = Double.isFinite(logW) ? Math.min(1, Math.exp(logW)) : 0;
      proposed++;
      if (Double.isFinite(logW)) {
        sumLogW += logW;
        sumLogW2 += logW * logW;
      }
      if (rng.nextDouble() < acc) {
        accepted++;
        st.globals()[c] = gk;
        for (int q = 0; q < kpsi; q++) {
          sumAbsShift[q] += Math.abs(shift[q]);
        }
      } else {
        for (int i = 0; i < blocks.size(); i++) {
          blocks.get(i).chains[c].position = saved[i];
        }
      }
      if (sweep < warmup) {
        scale[c] *= Math.exp((acc - 0.3) / Math.sqrt(sweep + 1.0));
      }
    }
    if (sweep % 50 == 49) {
      System.out.printf(
          "annealed move sweep %d: acceptance %.3f, mean log ratio %.2f, sd %.2f, scales %s%n",
          sweep, (double) accepted / proposed, sumLogW / proposed,
          Math.sqrt(sumLogW2 / proposed - Math.pow(sumLogW / proposed, 2)),
          java.util.Arrays.toString(
              java.util.Arrays.stream(scale).map(v -> Math.round(v * 1000) / 1000.0).toArray()));
    }
  }

  /**
   * Applies each chain's ridge shift accepted this sweep now (the sweep loop would apply it at the
   * start of the next sweep), so that a hook's move starts from locals consistent with the
   * globals.
   */
  static void applyPendingShifts(List<StoreBlock> blocks, List<StoreSampler> samplers,
      DriverState st, double[] x, int kx) {
    for (int c = 0; c < st.chains(); c++) {
      double[] pend = st.pendingShift()[c];
      if (pend != null) {
        for (int i = 0; i < blocks.size(); i++) {
          StoreBlock b = blocks.get(i);
          double[] nat = samplers.get(i).natural(b.chains[c].position);
          RidgeMove.apply(b.data, x, kx, nat, pend);
          b.chains[c].position = samplers.get(i).fromNatural(nat);
        }
        st.pendingShift()[c] = null;
      }
    }
  }

  /**
   * One store's part of an annealed joint move of the hierarchy and the locals (tempered
   * transitions, Neal 1996, Statistics and Computing 6; the non-equilibrium candidate form of
   * Nilmeier et al. 2011, PNAS 108): the globals step through {@code levels[0..K]} while the
   * store's {@code psi} (sampler coordinates, so intercepts and mean utilities follow their
   * share-keeping maps, unit Jacobian) shifts by {@code step} per level; between two shifts,
   * {@code hmcPerLevel} HMC transitions (position only, no Gibbs draw, no adaptation: each one
   * reversible for its level's conditional) let the rest of the locals follow. The protocol is
   * its own reverse for {@code -step} read backwards, so summing this log weight over stores and
   * adding the globals' prior ratio gives the move's Metropolis-Hastings log ratio.
   *
   * @param position sampler coordinates, updated in place to the path's end
   * @return sum over levels of {@code log p_k(x) - log p_(k-1)(x)} at the states the path passed
   */
  static double annealedPath(StoreTarget target, int kpsi, RandomGenerator rng,
      double[] position, StoreChainState tuning, LocalParams[] levels, double[] step,
      int hmcPerLevel, int leapfrog, boolean warmup) {
    int kLevels = levels.length - 1;
    double[] grad = new double[position.length];
    target.condition(levels[0]);
    double lpOld = target.logDensityAndGradient(position, grad);
    double logWeight = 0;
    double[] pos = position;
    for (int k = 1; k <= kLevels; k++) {
      for (int q = 0; q < kpsi; q++) {
        pos[q] += step[q];
      }
      target.condition(levels[k]);
      double lpNew = target.logDensityAndGradient(pos, grad);
      logWeight += lpNew - lpOld;
      if (!Double.isFinite(logWeight)) {
        return Double.NEGATIVE_INFINITY;
      }
      if (k == kLevels) {
        break;
      }
      Hmc.State state = new Hmc.State(pos, lpNew, grad);
      for (int h = 0; h < hmcPerLevel; h++) {
        double eps = (warmup ? tuning.stepAdapt.stepSize() : tuning.stepSize)
            * (0.9 + 0.2 * rng.nextDouble());
        state = Hmc.step(rng, state, target, eps, tuning.invMass, leapfrog).state();
      }
      pos = state.position().clone();
      grad = state.gradient().clone();
      lpOld = state.logDensity();
    }
    System.arraycopy(pos, 0, position, 0, pos.length);
    return logWeight;
  }

  /** Mean change of each product's intercept per unit psi shift (kt held), over its stores. */
  private static double[] interceptResponse(List<StoreBlock> blocks, List<StoreSampler> samplers,
      int c, int kpsi, int nProd) {
    double h = 0.01;
    double[] sum = new double[nProd * kpsi];
    int[] count = new int[nProd];
    for (int i = 0; i < blocks.size(); i++) {
      StoreBlock b = blocks.get(i);
      StoreSampler sm = samplers.get(i);
      double[] pos = b.chains[c].position;
      double[] nat = sm.natural(pos);
      int np = b.data.products.length;
      for (int l = 0; l < np; l++) {
        count[b.data.products[l]]++;
      }
      for (int q = 0; q < kpsi; q++) {
        double[] moved = pos.clone();
        moved[q] += h;
        double[] nat2 = sm.natural(moved);
        for (int l = 0; l < np; l++) {
          sum[b.data.products[l] * kpsi + q] += (nat2[kpsi + l] - nat[kpsi + l]) / h;
        }
      }
    }
    for (int j = 0; j < nProd; j++) {
      for (int q = 0; q < kpsi; q++) {
        sum[j * kpsi + q] /= Math.max(1, count[j]);
      }
    }
    return sum;
  }
}
