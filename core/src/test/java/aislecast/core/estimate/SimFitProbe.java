package aislecast.core.estimate;

import aislecast.core.diag.Diagnostics;
import aislecast.core.globals.Priors;
import aislecast.core.globals.Globals;
import aislecast.core.sim.SimSettings;

/**
 * Manual probe (not a test): fit simulated data and print summaries against the truth, the ridge
 * proposal's final sd per psi component, and the slowest joint directions of the global draws.
 * Environment: LF (leapfrog steps, default 16), RIDGE=0 (ridge move off), SEED (sampler seed,
 * default 11), COLLAPSE_XI=0 (ridge target with sigma_xi^2 held instead of integrated out),
 * DUMP=prefix (write prefix_globals.csv, prefix_truth.csv, prefix_psi.csv).
 */
public final class SimFitProbe {
  /**
   * The slowest joint directions of the global draws: eigenvectors of the covariance of batch
   * means (batches of {@code batch} sweeps, every chain) of the standardised draws. For
   * independent draws every eigenvalue would be about 1 / batch; a large one is a mode the
   * sampler crosses slowly, and its loadings say which parameters move together in it.
   */
  static void slowDirections(double[][][] draws, String[] names, int batch) {
    int chains = draws.length;
    int n = draws[0].length;
    int p = names.length;
    double[] mean = new double[p];
    double[] sd = new double[p];
    for (int q = 0; q < p; q++) {
      double s = 0, ss = 0;
      for (double[][] ch : draws) for (double[] d : ch) { s += d[q]; ss += d[q] * d[q]; }
      mean[q] = s / (chains * n);
      sd[q] = Math.sqrt(Math.max(ss / (chains * n) - mean[q] * mean[q], 0));
    }
    java.util.List<double[]> bm = new java.util.ArrayList<>();
    for (double[][] ch : draws) {
      for (int b = 0; b + batch <= n; b += batch) {
        double[] m = new double[p];
        for (int i = b; i < b + batch; i++) for (int q = 0; q < p; q++) m[q] += sd[q] > 0 ? (ch[i][q] - mean[q]) / sd[q] / batch : 0;
        bm.add(m);
      }
    }
    var cov = new org.ejml.data.DMatrixRMaj(p, p);
    for (double[] m : bm) for (int i = 0; i < p; i++) for (int j = 0; j < p; j++) cov.add(i, j, m[i] * m[j] / (bm.size() - 1));
    var eig = org.ejml.dense.row.factory.DecompositionFactory_DDRM.eig(p, true, true);
    eig.decompose(cov);
    Integer[] order = new Integer[p];
    for (int i = 0; i < p; i++) order[i] = i;
    java.util.Arrays.sort(order, (a, b) -> Double.compare(eig.getEigenvalue(b).real, eig.getEigenvalue(a).real));
    System.out.printf("slow directions (batch-mean covariance eigenvalues; independent draws ~ %.3f):%n", 1.0 / batch);
    for (int e = 0; e < 2; e++) {
      var v = eig.getEigenVector(order[e]);
      Integer[] idx = new Integer[p];
      for (int i = 0; i < p; i++) idx[i] = i;
      java.util.Arrays.sort(idx, (a, b) -> Double.compare(Math.abs(v.get(b)), Math.abs(v.get(a))));
      StringBuilder sb = new StringBuilder(String.format("  %.2f:", eig.getEigenvalue(order[e]).real));
      for (int i = 0; i < 10; i++) sb.append(String.format(" %s %+.2f", names[idx[i]], v.get(idx[i])));
      System.out.println(sb);
    }
  }

  /** The simulation's true natural locals [psi, kappa, delta] of one store. */
  public static double[] truthLocals(SimFixture f, aislecast.core.model.StoreData d) {
    var sim = f.sim;
    int kp = f.dims.kpsi();
    int nJ = sim.products();
    int s = d.storeIndex;
    java.util.Map<String, Double> dl = new java.util.HashMap<>();
    for (int i = 0; i < sim.rows; i++) {
      if (sim.rowStore[i] == s) dl.put(sim.weekDates[sim.rowWeek[i]] + "/" + sim.rowProduct[i], sim.delta[i]);
    }
    int np = d.products.length;
    double[] nat = new double[kp + np + d.rows()];
    System.arraycopy(sim.psi, s * kp, nat, 0, kp);
    for (int l = 0; l < np; l++) nat[kp + l] = sim.kappa[s * nJ + d.products[l]];
    for (int tt = 0; tt < d.markets(); tt++) for (int r = d.rowStart[tt]; r < d.rowStart[tt + 1]; r++) nat[kp + np + r] = dl.get(d.weeks[tt] + "/" + d.product[r]);
    return nat;
  }

  static final boolean fixGlobals = System.getenv("FIXG") != null;

  /** Adds {sum xi^2, sum squared price residual, rows} at natural locals under g into acc. */
  static void residuals(aislecast.core.model.StoreData d, aislecast.core.model.LocalParams g,
      double[] nat, int kp, double[] acc) {
    int np = d.products.length;
    double[] kappa = java.util.Arrays.copyOfRange(nat, kp, kp + np);
    double[] delta = java.util.Arrays.copyOfRange(nat, kp + np, kp + np + d.rows());
    for (int row = 0; row < d.rows(); row++) {
      double xi = aislecast.core.model.StoreDensity.xi(d, g, kappa, delta, row);
      double rr = d.logPrice[row] - g.pi0()[d.product[row]] - g.lambda() * xi;
      for (int k = 0; k < d.kc; k++) rr -= d.c[row * d.kc + k] * g.pi()[k];
      acc[0] += xi * xi; acc[1] += rr * rr; acc[2]++;
    }
  }

  /** Store-level log density terms summed over stores at natural locals under g. */
  static aislecast.core.model.StoreDensity.Terms terms(SimFixture f, aislecast.core.model.LocalParams g,
      java.util.function.IntFunction<double[]> natural) {
    int kp = f.dims.kpsi();
    var t = new aislecast.core.model.StoreDensity.Terms(0, 0, 0, 0, 0);
    for (int si = 0; si < f.stores.size(); si++) {
      var d = f.stores.get(si);
      double[] nat = natural.apply(si);
      int np = d.products.length;
      t = t.plus(aislecast.core.model.StoreDensity.terms(d, f.catalog.x(), f.catalog.attributes(), g,
          java.util.Arrays.copyOfRange(nat, 0, kp), java.util.Arrays.copyOfRange(nat, kp, kp + np),
          java.util.Arrays.copyOfRange(nat, kp + np, kp + np + d.rows())));
    }
    return t;
  }

  /**
   * With the globals held at the truth, the locals' draws must reproduce the truth's own
   * statistics (a draw and the truth have the same joint law with the data given the globals):
   * mean xi^2 and mean squared price residual over rows, and the stores' mean psi. Every 25 sweeps.
   */
  static void localSummary(SimFixture f, java.util.List<StoreBlock> blocks,
      java.util.List<aislecast.core.mcmc.StoreSampler> samplers, int sweep) {
    if (sweep % 25 != 24) return;
    int kp = f.dims.kpsi();
    var g = Sweeps.localParams(new Globals[] {f.truth})[0];
    StringBuilder b = new StringBuilder(String.format("sweep %4d", sweep + 1));
    for (int c = -1; c < blocks.get(0).chains.length; c++) {
      double[] acc = new double[3];
      double[] psiMean = new double[kp];
      for (int i = 0; i < blocks.size(); i++) {
        var d = f.stores.get(i);
        double[] nat = c < 0 ? truthLocals(f, d) : samplers.get(i).natural(blocks.get(i).chains[c].position);
        residuals(d, g, nat, kp, acc);
        for (int k = 0; k < kp; k++) psiMean[k] += nat[k] / blocks.size();
      }
      b.append(String.format(" | %s xi2 %.5f res2 %.5f psi", c < 0 ? "truth" : "c" + c, acc[0] / acc[2], acc[1] / acc[2]));
      for (int k = 0; k < 5; k++) b.append(String.format(" %.2f", psiMean[k]));
    }
    System.out.println(b);
  }

  /**
   * Store-level log density terms (sales, price, xi, kappa, psi) summed over stores at the
   * simulation's true locals and globals, and at each chain's final state; and the truth's mean
   * xi^2 and squared price residual against sigma_xi2 and sigma_p2 (a check of the fixture).
   */
  /**
   * Own-price elasticity of every product, averaged over the stores' last week in which it is
   * stocked, at natural locals per store: the quantity scenarios depend on most.
   */
  static double[] ownElasticities(SimFixture f, java.util.function.IntFunction<double[]> natural) {
    int kx = f.catalog.attributes();
    double[] x = f.catalog.x();
    int kp = f.dims.kpsi();
    int jCat = x.length / kx;
    double[] sum = new double[jCat];
    double[] cnt = new double[jCat];
    for (int si = 0; si < f.stores.size(); si++) {
      var d = f.stores.get(si);
      double[] nat = natural.apply(si);
      int r = d.shoppers;
      double[] alpha = new double[r];
      double[] mu = new double[r * jCat];
      aislecast.core.demand.Heterogeneity.shopperTastes(nat, kx, d.nu, r, x, jCat, alpha, mu);
      int np = d.products.length;
      boolean[] seen = new boolean[jCat];
      for (int t = d.markets() - 1; t >= 0; t--) {
        int a = d.rowStart[t];
        int j = d.rowStart[t + 1] - a;
        double[] v = new double[r * j];
        double[] del = new double[j];
        double[] pr = new double[j];
        for (int q = 0; q < j; q++) {
          del[q] = nat[kp + np + a + q];
          pr[q] = d.price[a + q];
          for (int i = 0; i < r; i++) v[i * j + q] = mu[i * jCat + d.product[a + q]] - alpha[i] * pr[q];
        }
        double[] sh = new double[j];
        double[] probs = new double[r * j];
        aislecast.core.demand.ShareKernel.shares(r, j, del, v, sh, probs);
        double[] jac = new double[j * j];
        aislecast.core.demand.ShareKernel.jacobianPrice(r, j, probs, alpha, jac);
        double[] el = new double[j * j];
        aislecast.core.demand.ShareKernel.elasticities(j, jac, sh, pr, el);
        for (int q = 0; q < j; q++) {
          int prod = d.product[a + q];
          if (!seen[prod]) {
            seen[prod] = true;
            sum[prod] += el[q * j + q];
            cnt[prod]++;
          }
        }
      }
    }
    for (int p = 0; p < jCat; p++) sum[p] /= Math.max(1, cnt[p]);
    return sum;
  }

  static void truthDensity(SimFixture f, InProcessRunner.Result res) {
    int kp = f.dims.kpsi();
    var gt = Sweeps.localParams(new Globals[] {f.truth})[0];
    double[] acc = new double[3];
    for (var d : f.stores) {
      residuals(d, gt, truthLocals(f, d), kp, acc);
    }
    // the model's shares at the true locals against the simulator's: the same model, same draws?
    double maxDiff = 0;
    int kx = f.catalog.attributes();
    double[] x = f.catalog.x();
    int jCat = x.length / kx;
    for (var d : f.stores) {
      double[] nat = truthLocals(f, d);
      java.util.Map<String, Double> simShare = new java.util.HashMap<>();
      for (int i = 0; i < f.sim.rows; i++) {
        if (f.sim.rowStore[i] == d.storeIndex) simShare.put(f.sim.weekDates[f.sim.rowWeek[i]] + "/" + f.sim.rowProduct[i], f.sim.share[i]);
      }
      int r = d.shoppers;
      double[] alpha = new double[r];
      double[] mu = new double[r * jCat];
      aislecast.core.demand.Heterogeneity.shopperTastes(nat, kx, d.nu, r, x, jCat, alpha, mu);
      int np = d.products.length;
      for (int t = 0; t < d.markets(); t++) {
        int a = d.rowStart[t];
        int j = d.rowStart[t + 1] - a;
        double[] v = new double[r * j];
        double[] del = new double[j];
        for (int q = 0; q < j; q++) {
          del[q] = nat[kp + np + a + q];
          for (int i = 0; i < r; i++) v[i * j + q] = mu[i * jCat + d.product[a + q]] - alpha[i] * d.price[a + q];
        }
        double[] sh = new double[j];
        aislecast.core.demand.ShareKernel.shares(r, j, del, v, sh, null);
        for (int q = 0; q < j; q++) {
          double ref = simShare.get(d.weeks[t] + "/" + d.product[a + q]);
          maxDiff = Math.max(maxDiff, Math.abs(sh[q] - ref) / ref);
        }
      }
    }
    System.out.printf("model shares at the true locals vs the simulator's: max relative difference %.2e%n", maxDiff);
    System.out.printf("truth rows %.0f: mean xi^2 %.5f (sigma_xi2 %.5f), mean squared price residual %.5f (sigma_p2 %.5f)%n", acc[2], acc[0] / acc[2], f.truth.sigmaXi2(), acc[1] / acc[2], f.truth.sigmaP2());
    var t = terms(f, gt, si -> truthLocals(f, f.stores.get(si)));
    System.out.printf("truth   total %12.1f  sales %12.1f price %10.1f xi %10.1f kappa %8.1f psi %8.1f%n", t.total(), t.sales(), t.price(), t.xi(), t.kappa(), t.psi());
    for (int c = 0; c < res.last().chains(); c++) {
      final int chain = c;
      var gc = Sweeps.localParams(new Globals[] {res.last().globals()[c]})[0];
      var u = terms(f, gc, si -> new aislecast.core.mcmc.StoreSampler(f.stores.get(si), f.catalog.x(), f.catalog.attributes())
          .natural(res.stores().get(si).chains[chain].position));
      System.out.printf("chain %d total %12.1f  sales %12.1f price %10.1f xi %10.1f kappa %8.1f psi %8.1f%n", c, u.total(), u.sales(), u.price(), u.xi(), u.kappa(), u.psi());
    }
  }

  public static void main(String[] args) throws Exception {
    int stores = Integer.parseInt(args[0]);
    int weeks = Integer.parseInt(args[1]);
    int products = Integer.parseInt(args[2]);
    int warm = Integer.parseInt(args[3]);
    int keep = Integer.parseInt(args[4]);
    int local = Integer.parseInt(args[5]);
    int draws = Integer.parseInt(args[6]);
    SimSettings st = SimSettings.demo().withSizes(stores, weeks, products, 3, 3, draws);
    if (System.getenv("DATA_SEED") != null) {
      st = st.withSeed(Long.parseLong(System.getenv("DATA_SEED")));
    }
    SimFixture f = new SimFixture(st);
    int leapfrog = Integer.parseInt(System.getenv().getOrDefault("LF", "16"));
    var set = new SamplerSettings(4, warm, keep, local, leapfrog, Double.parseDouble(System.getenv().getOrDefault("TACC", "0.8")), Long.parseLong(System.getenv().getOrDefault("SEED", "11")), false, !"0".equals(System.getenv("RIDGE")),
        Double.parseDouble(System.getenv().getOrDefault("PERSIST",
            String.valueOf(SamplerSettings.DEFAULT_MOMENTUM_PERSISTENCE))));
    RidgeMove.collapseNoiseVariance = !"0".equals(System.getenv("COLLAPSE_XI"));
    aislecast.core.mcmc.StoreSampler.holdPsi = System.getenv("FIXPSI") != null;
    aislecast.core.mcmc.StoreSampler.holdDelta = System.getenv("FIXDELTA") != null;
    RidgeMove.collapsePriceNoise = !"0".equals(System.getenv("COLLAPSE_P"));
    long t0 = System.nanoTime();
    Priors priors = Priors.defaults(2, 3);
    if (System.getenv("VS0") != null) {
      // probe: V_psi ~ Inv-Wishart(nu0 + VNU, VS0 * nu0 I) instead of the default 0.1 nu0 I
      int kp = priors.vPsi().dim();
      double nu0 = kp + 3 + Double.parseDouble(System.getenv().getOrDefault("VNU", "0"));
      double[] s0 = new double[kp * kp];
      for (int i = 0; i < kp; i++) s0[i * kp + i] = Double.parseDouble(System.getenv("VS0")) * nu0;
      priors = priors.withVPsi(new aislecast.core.globals.InvWishart(nu0, s0, kp));
    }
    if (System.getenv("NOISE_SCALE") != null) {
      // probe: Inv-Gamma(2, s) for sigma_xi2 and sigma_p2 instead of the default scale 0.5
      // (NOISE_SCALE_P / NOISE_SCALE_XI set one of them only)
      String both = System.getenv("NOISE_SCALE");
      double sp = Double.parseDouble(System.getenv().getOrDefault("NOISE_SCALE_P", both));
      double sx = Double.parseDouble(System.getenv().getOrDefault("NOISE_SCALE_XI", both));
      priors = new Priors(priors.kd(), priors.kpsi(), priors.gammaPsiMean(), priors.gammaPsiVar(),
          priors.vPsi(), priors.kappabar(), priors.tau2(), priors.gamma(), priors.pi0(), priors.pi(),
          priors.lambda(), new aislecast.core.globals.InvGamma(priors.sigmaXi2().shape(), sx),
          new aislecast.core.globals.InvGamma(priors.sigmaP2().shape(), sp));
    }
    if (System.getenv("HOLDH") != null) {
      // diagnostic: the hierarchy (Gamma, V_psi) held at the truth by point-mass priors
      // (HOLDH=gamma: Gamma only; row0 / row1: one row of Gamma only)
      int kp = f.dims.kpsi();
      String hold = System.getenv("HOLDH");
      // HOLDH_FROM=<DUMP prefix>: hold at chain 0's last kept draw of an earlier run instead
      double[] heldGamma = f.truth.gammaPsi();
      double[] heldV = f.truth.vPsi();
      if (System.getenv("HOLDH_FROM") != null) {
        var lines = java.nio.file.Files.readAllLines(java.nio.file.Path.of(System.getenv("HOLDH_FROM") + "_globals.csv"));
        String last = null;
        for (String l : lines.subList(1, lines.size())) if (l.startsWith("0,")) last = l;
        String[] v = last.split(",");
        heldGamma = new double[f.truth.gammaPsi().length];
        for (int i = 0; i < heldGamma.length; i++) heldGamma[i] = Double.parseDouble(v[2 + i]);
        heldV = new double[kp * kp];
        int q = 2 + heldGamma.length;
        for (int i = 0; i < kp; i++) for (int k = 0; k <= i; k++) { double x = Double.parseDouble(v[q++]); heldV[i * kp + k] = x; heldV[k * kp + i] = x; }
        System.out.println("holding Gamma " + java.util.Arrays.toString(heldGamma));
      }
      double[] tight = priors.gammaPsiVar().clone();
      double[] mean = priors.gammaPsiMean().clone();
      for (int i = 0; i < tight.length; i++) {
        boolean row0 = i < kp;
        if (hold.equals("row0") && !row0 || hold.equals("row1") && row0) continue;
        tight[i] = 1e-10;
        mean[i] = heldGamma[i];
      }
      double nu = 1e7;
      double[] sv = heldV.clone();
      for (int i = 0; i < sv.length; i++) sv[i] *= nu + kp + 1;
      priors = priors.withGammaPsi(mean, tight);
      if (hold.equals("1")) {
        priors = priors.withVPsi(new aislecast.core.globals.InvWishart(nu, sv, kp));
      }
    }
    if (System.getenv("HOLDV") != null) {
      // diagnostic: V_psi held at diag(HOLDV, comma-separated, the last value repeated) by a
      // point-mass Inv-Wishart; Gamma stays free (e.g. tiny taste entries: stores share tastes)
      String[] v = System.getenv("HOLDV").split(",");
      int kp = f.dims.kpsi();
      double nu = 1e7;
      double[] sv = new double[kp * kp];
      for (int i = 0; i < kp; i++) sv[i * kp + i] = Double.parseDouble(v[Math.min(i, v.length - 1)]) * (nu + kp + 1);
      priors = priors.withVPsi(new aislecast.core.globals.InvWishart(nu, sv, kp));
    }
    // diagnostics: FROM_TRUTH=1 starts every chain at the simulation's truth (FROM_TRUTH=locals:
    // only the locals), FIXG=1 holds the globals there and prints the locals' statistics
    String from = System.getenv("FROM_TRUTH");
    Globals[] g0 = null;
    if ("1".equals(from) || fixGlobals) {
      g0 = new Globals[set.chains()];
      java.util.Arrays.fill(g0, f.truth);
    }
    // ELAST=1: own-price elasticities per product after every kept sweep, then their R-hat and ESS
    boolean elast = System.getenv("ELAST") != null;
    double[][][] el = new double[4][keep][];
    AnnealedMoveHook anneal = System.getenv("ANNEAL") == null ? null
        : new AnnealedMoveHook(Integer.parseInt(System.getenv("ANNEAL")),
            Integer.parseInt(System.getenv().getOrDefault("AHMC", "1")), leapfrog, warm, priors,
            f.catalog.x(), f.catalog.attributes(), set.seed());
    // AFFINE=1: the joint location-and-spread move of one taste axis with V_psi (AffineTasteHook)
    AffineTasteHook affine = System.getenv("AFFINE") == null ? null
        : new AffineTasteHook(warm, priors, f.catalog.x(), f.catalog.attributes(), set.seed(),
            false);
    InProcessRunner.SweepHook hook = (sweep, blocks, samplers, state) -> {
      if (anneal != null) anneal.accept(sweep, blocks, samplers, state);
      if (affine != null) affine.accept(sweep, blocks, samplers, state);
      if (fixGlobals) localSummary(f, blocks, samplers, sweep);
      if (elast && sweep >= warm) {
        for (int c = 0; c < 4; c++) {
          final int chain = c;
          el[c][sweep - warm] = ownElasticities(f, si -> samplers.get(si).natural(blocks.get(si).chains[chain].position));
        }
      }
    };
    var start = new InProcessRunner.Start(g0, from == null ? null : d -> truthLocals(f, d),
        fixGlobals, hook);
    var res = InProcessRunner.run(f.stores, f.catalog, 2, 1, 1, priors, set, start);
    System.out.printf("%.1f s%n", (System.nanoTime() - t0) / 1e9);
    String[] names = res.parameterNames();
    double[] truth = f.truth.toFlat();
    int covered = 0;
    double minEss = 1e9, maxRhat = 0;
    for (int p = 0; p < names.length; p++) {
      double[][] ch = new double[4][keep];
      for (int c = 0; c < 4; c++) for (int i = 0; i < keep; i++) ch[c][i] = res.globalDraws()[c][i][p];
      var s = Diagnostics.summarize(ch);
      boolean in = truth[p] >= s.q05() && truth[p] <= s.q95();
      covered += in ? 1 : 0;
      minEss = Math.min(minEss, s.essBulk());
      maxRhat = Math.max(maxRhat, s.rhat());
      System.out.printf("%-22s truth %8.3f mean %8.3f [%8.3f %8.3f] %s rhat %.3f essb %.0f%n", names[p], truth[p], s.mean(), s.q05(), s.q95(), in ? " " : "*", s.rhat(), s.essBulk());
    }
    slowDirections(res.globalDraws(), names, 25);
    if (System.getenv("CHAINS") != null) {
      chainBalance(res, keep);
    }
    if (System.getenv("PSIESS") != null) {
      // per psi component: bulk ESS of each store's draws (median and smallest over stores) and
      // of the stores' mean psi, i.e. how fast the locals themselves mix
      int kp = f.dims.kpsi();
      int ns = res.stores().size();
      StringBuilder b = new StringBuilder("psi bulk ESS per component (store median / min; stores' mean):");
      for (int k = 0; k < kp; k++) {
        double[] per = new double[ns];
        double[][] mean = new double[4][];
        for (int si = 0; si < ns; si++) {
          var blk = res.stores().get(si);
          double[][] ch = new double[4][blk.keptDraws];
          for (int c = 0; c < 4; c++) {
            if (mean[c] == null) mean[c] = new double[blk.keptDraws];
            for (int i = 0; i < blk.keptDraws; i++) {
              ch[c][i] = blk.psiDraws[c][i * kp + k];
              mean[c][i] += ch[c][i] / ns;
            }
          }
          per[si] = Diagnostics.essBulk(ch);
        }
        java.util.Arrays.sort(per);
        b.append(String.format(" %d: %.0f/%.0f; %.0f", k, per[ns / 2], per[0], Diagnostics.essBulk(mean)));
      }
      System.out.println(b);
    }
    if (System.getenv("PSIZ") != null) {
      // per store and component: z of the true psi in the pooled draws; with the globals held at
      // the truth the stores are independent and each z should look like a standard normal draw
      int kp = f.dims.kpsi();
      double[] zMean = new double[kp];
      int[] outside = new int[kp];
      for (int si = 0; si < f.stores.size(); si++) {
        var blk = res.stores().get(si);
        double[] tr = truthLocals(f, f.stores.get(si));
        for (int k = 0; k < kp; k++) {
          double m = 0, sq = 0; int n = 0;
          for (int c = 0; c < 4; c++) for (int i = 0; i < blk.keptDraws; i++) { double v = blk.psiDraws[c][i * kp + k]; m += v; sq += v * v; n++; }
          m /= n;
          double z = (tr[k] - m) / Math.sqrt(sq / n - m * m);
          zMean[k] += z / f.stores.size();
          if (Math.abs(z) > 1.645) outside[k]++;
        }
      }
      StringBuilder b = new StringBuilder("psi z of the truth, mean over stores (outside 90%):");
      for (int k = 0; k < kp; k++) b.append(String.format(" %+.2f(%d)", zMean[k], outside[k]));
      System.out.println(b);
    }
    if (elast) {
      double[] te = ownElasticities(f, si -> truthLocals(f, f.stores.get(si)));
      int covE = 0;
      double worst = 0, minE = Double.MAX_VALUE, zSum = 0;
      for (int p = 0; p < te.length; p++) {
        double[][] ch = new double[4][keep];
        double[] all = new double[4 * keep];
        for (int c = 0; c < 4; c++) for (int i = 0; i < keep; i++) { ch[c][i] = el[c][i][p]; all[c * keep + i] = ch[c][i]; }
        java.util.Arrays.sort(all);
        double q05 = all[(int) (0.05 * (all.length - 1))], q95 = all[(int) (0.95 * (all.length - 1))];
        double rh = aislecast.core.diag.Diagnostics.rankRhat(ch), es = aislecast.core.diag.Diagnostics.essBulk(ch);
        boolean in = te[p] >= q05 && te[p] <= q95;
        double mean = 0, sq = 0;
        for (double v : all) { mean += v; sq += v * v; }
        mean /= all.length;
        zSum += (te[p] - mean) / Math.sqrt(sq / all.length - mean * mean);
        covE += in ? 1 : 0;
        worst = Math.max(worst, rh); minE = Math.min(minE, es);
        System.out.printf("own elasticity %-3d truth %7.3f [%7.3f %7.3f] %s rhat %.3f essb %.0f%n", p, te[p], q05, q95, in ? " " : "*", rh, es);
      }
      System.out.printf("own elasticities: covered %d/%d, max rhat %.3f, min ess %.0f, mean z of the truth %.2f%n", covE, te.length, worst, minE, zSum / te.length);
    }
    if (System.getenv("TRUTHLP") != null) {
      truthDensity(f, res);
    }
    String dump = System.getenv("DUMP");
    if (dump != null) {
      try (var w = new java.io.PrintWriter(dump + "_globals.csv")) {
        w.println("chain,iter," + String.join(",", names) );
        for (int c = 0; c < 4; c++) for (int i = 0; i < keep; i++) {
          StringBuilder b = new StringBuilder(c + "," + i);
          for (double v : res.globalDraws()[c][i]) b.append(',').append(v);
          w.println(b);
        }
      }
      try (var w = new java.io.PrintWriter(dump + "_truth.csv")) {
        w.println(String.join(",", names));
        StringBuilder b = new StringBuilder();
        for (int p = 0; p < truth.length; p++) b.append(p == 0 ? "" : ",").append(truth[p]);
        w.println(b);
      }
      try (var w = new java.io.PrintWriter(dump + "_psi.csv")) {
        int kp = res.dims().kpsi();
        for (int s = 0; s < res.stores().size(); s++) {
          var blk = res.stores().get(s);
          for (int c = 0; c < 4; c++) for (int i = 0; i < blk.keptDraws; i++) {
            StringBuilder b = new StringBuilder(s + "," + c + "," + i);
            for (int k = 0; k < kp; k++) b.append(',').append(blk.psiDraws[c][i * kp + k]);
            w.println(b);
          }
        }
      }
    }
    {
      int kp = res.dims().kpsi();
      for (int c = 0; c < 4; c++) {
        double[] sd = res.last().ridgeProposalSd(c);
        StringBuilder b = new StringBuilder("ridge proposal sd chain " + c + ":");
        for (int i = 0; i < kp; i++) b.append(String.format(" %.3f", sd[i]));
        System.out.println(b);
      }
    }
    System.out.printf("covered %d/%d, max rhat %.3f, min ess %.0f, ridge acceptance %.2f, local acceptance %.2f%n", covered, names.length, maxRhat, minEss, res.last().ridgeAcceptance(), res.meanLocalAcceptance());
  }

  /**
   * CHAINS=1: each chain's own bulk ESS for the ten slowest globals, and per chain the ridge
   * proposal sd along each component of Gamma's intercept row next to that chain's spread of
   * the kept draws (the in-process form of the jobs' ChainBalanceProbe).
   */
  static void chainBalance(InProcessRunner.Result res, int keep) {
    String[] names = res.parameterNames();
    int np = names.length;
    int chains = res.globalDraws().length;
    double[][][] by = new double[np][chains][keep];
    for (int c = 0; c < chains; c++) {
      for (int i = 0; i < keep; i++) {
        for (int p = 0; p < np; p++) {
          by[p][c][i] = res.globalDraws()[c][i][p];
        }
      }
    }
    Integer[] order = new Integer[np];
    double[] ess = new double[np];
    for (int p = 0; p < np; p++) {
      order[p] = p;
      double e = Diagnostics.essBulk(by[p]);
      ess[p] = Double.isFinite(e) ? e : Double.MAX_VALUE;
    }
    java.util.Arrays.sort(order, (a, b) -> Double.compare(ess[a], ess[b]));
    System.out.println("ten slowest: all chains' bulk ESS | each chain's");
    for (int q = 0; q < Math.min(10, np); q++) {
      int p = order[q];
      StringBuilder b = new StringBuilder();
      for (int c = 0; c < chains; c++) {
        b.append(String.format(" %5.0f", Diagnostics.essBulk(new double[][] {by[p][c]})));
      }
      System.out.printf("  %-22s %6.0f |%s%n", names[p], ess[p], b);
    }
    DriverState st = res.last();
    int k = res.dims().kpsi();
    System.out.println("ridge proposal sd / sd of the kept draws, per component of Gamma's intercept row:");
    for (int c = 0; c < chains; c++) {
      double[] sd = st.ridgeProposalSd(c);
      StringBuilder b = new StringBuilder();
      for (int i = 0; i < k; i++) {
        double m = 0;
        double m2 = 0;
        for (double y : by[i][c]) {
          m += y;
          m2 += y * y;
        }
        m /= keep;
        b.append(String.format(" %.4f/%.4f", sd[i], Math.sqrt(Math.max(0, m2 / keep - m * m))));
      }
      System.out.printf("  chain %d (accepted %d of %d):%s%n", c, st.ridgeAccepted()[c],
          st.ridgeProposed()[c], b);
    }
  }
}
