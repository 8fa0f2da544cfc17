package aislecast.core.estimate;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import aislecast.core.diag.ParameterSummary;
import aislecast.core.globals.Dims;
import aislecast.core.globals.Globals;
import aislecast.core.globals.InvGamma;
import aislecast.core.globals.Priors;
import java.util.List;
import org.junit.jupiter.api.Test;

class PriorPullTest {
  private static final Dims DIMS = new Dims(2, 8, 12, 1, 1);
  private static final String[] NAMES = Globals.parameterNames(DIMS);

  /** Every parameter's posterior mean 1, but the named ones. */
  private static ParameterSummary[] summaries(double tau2, double sigmaXi2, double sigmaP2) {
    ParameterSummary[] s = new ParameterSummary[NAMES.length];
    for (int p = 0; p < NAMES.length; p++) {
      double m = switch (NAMES[p]) {
        case "tau2" -> tau2;
        case "sigma_xi2" -> sigmaXi2;
        case "sigma_p2" -> sigmaP2;
        default -> 1.0;
      };
      s[p] = new ParameterSummary(m, 0.1, m, m, m, 1.0, 1000, 1000, 0.01);
    }
    return s;
  }

  private static Priors withVarianceScale(double scale) {
    Priors d = Priors.defaults(2, 3);
    InvGamma v = new InvGamma(2, scale);
    return new Priors(d.kd(), d.kpsi(), d.gammaPsiMean(), d.gammaPsiVar(), d.vPsi(), d.kappabar(),
        v, d.gamma(), d.pi0(), d.pi(), d.lambda(), v, v);
  }

  @Test
  void flagsTheDefaultPriceNoisePriorAtTheSimulatedPriceNoise() {
    // the simulation's posterior means (README, "Priors that pull"): tau2 0.09, sigma_xi2 0.048,
    // sigma_p2 0.009; default scale 0.5 -> ratios 5.6, 10.4, 55.6: only sigma_p2 is flagged
    List<String> notes = PriorPull.varianceNotes(Priors.defaults(2, 3), NAMES,
        summaries(0.09, 0.048, 0.009));
    assertEquals(1, notes.size(), notes.toString());
    assertTrue(notes.get(0).startsWith("prior of sigma_p2: its Inv-Gamma(2, 0.5) scale is 56"
        + " times the posterior mean 0.009"), notes.get(0));
  }

  @Test
  void silentWhenTheScaleIsNearTheData() {
    assertEquals(List.of(), PriorPull.varianceNotes(withVarianceScale(0.005), NAMES,
        summaries(0.09, 0.048, 0.009)));
  }

  @Test
  void limitIsStrict() {
    // ratio exactly 20 is not flagged, just above it is, for each of the three variances
    assertEquals(List.of(), PriorPull.varianceNotes(Priors.defaults(2, 3), NAMES,
        summaries(0.025, 0.025, 0.025)));
    List<String> notes = PriorPull.varianceNotes(Priors.defaults(2, 3), NAMES,
        summaries(0.0249, 0.0249, 0.0249));
    assertEquals(3, notes.size(), notes.toString());
    assertTrue(notes.get(0).startsWith("prior of tau2:"), notes.get(0));
    assertTrue(notes.get(1).startsWith("prior of sigma_xi2:"), notes.get(1));
    assertTrue(notes.get(2).startsWith("prior of sigma_p2:"), notes.get(2));
    // each says what to change: sigma_p2 has its own data-based setting, the others share one
    assertTrue(notes.get(2).contains("priors.price_noise_scale: auto"), notes.get(2));
    assertTrue(notes.get(0).contains("smaller priors.variance_scale"), notes.get(0));
    assertTrue(!notes.get(0).contains("price_noise_scale"), notes.get(0));
  }

  /** Every parameter's posterior mean 1, but the V_psi diagonal entries given as {k, mean}. */
  private static ParameterSummary[] withV(double[]... entries) {
    ParameterSummary[] s = summaries(1, 1, 1);
    for (double[] e : entries) {
      int p = java.util.Arrays.asList(NAMES).indexOf("V_psi[" + (int) e[0] + "," + (int) e[0] + "]");
      double m = e[1];
      s[p] = new ParameterSummary(m, 0.1, m, m, m, 1.0, 1000, 1000, 0.01);
    }
    return s;
  }

  @Test
  void flagsHierarchyVariancesThePriorSupplies() {
    // default V_psi ~ Inv-Wishart(nu0 = 8 + 3, 0.1 nu0 I): S0_kk = 1.1; with n = 20 stores the
    // conditional mean is (S0 + sum e e') / (nu0 + n - p - 1) = (1.1 + SS) / 22 (BDA3, appendix
    // A), so a posterior mean m means the prior supplies 1.1 / (22 m). The simulated 20-store
    // run's means (README): V_psi[0,0] 0.072 -> 69%, V_psi[2,2] 0.179 -> 28%
    List<String> notes = PriorPull.hierarchyNotes(Priors.defaults(2, 3), NAMES,
        withV(new double[] {0, 0.072}, new double[] {2, 0.179}), 20);
    assertEquals(1, notes.size(), notes.toString());
    assertTrue(notes.get(0).startsWith("prior of V_psi[0,0]: the Inv-Wishart prior supplies"
        + " about 69% of its posterior mean 0.072 (prior scale S0_kk 1.1, 20 stores)"),
        notes.get(0));
    assertTrue(notes.get(0).contains("smaller priors.v_psi_scale"), notes.get(0));
    // the same means over 100 stores: 1.1 / (102 x 0.072) = 15%, nothing to say
    assertEquals(List.of(), PriorPull.hierarchyNotes(Priors.defaults(2, 3), NAMES,
        withV(new double[] {0, 0.072}, new double[] {2, 0.179}), 100));
  }

  @Test
  void hierarchyLimitIsStrict() {
    // share exactly one half at m = 1.1 / (0.5 x 22) = 0.1
    assertEquals(List.of(), PriorPull.hierarchyNotes(Priors.defaults(2, 3), NAMES,
        withV(new double[] {5, 0.1}), 20));
    List<String> notes = PriorPull.hierarchyNotes(Priors.defaults(2, 3), NAMES,
        withV(new double[] {5, 0.0999}), 20);
    assertEquals(1, notes.size(), notes.toString());
    assertTrue(notes.get(0).startsWith("prior of V_psi[5,5]:"), notes.get(0));
  }
}
