package aislecast.core.estimate;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import aislecast.core.demand.Heterogeneity;
import aislecast.core.demand.ShareKernel;
import aislecast.core.globals.Priors;
import aislecast.core.mcmc.StoreSampler;
import aislecast.core.model.LocalParams;
import aislecast.core.model.StoreData;
import aislecast.core.rng.Streams;
import aislecast.core.sim.SimSettings;
import org.ejml.data.DMatrixRMaj;
import org.ejml.dense.row.CommonOps_DDRM;
import org.junit.jupiter.api.Test;

/**
 * The ridge move's map on one store's locals: shares kept, {@code -c} undoing {@code c}, and its
 * log Jacobian against central finite differences of the map (common practice).
 */
class RidgeMoveTest {
  private static final SimFixture FIX =
      new SimFixture(SimSettings.demo().withSizes(3, 6, 5, 2, 2, 40));

  private static double[] startingPosition(StoreData d) {
    var g = FIX.truth;
    LocalParams p = LocalParams.of(g.dims().kpsi(), g.gammaPsi(), g.vPsi(), g.kappabar(),
        g.tau2(), g.gamma(), g.sigmaXi2(), g.pi0(), g.pi(), g.lambda(), g.sigmaP2());
    StoreSampler sm = new StoreSampler(d, FIX.catalog.x(), FIX.catalog.attributes());
    var rng = Streams.stream(3, 0, d.storeIndex);
    return sm.natural(sm.init(rng, p, FIX.catalog.x(), FIX.catalog.attributes()).position);
  }

  private static double[] shift(int kpsi) {
    double[] c = new double[kpsi];
    for (int k = 0; k < kpsi; k++) {
      c[k] = 0.05 * (k % 2 == 0 ? 1 : -1) / (1 + k);
    }
    return c;
  }

  @Test
  void keepsSharesAndTheOppositeShiftUndoesIt() {
    StoreData d = FIX.stores.get(0);
    int kx = FIX.catalog.attributes();
    double[] x = FIX.catalog.x();
    double[] pos = startingPosition(d);
    double[] c = shift(Heterogeneity.dim(kx));
    double[] moved = pos.clone();
    double there = RidgeMove.apply(d, x, kx, moved, c);
    StoreSampler sm = new StoreSampler(d, x, kx);
    assertEquals(sm.salesLogLikelihood(pos), sm.salesLogLikelihood(moved), 1e-8,
        "predicted shares, hence the sales likelihood, are unchanged");
    double[] back = moved.clone();
    double[] minus = c.clone();
    for (int k = 0; k < minus.length; k++) {
      minus[k] = -minus[k];
    }
    double backJac = RidgeMove.apply(d, x, kx, back, minus);
    for (int i = 0; i < pos.length; i++) {
      assertEquals(pos[i], back[i], 1e-9, "coordinate " + i);
    }
    assertEquals(0.0, there + backJac, 1e-8, "log Jacobians of a map and its inverse cancel");
  }

  @Test
  void logJacobianMatchesFiniteDifferencesOfTheMap() {
    StoreData d = FIX.stores.get(1);
    int kx = FIX.catalog.attributes();
    int kpsi = Heterogeneity.dim(kx);
    double[] x = FIX.catalog.x();
    double[] pos = startingPosition(d);
    double[] c = shift(kpsi);
    int off = kpsi + d.products.length;
    double total = 0;
    double fromApply = RidgeMove.apply(d, x, kx, pos.clone(), c);
    double h = 1e-5;
    for (int t = 0; t < d.markets(); t++) {
      int a = d.rowStart[t];
      int j = d.rowStart[t + 1] - a;
      // d delta'_t / d delta_t by central differences; other markets do not enter market t
      DMatrixRMaj num = new DMatrixRMaj(j, j);
      for (int q = 0; q < j; q++) {
        double[] up = pos.clone();
        double[] down = pos.clone();
        up[off + a + q] += h;
        down[off + a + q] -= h;
        RidgeMove.apply(d, x, kx, up, c);
        RidgeMove.apply(d, x, kx, down, c);
        for (int p = 0; p < j; p++) {
          num.set(p, q, (up[off + a + p] - down[off + a + p]) / (2 * h));
        }
      }
      total += Math.log(Math.abs(CommonOps_DDRM.det(num)));
    }
    assertEquals(total, fromApply, 1e-5 * Math.max(1, Math.abs(total)),
        "sum over markets of log |det d delta'/d delta|");
    assertTrue(Math.abs(total) > 1e-4, "the shift must change the Jacobian for this to test it");
  }

  @Test
  void chordAndNewtonFindTheSameRoot() {
    StoreData d = FIX.stores.get(2);
    int kx = FIX.catalog.attributes();
    int kpsi = Heterogeneity.dim(kx);
    double[] x = FIX.catalog.x();
    double[] pos = startingPosition(d);
    double[] psiNew = java.util.Arrays.copyOf(pos, kpsi);
    double[] c = shift(kpsi);
    for (int k = 0; k < kpsi; k++) {
      psiNew[k] += c[k];
    }
    int r = d.shoppers;
    int jCat = x.length / kx;
    double[] alpha = new double[r];
    double[] mu = new double[r * jCat];
    double[] alphaNew = new double[r];
    double[] muNew = new double[r * jCat];
    Heterogeneity.shopperTastes(pos, kx, d.nu, r, x, jCat, alpha, mu);
    Heterogeneity.shopperTastes(psiNew, kx, d.nu, r, x, jCat, alphaNew, muNew);
    int off = kpsi + d.products.length;
    int a = d.rowStart[0];
    int j = d.rowStart[1] - a;
    double[] vOld = new double[r * j];
    double[] vNew = new double[r * j];
    for (int i = 0; i < r; i++) {
      for (int p = 0; p < j; p++) {
        int prod = d.product[a + p];
        vOld[i * j + p] = mu[i * jCat + prod] - alpha[i] * d.price[a + p];
        vNew[i * j + p] = muNew[i * jCat + prod] - alphaNew[i] * d.price[a + p];
      }
    }
    double[] del = java.util.Arrays.copyOfRange(pos, off + a, off + a + j);
    double[] target = new double[j];
    double[] probs = new double[r * j];
    double[] jac = new double[j * j];
    ShareKernel.shares(r, j, del, vOld, target, probs);
    ShareKernel.jacobianDelta(r, j, probs, jac);
    var inv = new aislecast.core.demand.ShareInversion(r, j);
    double[] chord = del.clone();
    double[] newton = del.clone();
    var rc = inv.invertChord(r, j, vNew, target, chord, jac, 1e-12, 30);
    var rn = inv.invert(r, j, vNew, target, newton, 1e-12, 100);
    assertTrue(rc.converged() && rn.converged(), rc + " " + rn);
    for (int p = 0; p < j; p++) {
      assertEquals(newton[p], chord[p], 1e-10, "product " + p);
    }
  }

  /**
   * The ridge target's demand term with sigma_xi^2 integrated out, against numerical quadrature of
   * {@code int prod N(y_i; 0, v) InvGamma(v; a, b) dv} over {@code u = log v} (commons-math3's
   * iterative Legendre-Gauss integrator; the closed form is the normal-inverse-gamma marginal,
   * Gelman et al., BDA3, section 3.3).
   */
  @Test
  void integratedNoiseVarianceMatchesQuadrature() {
    var prior = new aislecast.core.globals.InvGamma(2.0, 0.5);
    double[][] cases = {{7, 3.2}, {50, 2.9}, {400, 21.0}};
    for (double[] c : cases) {
      double n = c[0];
      double ss = c[1];
      double closed = RidgeMove.normalInvGammaMarginal(n, ss, prior);
      // integrand relative to exp(closed) so it stays near 1 where it matters
      org.apache.commons.math3.analysis.UnivariateFunction f = u -> {
        double v = Math.exp(u);
        double logLik = -0.5 * n * Math.log(2 * Math.PI * v) - 0.5 * ss / v;
        double logPrior = prior.shape() * Math.log(prior.scale())
            - org.apache.commons.math3.special.Gamma.logGamma(prior.shape())
            - (prior.shape() + 1) * Math.log(v) - prior.scale() / v;
        return Math.exp(logLik + logPrior + u - closed);
      };
      var quad = new org.apache.commons.math3.analysis.integration.IterativeLegendreGaussIntegrator(
          32, 1e-12, 1e-14);
      double mode = Math.log((prior.scale() + 0.5 * ss) / (prior.shape() + 0.5 * n + 1));
      double ratio = quad.integrate(1_000_000, f, mode - 12, mode + 12);
      assertEquals(1.0, ratio, 1e-9, "n = " + n + ", ss = " + ss);
    }
  }

  /**
   * The ridge target's hierarchy term, {@code log p(psi_1..n | V)} with Gamma integrated out
   * under its normal prior, against the same density written as one multivariate normal of all
   * stores' psi (commons-math3 {@code MultivariateNormalDistribution}): {@code psi_s = Gamma' d_s
   * + e_s}, so {@code Cov(psi_si, psi_tj) = [s = t] V_ij + [i = j] sum_r d_sr d_tr v0_ri}. Two
   * different {@code V}: the ridge move only ever compares the term at one {@code V}, a move that
   * changes {@code V} relies on its dependence on {@code V} too.
   */
  @Test
  void integratedHierarchyMatchesTheJointNormal() {
    int kd = 2;
    int kx = 1;
    int kpsi = aislecast.core.demand.Heterogeneity.dim(kx);
    int n = 5;
    Priors priors = Priors.defaults(kd, kx);
    var dims = new aislecast.core.globals.Dims(kd, kpsi, 1, 0, 0);
    double[][] d = new double[n][];
    double[][] psi = new double[n][];
    java.util.Random r = new java.util.Random(3);
    var stats = new aislecast.core.globals.GlobalStats(dims);
    for (int s = 0; s < n; s++) {
      d[s] = new double[] {1.0, r.nextGaussian()};
      psi[s] = new double[kpsi];
      for (int k = 0; k < kpsi; k++) {
        psi[s][k] = -0.5 + r.nextGaussian();
      }
      stats.addStore(d[s], psi[s]);
    }
    double[][] vs = {{0.3, 0.05, 0.2, -0.02, 0.01, 0.5}, {2.0, -0.3, 0.9, 0.1, 0.2, 0.15}};
    double[] m0 = priors.gammaPsiMean();
    double[] v0 = priors.gammaPsiVar();
    double[] results = new double[2];
    for (int c = 0; c < 2; c++) {
      double[] flat = new double[dims.flatLength()];
      System.arraycopy(vs[c], 0, flat, kd * kpsi, 6); // V lower triangle, row by row
      int p = kd * kpsi + 6;
      flat[p + 1] = 1.0; // tau2
      flat[p + 2] = 1.0; // sigma_xi2
      flat[flat.length - 1] = 1.0; // sigma_p2
      var g = aislecast.core.globals.Globals.fromFlat(dims, flat);
      double[] v = g.vPsi();
      double[] mean = new double[n * kpsi];
      double[][] cov = new double[n * kpsi][n * kpsi];
      for (int s = 0; s < n; s++) {
        for (int i = 0; i < kpsi; i++) {
          for (int q = 0; q < kd; q++) {
            mean[s * kpsi + i] += d[s][q] * m0[q * kpsi + i];
          }
          for (int t = 0; t < n; t++) {
            for (int j = 0; j < kpsi; j++) {
              double e = s == t ? v[i * kpsi + j] : 0.0;
              if (i == j) {
                for (int q = 0; q < kd; q++) {
                  e += d[s][q] * d[t][q] * v0[q * kpsi + i];
                }
              }
              cov[s * kpsi + i][t * kpsi + j] = e;
            }
          }
        }
      }
      double[] y = new double[n * kpsi];
      for (int s = 0; s < n; s++) {
        System.arraycopy(psi[s], 0, y, s * kpsi, kpsi);
      }
      double expected = Math.log(
          new org.apache.commons.math3.distribution.MultivariateNormalDistribution(mean, cov)
              .density(y));
      results[c] = RidgeMove.hierarchy(g, stats.hierarchy(), priors);
      assertEquals(expected, results[c], 1e-8 * Math.abs(expected), "V number " + c);
    }
  }
}
