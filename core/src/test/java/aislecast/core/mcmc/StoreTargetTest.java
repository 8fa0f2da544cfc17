package aislecast.core.mcmc;

import static org.junit.jupiter.api.Assertions.assertEquals;

import aislecast.core.model.LocalParams;
import aislecast.core.model.ReferenceFixtures;
import aislecast.core.model.StoreData;
import aislecast.core.model.StoreDensity;
import org.junit.jupiter.api.Test;

/**
 * The local HMC target against the reference store density (which reproduces outside test
 * vectors) and against central finite differences of itself.
 */
class StoreTargetTest {

  @Test
  void differencesMatchTheReferenceDensity() throws Exception {
    // The target drops constants, so compare differences between two positions with the full
    // store density (itself checked against the outside test vectors).
    var f = ReferenceFixtures.load();
    for (StoreData d : f.stores()) {
      StoreTarget target = new StoreTarget(d, f.x(), f.kx());
      target.condition(f.params());
      // natural positions a, b; the target works in its own coordinates (unit Jacobian)
      double[] a = f.position(d);
      double[] b = a.clone();
      for (int i = 0; i < b.length; i++) {
        b[i] += 0.05 * Math.sin(3.0 * i + 1);
      }
      double[] sa = new double[a.length];
      double[] sb = new double[a.length];
      target.fromNatural(a, sa);
      target.fromNatural(b, sb);
      double[] back = new double[a.length];
      target.toNatural(sb, back);
      for (int i = 0; i < b.length; i++) {
        assertEquals(b[i], back[i], 1e-12, "coordinate round trip");
      }
      double[] grad = new double[a.length];
      double la = target.logDensityAndGradient(sa, grad);
      double lb = target.logDensityAndGradient(sb, grad);
      double ra = full(d, f, a);
      double rb = full(d, f, b);
      assertEquals(rb - ra, lb - la, 1e-8, d.storeId);
    }
  }

  private static double full(StoreData d, ReferenceFixtures f, double[] pos) {
    int kpsi = f.params().kpsi();
    int np = d.products.length;
    double[] psi = java.util.Arrays.copyOfRange(pos, 0, kpsi);
    double[] kappa = java.util.Arrays.copyOfRange(pos, kpsi, kpsi + np);
    double[] delta = java.util.Arrays.copyOfRange(pos, kpsi + np, pos.length);
    StoreDensity.Terms t = StoreDensity.terms(d, f.x(), f.kx(), f.params(), psi, kappa, delta);
    return t.sales() + t.price() + t.xi() + t.kappa() + t.psi();
  }

  @Test
  void gradientMatchesCentralDifferences() throws Exception {
    // Central differences, step 1e-5: truncation error O(h^2) ~ 1e-10 relative (common practice).
    var f = ReferenceFixtures.load();
    for (StoreData d : f.stores().subList(0, 2)) {
      StoreTarget target = new StoreTarget(d, f.x(), f.kx());
      target.condition(f.params());
      double[] pos = new double[f.position(d).length];
      target.fromNatural(f.position(d), pos);
      double[] grad = new double[pos.length];
      double[] scratch = new double[pos.length];
      target.logDensityAndGradient(pos, grad);
      double h = 1e-5;
      for (int i = 0; i < pos.length; i++) {
        double keep = pos[i];
        pos[i] = keep + h;
        double up = target.logDensityAndGradient(pos, scratch);
        pos[i] = keep - h;
        double down = target.logDensityAndGradient(pos, scratch);
        pos[i] = keep;
        double fd = (up - down) / (2 * h);
        assertEquals(fd, grad[i], 1e-5 * Math.max(1.0, Math.abs(fd)), d.storeId + " coord " + i);
      }
    }
  }
}
