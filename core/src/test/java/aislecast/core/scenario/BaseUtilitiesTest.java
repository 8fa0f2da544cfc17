package aislecast.core.scenario;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import aislecast.core.demand.ShareInversion;
import aislecast.core.equilibrium.EquilibriumSolver;
import aislecast.core.equilibrium.MarketModel;
import java.util.Set;
import org.junit.jupiter.api.Test;

class BaseUtilitiesTest {

  /**
   * Plain logit (no taste spread): delta_j = ln s_j - ln s_0 + alpha p_j in our sign convention
   * (u = delta - alpha p), Berry (1994), "Estimating discrete-choice models of product
   * differentiation", RAND Journal of Economics 25(2), eq. for the logit inversion.
   */
  @Test
  void plainLogitMatchesBerryClosedForm() {
    int r = 7;
    double a = Math.log(1.3);
    double[] psi = {a, -40, -40}; // kx = 1: sigma and L vanish
    double[] nu = new double[r * 2];
    for (int i = 0; i < nu.length; i++) {
      nu[i] = Math.sin(i + 1.0);
    }
    double[] price = {2.0, 1.5, 3.1};
    BaseMarket m = new BaseMarket("S1", new String[] {"A", "B", "C"},
        new String[] {"own", "rival", "rival"}, 1, new double[] {0.3, -1.0, 0.7}, price, 1000.0,
        nu, r, null, Set.of("own"));
    double[] s = {0.05, 0.12, 0.02};
    double[] delta = new double[3];
    ShareInversion.Result res = new BaseUtilities(r, 3).invert(m, psi, s, delta);
    assertTrue(res.converged());
    double s0 = 1 - 0.05 - 0.12 - 0.02;
    for (int p = 0; p < 3; p++) {
      assertEquals(Math.log(s[p] / s0) + 1.3 * price[p], delta[p], 1e-9);
    }
  }

  /** Shares computed from the demo's true mean utilities invert back to them (Berry 1994: unique). */
  @Test
  void randomCoefficientsRoundTripOnDemoStore() {
    DemoStores demo = new DemoStores();
    DemoStores.Store st = demo.store(3);
    BaseMarket m = st.market();
    int j = m.products();
    MarketModel model = new MarketModel(m.shoppers(), j);
    model.load(st.psi(), m.kx(), m.nuView(), m.shoppers(), m.xView(), j, st.delta(),
        m.firmView());
    EquilibriumSolver solver = new EquilibriumSolver(m.shoppers(), j);
    solver.evaluate(model, m.prices());
    double[] s = java.util.Arrays.copyOf(solver.shares(), j);
    double[] delta = new double[j];
    ShareInversion.Result res = new BaseUtilities(m.shoppers(), j).invert(m, st.psi(), s, delta);
    assertTrue(res.converged(), res.toString());
    assertArrayEquals(st.delta(), delta, 1e-8);
  }

  @Test
  void zeroUnitsCountAsHalfAUnitAndFullMarketsAreRejected() {
    assertArrayEquals(new double[] {0.005, 0.00025}, BaseUtilities.observedShares(
        new double[] {10, 0}, 2000), 1e-15);
    IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
        () -> BaseUtilities.observedShares(new double[] {600, 400}, 1000));
    assertTrue(e.getMessage().contains("no outside option"));
  }
}
