package aislecast.core.model;

import static org.junit.jupiter.api.Assertions.assertEquals;

import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

/**
 * The project's log posterior against exact test vectors from an independent implementation
 * (../shared/reference/small/logdensity_check.json: Stan 2.21 via rstan, cross-checked in plain
 * R). Every term at both points, and the difference between the points, to 1e-6.
 */
class ReferenceLogDensityTest {
  private static ReferenceSet ref;

  @BeforeAll
  static void load() throws Exception {
    ref = new ReferenceSet();
  }

  /** Priors as in the reference README: N(0, 10^2) for every psibar component. */
  private static double[] evaluate(ReferenceSet.Point pt, java.util.Map<String, Double> terms) {
    StoreDensity.Terms sum = new StoreDensity.Terms(0, 0, 0, 0, 0);
    int kx = ref.catalog.attributes();
    for (StoreData d : ref.stores) {
      sum = sum.plus(StoreDensity.terms(d, ref.catalog.x(), kx, pt.params,
          pt.psi.get(d.storeId), pt.kappa.get(d.storeId), pt.delta.get(d.storeId)));
    }
    LocalParams g = pt.params;
    int kpsi = g.kpsi();
    double nu0 = kpsi + 3;
    double[] s0 = new double[kpsi * kpsi];
    for (int k = 0; k < kpsi; k++) {
      s0[k * kpsi + k] = 0.1 * nu0;
    }
    terms.put("sales_multinomial", sum.sales());
    terms.put("price_equation", sum.price());
    terms.put("xi", sum.xi());
    terms.put("kappa_hier", sum.kappa());
    terms.put("psi_hier", sum.psi());
    terms.put("prior_psibar", PriorDensity.normals(pt.psibar, 0, 100));
    terms.put("prior_V_psi", PriorDensity.invWishart(pt.vPsi, nu0, s0, kpsi));
    terms.put("prior_kappabar", PriorDensity.normals(g.kappabar(), 0, 100));
    terms.put("prior_tau2", PriorDensity.invGamma(g.tau2(), 2, 0.5));
    terms.put("prior_gamma", PriorDensity.normals(g.gamma(), 0, 100));
    terms.put("prior_sigma_xi2", PriorDensity.invGamma(g.sigmaXi2(), 2, 0.5));
    terms.put("prior_pi0", PriorDensity.normals(g.pi0(), 0, 100));
    terms.put("prior_pi", PriorDensity.normals(g.pi(), 0, 100));
    terms.put("prior_lambda", PriorDensity.normals(new double[] {g.lambda()}, 0, 100));
    terms.put("prior_sigma_p2", PriorDensity.invGamma(g.sigmaP2(), 2, 0.5));
    double total = terms.values().stream().mapToDouble(Double::doubleValue).sum();
    return new double[] {total};
  }

  @Test
  void everyTermMatchesAtBothPoints() {
    for (String name : new String[] {"A_truth", "B_perturbed"}) {
      ReferenceSet.Point pt = ref.new Point(name);
      java.util.Map<String, Double> terms = new java.util.TreeMap<>();
      double total = evaluate(pt, terms)[0];
      var expected = pt.node.path("terms_R");
      assertEquals(expected.size(), terms.size(), "term count");
      for (var e : terms.entrySet()) {
        assertEquals(expected.path(e.getKey()).asDouble(), e.getValue(), 1e-6,
            name + " term " + e.getKey());
      }
      assertEquals(pt.node.path("log_posterior_R").asDouble(), total, 1e-6, name + " total");
    }
  }

  @Test
  void differenceBetweenPointsMatches() {
    java.util.Map<String, Double> ta = new java.util.TreeMap<>();
    java.util.Map<String, Double> tb = new java.util.TreeMap<>();
    double a = evaluate(ref.new Point("A_truth"), ta)[0];
    double b = evaluate(ref.new Point("B_perturbed"), tb)[0];
    assertEquals(ref.check.path("difference_B_minus_A_R").asDouble(), b - a, 1e-6);
  }
}
