package aislecast.core.estimate;

import aislecast.core.demand.Heterogeneity;
import aislecast.core.diag.Diagnostics;
import aislecast.core.globals.Dims;
import aislecast.core.globals.Globals;
import aislecast.core.globals.Priors;
import aislecast.core.mcmc.DualAveraging;
import aislecast.core.mcmc.Hmc;
import aislecast.core.mcmc.StoreChainState;
import aislecast.core.mcmc.StoreSampler;
import aislecast.core.mcmc.StoreTarget;
import aislecast.core.mcmc.Target;
import aislecast.core.model.LocalParams;
import aislecast.core.model.StoreData;
import aislecast.core.rng.SplitMix64;
import aislecast.core.rng.Streams;
import aislecast.core.sim.SimSettings;
import java.util.ArrayList;
import java.util.List;

/**
 * Manual probe (not part of the sampler): after every regular sweep, one joint HMC move over the
 * hierarchy coefficients Gamma and every store's locals, in the non-centred form {@code psi_s =
 * Gamma' d_s + chol(V_psi) z_s} with the store's other coordinates (kt, eta) those of {@link
 * StoreTarget}; the other globals stay at their drawn values. A valid Gibbs block update of
 * (Gamma, locals) given the rest. It asks whether moving the hierarchy level and the stores'
 * configuration in one trajectory speeds up the taste-heterogeneity means, which neither more
 * ridge proposals nor more local work per sweep did.
 *
 * <p>Gradient: the joint log density is the sum of the stores' StoreTarget densities (whose psi
 * prior uses the current Gamma) plus Gamma's prior; {@code d/dz_s = L' g_s}, {@code d/dGamma[r,k]
 * = sum_s d_sr (g_s + V^-1 (psi_s - Gamma'd_s))_k} (the hierarchy term's explicit Gamma
 * dependence), with {@code g_s} StoreTarget's gradient in psi. Checked by central differences at
 * start ({@code main} prints the worst relative error).
 *
 * <p>Arguments: stores weeks products warmup keep draws; env LF, SEED, JLF (leapfrog steps of the joint
 * move, default LF), JOINT=0 to switch the joint move off (same loop otherwise), GAMMA_MASS=history (Gamma's inverse mass from the spread of its
 * warmup draws, default), ridge (from the ridge proposal's per-axis variance) or 0 (Gamma held);
 * FIXV=1 holds V_psi at each chain's value of sweep 50 (a diagnostic: the conditional posterior
 * given V_psi).
 */
public final class JointHmcProbe {
  static final class Joint implements Target {
    final List<StoreData> stores;
    final StoreTarget[] targets;
    final int kd;
    final int kpsi;
    final int[] off;
    final int dim;
    final Priors priors;
    LocalParams base;
    double[] chol;
    private final double[][] storePos;
    private final double[][] storeGrad;

    Joint(List<StoreData> stores, double[] x, int kx, int kd, Priors priors) {
      this.stores = stores;
      this.kd = kd;
      this.kpsi = Heterogeneity.dim(kx);
      this.priors = priors;
      targets = new StoreTarget[stores.size()];
      off = new int[stores.size() + 1];
      off[0] = kd * kpsi;
      storePos = new double[stores.size()][];
      storeGrad = new double[stores.size()][];
      for (int s = 0; s < stores.size(); s++) {
        targets[s] = new StoreTarget(stores.get(s), x, kx);
        off[s + 1] = off[s] + targets[s].dimension();
        storePos[s] = new double[targets[s].dimension()];
        storeGrad[s] = new double[targets[s].dimension()];
      }
      dim = off[stores.size()];
    }

    void condition(LocalParams g) {
      base = g;
      chol = g.vPsiChol();
    }

    @Override
    public int dimension() {
      return dim;
    }

    LocalParams withGamma(double[] gammaPsi) {
      LocalParams b = base;
      return new LocalParams(kpsi, gammaPsi, b.vPsiChol(), b.logDetVPsi(), b.kappabar(), b.tau2(),
          b.gamma(), b.sigmaXi2(), b.pi0(), b.pi(), b.lambda(), b.sigmaP2());
    }

    /** psi = Gamma'd + L z into out[0..kpsi). */
    void psi(double[] gammaPsi, double[] d, double[] z, int zOff, double[] out) {
      for (int k = 0; k < kpsi; k++) {
        double m = 0;
        for (int q = 0; q < kd; q++) {
          m += d[q] * gammaPsi[q * kpsi + k];
        }
        for (int q = 0; q <= k; q++) {
          m += chol[k * kpsi + q] * z[zOff + q];
        }
        out[k] = m;
      }
    }

    @Override
    public double logDensityAndGradient(double[] pos, double[] grad) {
      double[] gammaPsi = java.util.Arrays.copyOf(pos, kd * kpsi);
      LocalParams lp = withGamma(gammaPsi);
      double total = 0;
      double[] m0 = priors.gammaPsiMean();
      double[] v0 = priors.gammaPsiVar();
      for (int i = 0; i < kd * kpsi; i++) {
        double e = gammaPsi[i] - m0[i];
        total -= 0.5 * e * e / v0[i];
        grad[i] = -e / v0[i];
      }
      double[] w = new double[kpsi];
      for (int s = 0; s < stores.size(); s++) {
        StoreData d = stores.get(s);
        double[] sp = storePos[s];
        psi(gammaPsi, d.demographics, pos, off[s], sp);
        System.arraycopy(pos, off[s] + kpsi, sp, kpsi, sp.length - kpsi);
        targets[s].condition(lp);
        double v = targets[s].logDensityAndGradient(sp, storeGrad[s]);
        if (!Double.isFinite(v)) {
          return Double.NaN;
        }
        total += v;
        double[] g = storeGrad[s];
        // d/dz = L' g
        for (int q = 0; q < kpsi; q++) {
          double a = 0;
          for (int k = q; k < kpsi; k++) {
            a += chol[k * kpsi + q] * g[k];
          }
          grad[off[s] + q] = a;
        }
        // w = L^-T z (back substitution with the upper-triangular L')
        for (int k = kpsi - 1; k >= 0; k--) {
          double a = pos[off[s] + k];
          for (int q = k + 1; q < kpsi; q++) {
            a -= chol[q * kpsi + k] * w[q];
          }
          w[k] = a / chol[k * kpsi + k];
        }
        for (int r = 0; r < kd; r++) {
          for (int k = 0; k < kpsi; k++) {
            grad[r * kpsi + k] += d.demographics[r] * (g[k] + w[k]);
          }
        }
        System.arraycopy(g, kpsi, grad, off[s] + kpsi, g.length - kpsi);
      }
      return total;
    }

    /** Joint position from Gamma and the stores' sampler positions. */
    double[] position(double[] gammaPsi, List<StoreBlock> blocks, int chain) {
      double[] pos = new double[dim];
      System.arraycopy(gammaPsi, 0, pos, 0, kd * kpsi);
      double[] mean = new double[kpsi];
      for (int s = 0; s < stores.size(); s++) {
        double[] sp = blocks.get(s).chains[chain].position;
        double[] dd = stores.get(s).demographics;
        for (int k = 0; k < kpsi; k++) {
          double m = 0;
          for (int q = 0; q < kd; q++) {
            m += dd[q] * gammaPsi[q * kpsi + k];
          }
          mean[k] = m;
        }
        // z = L^-1 (psi - mean), forward substitution
        for (int k = 0; k < kpsi; k++) {
          double a = sp[k] - mean[k];
          for (int q = 0; q < k; q++) {
            a -= chol[k * kpsi + q] * pos[off[s] + q];
          }
          pos[off[s] + k] = a / chol[k * kpsi + k];
        }
        System.arraycopy(sp, kpsi, pos, off[s] + kpsi, sp.length - kpsi);
      }
      return pos;
    }

    /** Writes a joint position back into the stores' sampler positions; returns Gamma. */
    double[] writeBack(double[] pos, List<StoreBlock> blocks, int chain) {
      double[] gammaPsi = java.util.Arrays.copyOf(pos, kd * kpsi);
      for (int s = 0; s < stores.size(); s++) {
        StoreChainState st = blocks.get(s).chains[chain];
        psi(gammaPsi, stores.get(s).demographics, pos, off[s], st.position);
        System.arraycopy(pos, off[s] + kpsi, st.position, kpsi, st.position.length - kpsi);
      }
      return gammaPsi;
    }
  }

  public static void main(String[] args) {
    int nStores = Integer.parseInt(args[0]);
    int weeks = Integer.parseInt(args[1]);
    int products = Integer.parseInt(args[2]);
    int warm = Integer.parseInt(args[3]);
    int keep = Integer.parseInt(args[4]);
    int draws = Integer.parseInt(args[5]);
    boolean joint = !"0".equals(System.getenv("JOINT"));
    int leapfrog = Integer.parseInt(System.getenv().getOrDefault("LF", "8"));
    long seed = Long.parseLong(System.getenv().getOrDefault("SEED", "11"));
    int jointLeapfrog = Integer.parseInt(System.getenv().getOrDefault("JLF", "" + leapfrog));
    SimFixture f = new SimFixture(SimSettings.demo().withSizes(nStores, weeks, products, 3, 3, draws));
    var set = new SamplerSettings(4, warm, keep, 1, leapfrog, 0.8, seed, false, true);
    Priors priors = Priors.defaults(2, 3);
    int kx = f.catalog.attributes();
    double[] x = f.catalog.x();
    Dims dims = new Dims(2, Heterogeneity.dim(kx), f.catalog.size(), 1, 1);
    DriverState st = DriverState.start(InitialGlobals.of(f.stores, dims, kx, set));
    List<StoreBlock> blocks = new ArrayList<>();
    List<StoreSampler> samplers = new ArrayList<>();
    var params0 = Sweeps.localParams(st.globals());
    for (StoreData d : f.stores) {
      blocks.add(Sweeps.initStore(d, x, kx, params0, set));
      samplers.add(new StoreSampler(d, x, kx));
    }
    Joint[] jt = new Joint[4];
    DualAveraging[] da = new DualAveraging[4];
    double[] eps = new double[4];
    for (int c = 0; c < 4; c++) {
      jt[c] = new Joint(f.stores, x, kx, 2, priors);
      da[c] = DualAveraging.init(1.0);
      eps[c] = 1.0;
    }
    int kd = 2;
    int kpsi = dims.kpsi();
    double[][][] kept = new double[4][keep][];
    double acceptSum = 0;
    int acceptN = 0;
    long t0 = System.nanoTime();
    boolean checked = false;
    boolean fixV = "1".equals(System.getenv("FIXV"));
    double[][] heldV = new double[4][];
    for (int sweep = 0; sweep < set.totalSweeps(); sweep++) {
      SweepInput in = Sweeps.input(st, set);
      SweepStats stats = new SweepStats(dims, 4);
      for (int i = 0; i < blocks.size(); i++) {
        SweepStats part = new SweepStats(dims, 4);
        Sweeps.sweepStore(blocks.get(i), samplers.get(i), x, kx, in, set, sweep, part);
        stats.merge(part);
      }
      st = Sweeps.driverStep(st, stats, in, priors, set);
      if (fixV && sweep >= 50) {
        // diagnostic: hold V_psi at each chain's value of sweep 50 (a conditional posterior)
        Globals[] gs = st.globals().clone();
        for (int c = 0; c < 4; c++) {
          if (heldV[c] == null) {
            heldV[c] = gs[c].vPsi();
          }
          gs[c] = gs[c].withVPsi(heldV[c]);
        }
        st = new DriverState(gs, st.ridgeScale(), st.ridgeChol(), st.ridgeHistory(),
            st.pendingShift(), st.ridgeAccepted(), st.ridgeProposed(), st.nextSweep());
      }
      if (joint && sweep >= 20) {
        Globals[] gs = st.globals().clone();
        double[][] pending = st.pendingShift().clone();
        LocalParams[] lps = Sweeps.localParams(gs);
        for (int c = 0; c < 4; c++) {
          // make the locals agree with the globals just drawn: apply the accepted ridge shift now
          if (pending[c] != null) {
            for (int i = 0; i < blocks.size(); i++) {
              StoreChainState s = blocks.get(i).chains[c];
              double[] nat = samplers.get(i).natural(s.position);
              RidgeMove.apply(f.stores.get(i), x, kx, nat, pending[c]);
              s.position = samplers.get(i).fromNatural(nat);
            }
            pending[c] = null;
          }
          Joint j = jt[c];
          j.condition(lps[c]);
          double[] pos = j.position(gs[c].gammaPsi(), blocks, c);
          if (!checked) {
            checked = true;
            double[] g = new double[j.dimension()];
            j.logDensityAndGradient(pos, g);
            double worst = 0;
            java.util.Random pick = new java.util.Random(1);
            int[] idx = new int[60];
            for (int q = 0; q < idx.length; q++) {
              idx[q] = q < kd * kpsi ? q : pick.nextInt(j.dimension());
            }
            double[] tmp = new double[j.dimension()];
            for (int q : idx) {
              double h = 1e-5;
              double[] p1 = pos.clone();
              p1[q] += h;
              double[] p2 = pos.clone();
              p2[q] -= h;
              double fd = (j.logDensityAndGradient(p1, tmp) - j.logDensityAndGradient(p2, tmp))
                  / (2 * h);
              worst = Math.max(worst, Math.abs(fd - g[q]) / Math.max(1.0, Math.abs(g[q])));
            }
            System.out.printf("joint gradient vs central differences, 60 coordinates: worst"
                + " relative error %.2e%n", worst);
          }
          // inverse mass: each store's own (times its step size squared, so that a global step
          // of 1 is that store's tuned step); z from psi's by 1/V_kk; Gamma from the ridge
          // history's spread of the intercept row, for both rows
          double[] inv = new double[j.dimension()];
          double typical = 0;
          for (int i = 0; i < blocks.size(); i++) {
            StoreChainState s = blocks.get(i).chains[c];
            double e = s.iteration < set.localWarmup() ? s.stepAdapt.stepSize() : s.stepSize;
            typical += e / blocks.size();
            for (int k = 0; k < s.invMass.length; k++) {
              double m = s.invMass[k] * e * e;
              if (k < kpsi) {
                m /= gs[c].vPsi()[k * kpsi + k];
              }
              inv[j.off[i] + k] = m;
            }
          }
          double[] hv = st.ridgeHistory()[c].count() > 5 ? st.ridgeHistory()[c].covariance() : null;
          String gm = System.getenv().getOrDefault("GAMMA_MASS", "history");
          double[] rl = st.ridgeChol()[c];
          for (int r = 0; r < kd; r++) {
            for (int k = 0; k < kpsi; k++) {
              double v = hv == null ? 0.01 : Math.max(hv[k * kpsi + k], 1e-4);
              if (gm.equals("ridge")) {
                // the ridge proposal's per-axis variance (scale^2 times the row of L L')
                double q = 0;
                for (int m = 0; m <= k; m++) {
                  q += rl[k * kpsi + m] * rl[k * kpsi + m];
                }
                v = st.ridgeScale()[c] * st.ridgeScale()[c] * q;
              }
              inv[r * kpsi + k] = gm.equals("0") ? 1e-12 : v * typical * typical;
            }
          }
          SplitMix64 rng = Streams.stream(seed, c, -1, sweep, 7);
          double e = sweep < warm ? da[c].stepSize() : eps[c];
          e *= 0.9 + 0.2 * rng.nextDouble();
          Hmc.Step step = Hmc.step(rng, Hmc.State.init(j, pos), j, e, inv, jointLeapfrog);
          if (sweep < warm) {
            da[c] = da[c].update(step.info().acceptProb(), 0.8);
            if (sweep == warm - 1) {
              eps[c] = da[c].finalStepSize();
            }
          } else {
            acceptSum += step.info().acceptProb();
            acceptN++;
          }
          if (step.info().accepted()) {
            double[] gamma = j.writeBack(step.state().position(), blocks, c);
            gs[c] = gs[c].withGammaPsi(gamma);
          }
        }
        st = new DriverState(gs, st.ridgeScale(), st.ridgeChol(), st.ridgeHistory(), pending,
            st.ridgeAccepted(), st.ridgeProposed(), st.nextSweep());
      }
      if (sweep >= warm) {
        for (int c = 0; c < 4; c++) {
          kept[c][sweep - warm] = st.globals()[c].toFlat();
        }
      }
    }
    System.out.printf("%.1f s, joint %s, joint acceptance %.2f, final joint steps %.3f %.3f %.3f"
        + " %.3f%n", (System.nanoTime() - t0) / 1e9, joint, acceptSum / Math.max(1, acceptN),
        eps[0], eps[1], eps[2], eps[3]);
    String[] names = Globals.parameterNames(dims);
    double[] truth = f.truth.toFlat();
    int covered = 0;
    double maxRhat = 0;
    for (int p = 0; p < names.length; p++) {
      double[][] ch = new double[4][keep];
      for (int c = 0; c < 4; c++) {
        for (int i = 0; i < keep; i++) {
          ch[c][i] = kept[c][i][p];
        }
      }
      var s = Diagnostics.summarize(ch);
      boolean inside = truth[p] >= s.q05() && truth[p] <= s.q95();
      covered += inside ? 1 : 0;
      maxRhat = Math.max(maxRhat, s.rhat());
      System.out.printf("%-22s truth %8.3f mean %8.3f [%8.3f %8.3f] %s rhat %.3f essb %.0f%n",
          names[p], truth[p], s.mean(), s.q05(), s.q95(), inside ? " " : "*", s.rhat(),
          s.essBulk());
    }
    System.out.printf("covered %d/%d, max rhat %.3f%n", covered, names.length, maxRhat);
  }
}
