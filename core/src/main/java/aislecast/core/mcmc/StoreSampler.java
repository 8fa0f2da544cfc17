package aislecast.core.mcmc;

import aislecast.core.demand.Heterogeneity;
import aislecast.core.demand.ShareInversion;
import aislecast.core.model.LocalParams;
import aislecast.core.model.StoreData;
import org.apache.commons.math3.random.RandomGenerator;

/**
 * The local block of one store for one chain: an HMC move on {@code (psi_s, kappa_s, delta_s)},
 * then an exact Gibbs draw of {@code kappa_s} given the rest (cheap, and it refreshes the
 * intercepts between trajectories). Both leave the store's
 * conditional posterior given the globals invariant, so any number of them per sweep keeps the
 * whole scheme exact. During warmup the HMC step size follows dual averaging and the diagonal
 * mass matrix is re-estimated at the end of each slow window ({@link WarmupSchedule}). After
 * warmup the momentum can be kept from one transition to the next and refreshed partially
 * ({@link Settings#persistence}), so a store's locals keep drifting the same way across sweeps
 * instead of restarting a random walk at every sweep.
 */
public final class StoreSampler {
  /**
   * Tuning that stays fixed for a run.
   *
   * @param persistence after warmup, the weight of the kept momentum in each partial refresh
   *     ({@link Hmc#stepPersistent}); 0: a fresh momentum every transition
   */
  public record Settings(int warmup, int leapfrogSteps, double targetAccept, double persistence) {
    public Settings {
      if (warmup < 0 || leapfrogSteps < 1 || !(targetAccept > 0 && targetAccept < 1)
          || !(persistence >= 0 && persistence < 1)) {
        throw new IllegalArgumentException("bad local sampler settings");
      }
    }

    public Settings(int warmup, int leapfrogSteps, double targetAccept) {
      this(warmup, leapfrogSteps, targetAccept, 0.0);
    }
  }

  private final StoreTarget target;
  private final StoreData d;
  private final int kpsi;
  private final double[] sums;
  private final double[] varBuf;
  private final double[] kappaBuf;

  public StoreSampler(StoreData d, double[] x, int kx) {
    this.d = d;
    this.target = new StoreTarget(d, x, kx);
    this.kpsi = Heterogeneity.dim(kx);
    this.sums = new double[2 * d.products.length];
    this.varBuf = new double[kpsi + d.products.length + d.rows()];
    this.kappaBuf = new double[d.products.length];
  }

  /**
   * A starting state: psi at its prior mean, delta by inverting the observed shares (a zero-unit
   * row uses half a unit), kappa from a Gibbs draw given that delta.
   */
  public StoreChainState init(RandomGenerator rng, LocalParams g, double[] x, int kx) {
    double[] psi = new double[kpsi];
    g.psiMean(d.demographics, psi);
    for (int k = 0; k < kpsi; k++) {
      psi[k] += 0.1 * rng.nextGaussian();
    }
    double[] delta = invertShares(psi, x, kx);
    int np = d.products.length;
    double[] pos = new double[kpsi + np + d.rows()];
    System.arraycopy(psi, 0, pos, 0, kpsi);
    System.arraycopy(delta, 0, pos, kpsi + np, delta.length);
    double[] kappa = new double[np];
    KappaGibbs.draw(rng, d, g, delta, sums, kappa);
    System.arraycopy(kappa, 0, pos, kpsi, np);
    StoreChainState s = new StoreChainState();
    s.position = new double[pos.length];
    target.fromNatural(pos, s.position);
    s.invMass = new double[pos.length];
    for (int k = 0; k < kpsi; k++) {
      s.invMass[k] = 0.01;
    }
    for (int row = 0; row < d.rows(); row++) {
      // conditional precision of delta is about the units sold plus the prior's precision
      double prec = d.units[row] + 1.0 / g.sigmaXi2() + g.lambda() * g.lambda() / g.sigmaP2();
      s.invMass[kpsi + np + row] = 1.0 / prec;
    }
    for (int l = 0; l < np; l++) {
      s.invMass[kpsi + l] = g.tau2() / (1 + d.markets() * g.tau2() / g.sigmaXi2());
    }
    s.stepSize = 0.1;
    s.stepAdapt = DualAveraging.init(s.stepSize);
    s.window = new Welford(pos.length);
    return s;
  }

  private double[] invertShares(double[] psi, double[] x, int kx) {
    int r = d.shoppers;
    int jCat = x.length / Math.max(1, kx);
    int jmax = d.maxAssortment();
    double[] alpha = new double[r];
    double[] mu = new double[r * jCat];
    Heterogeneity.shopperTastes(psi, kx, d.nu, r, x, jCat, alpha, mu);
    double[] v = new double[r * jmax];
    double[] target = new double[jmax];
    double[] del = new double[jmax];
    double[] delta = new double[d.rows()];
    ShareInversion inv = new ShareInversion(r, jmax);
    for (int t = 0; t < d.markets(); t++) {
      int a = d.rowStart[t];
      int j = d.rowStart[t + 1] - a;
      long inside = 0;
      for (int p = 0; p < j; p++) {
        inside += d.units[a + p];
      }
      double m = d.marketSize[t];
      for (int p = 0; p < j; p++) {
        target[p] = Math.max(d.units[a + p], 0.5) / m;
        del[p] = Math.log(target[p]) - Math.log(Math.max(m - inside, 0.5) / m);
        for (int i = 0; i < r; i++) {
          v[i * j + p] = mu[i * jCat + d.product[a + p]] - alpha[i] * d.price[a + p];
        }
      }
      inv.invert(r, j, v, target, del, 1e-8, 50);
      System.arraycopy(del, 0, delta, a, j);
    }
    return delta;
  }

  /**
   * Probe switch (diagnostics only, never set by the product): psi keeps its value, its inverse
   * mass set to 1e-300 so the HMC trajectory moves it by nothing; the rest of the locals are then
   * sampled from their conditional given psi.
   */
  public static volatile boolean holdPsi = false;

  /**
   * Probe switch: the sampler coordinate of delta ({@code eta = delta + g(psi)}) is held the same
   * way, so together with {@link #holdPsi} delta keeps its value; kappa is still drawn given it.
   */
  public static volatile boolean holdDelta = false;

  /**
   * One local transition (HMC on (psi, delta), then Gibbs on kappa), updating {@code s} in place.
   *
   * @param warmup whether this transition adapts the tuning
   */
  public Hmc.Info step(RandomGenerator rng, StoreChainState s, LocalParams g, Settings set) {
    target.condition(g);
    Hmc.State state = Hmc.State.init(target, s.position);
    boolean adapting = s.iteration < set.warmup();
    double eps = adapting ? s.stepAdapt.stepSize() : s.stepSize;
    // jitter the step size by +-10% so trajectories don't resonate (Neal 2011, section 5.4.2.2)
    eps *= 0.9 + 0.2 * rng.nextDouble();
    double[] im = s.invMass;
    if (holdPsi || holdDelta) {
      im = im.clone();
      java.util.Arrays.fill(im, holdPsi ? 0 : kpsi + d.products.length,
          holdDelta ? im.length : kpsi, 1e-300);
    }
    Hmc.Step st;
    double persistence = set.persistence();
    if (persistence > 0 && !adapting) {
      if (s.momentum == null) {
        s.momentum = new double[im.length];
        for (int i = 0; i < im.length; i++) {
          s.momentum[i] = rng.nextGaussian() / Math.sqrt(im[i]);
        }
      }
      st = Hmc.stepPersistent(rng, state, target, eps, im, set.leapfrogSteps(), s.momentum,
          persistence);
    } else {
      st = Hmc.step(rng, state, target, eps, im, set.leapfrogSteps());
    }
    s.position = st.state().position();
    s.logDensity = st.state().logDensity();
    // Gibbs on kappa given (psi, delta): in sampler coordinates kt = kappa + gbar(psi), a
    // bijection at fixed (psi, eta), so this is the same exact conditional draw
    double[] nat = natural(s.position);
    int np = d.products.length;
    double[] delta = java.util.Arrays.copyOfRange(nat, kpsi + np, nat.length);
    KappaGibbs.draw(rng, d, g, delta, sums, kappaBuf);
    for (int l = 0; l < np; l++) {
      s.position[kpsi + l] += kappaBuf[l] - nat[kpsi + l];
    }
    Hmc.Info info = st.info();
    if (adapting) {
      adapt(s, info, set);
    }
    s.iteration++;
    s.transitions++;
    s.acceptSum += info.acceptProb();
    if (info.accepted()) {
      s.accepted++;
    }
    if (info.divergent()) {
      s.divergent++;
    }
    return info;
  }

  private void adapt(StoreChainState s, Hmc.Info info, Settings set) {
    WarmupSchedule sched = WarmupSchedule.of(set.warmup());
    int i = s.iteration;
    s.stepAdapt = s.stepAdapt.update(info.acceptProb(), set.targetAccept());
    if (sched.inSlowWindow(i)) {
      s.window.add(s.position);
    }
    if (sched.endsWindow(i) && s.window.count() > 2) {
      // regularised towards a small multiple of identity, as Stan does
      long n = s.window.count();
      s.window.variance(varBuf);
      for (int k = 0; k < varBuf.length; k++) {
        s.invMass[k] = (n / (n + 5.0)) * varBuf[k] + 1e-3 * (5.0 / (n + 5.0));
      }
      s.window.reset();
      // a momentum kept from before (a warm-started block) belongs to the old mass matrix
      s.momentum = null;
      s.stepAdapt = DualAveraging.init(s.stepAdapt.stepSize());
    }
    if (i == set.warmup() - 1) {
      s.stepSize = s.stepAdapt.finalStepSize();
    }
  }

  /** This store's local target (probes evaluate it at other globals). */
  public StoreTarget target() {
    return target;
  }

  /** The sales log likelihood at a position in natural coordinates [psi, kappa, delta]. */
  public double salesLogLikelihood(double[] natural) {
    return target.salesLogLikelihoodNatural(natural);
  }

  /** A sampler position in natural coordinates [psi, kappa, delta]; new array. */
  public double[] natural(double[] position) {
    double[] nat = new double[position.length];
    target.toNatural(position, nat);
    return nat;
  }

  /** Natural coordinates back to a sampler position; new array. */
  public double[] fromNatural(double[] natural) {
    double[] pos = new double[natural.length];
    target.fromNatural(natural, pos);
    return pos;
  }

  public double[] psi(StoreChainState s) {
    return java.util.Arrays.copyOfRange(s.position, 0, kpsi);
  }
}
