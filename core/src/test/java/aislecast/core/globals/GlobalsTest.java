package aislecast.core.globals;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.apache.commons.math3.random.Well19937c;
import org.junit.jupiter.api.Test;

class GlobalsTest {
  private static final Dims DIMS = new Dims(2, 3, 3, 1, 2);

  private static Globals sample() {
    return new Globals(
        DIMS, new double[] {1, 2, 3, 4, 5, 6}, new double[] {2, 0.5, 0, 0.5, 1, 0.1, 0, 0.1, 1},
        new double[] {0.1, 0.2, 0.3}, 0.7, new double[] {-0.4}, 0.2, new double[] {1, 1.5, 2},
        new double[] {0.3, -0.3}, 0.25, 0.05);
  }

  @Test
  void flatRoundTripAndNames() {
    Globals g = sample();
    double[] flat = g.toFlat();
    assertEquals(DIMS.flatLength(), flat.length);
    assertEquals(g, Globals.fromFlat(DIMS, flat));
    String[] names = Globals.parameterNames(DIMS);
    assertEquals(flat.length, names.length);
    // Spot checks of the documented layout.
    assertEquals("Gamma[1,2]", names[5]);
    assertEquals(6.0, flat[5]);
    assertEquals("V_psi[1,0]", names[7]);
    assertEquals(0.5, flat[7]);
    assertEquals("tau2", names[15]);
    assertEquals(0.7, flat[15]);
    assertEquals("lambda", names[names.length - 2]);
    assertEquals("sigma_p2", names[names.length - 1]);
    assertEquals(0.05, flat[flat.length - 1]);
  }

  @Test
  void rejectsInvalidValuesWithMessages() {
    IllegalArgumentException e =
        assertThrows(IllegalArgumentException.class, () -> sample().withTau2(-1.0));
    assertTrue(e.getMessage().contains("tau2"));
    assertThrows(
        IllegalArgumentException.class,
        () -> sample().withVPsi(new double[] {1, 2, 0, 2, 1, 0, 0, 0, 1}));
    assertThrows(IllegalArgumentException.class, () -> sample().withGamma(new double[2]));
    assertThrows(
        IllegalArgumentException.class, () -> sample().withKappabar(new double[] {0, Double.NaN, 0}));
  }

  @Test
  void arraysAreCopiedNotShared() {
    double[] pi0 = {1, 1.5, 2};
    Globals g = sample().withPriceEquation(pi0, new double[] {0, 0}, 0);
    pi0[0] = 99;
    g.pi0()[1] = 99;
    assertEquals(1.0, g.pi0(0));
    assertEquals(1.5, g.pi0(1));
  }

  // The documented defaults (DESIGN section 4).
  @Test
  void defaultPriorsAreTheDocumentedOnes() {
    Priors p = Priors.defaults(3, 2); // Kpsi = 2 + 2 + 1 = 5
    assertEquals(5, p.kpsi());
    double[] m = p.gammaPsiMean();
    double[] v = p.gammaPsiVar();
    assertArrayEquals(new double[] {0, -1, -1, -1, 0}, java.util.Arrays.copyOf(m, 5));
    assertArrayEquals(new double[] {100, 1, 1, 1, 100}, java.util.Arrays.copyOf(v, 5));
    for (int i = 5; i < 15; i++) {
      assertEquals(0.0, m[i]);
      assertEquals(100.0, v[i]);
    }
    assertEquals(8.0, p.vPsi().df());
    assertEquals(0.8, p.vPsi().scale()[0]);
    assertEquals(0.0, p.vPsi().scale()[1]);
    assertEquals(new Normal(0, 100), p.kappabar());
    assertEquals(new InvGamma(2, 0.5), p.tau2());
    assertEquals(new InvGamma(2, 0.5), p.sigmaXi2());
    assertEquals(new InvGamma(2, 0.5), p.sigmaP2());
    assertEquals(new Normal(0, 100), p.lambda());
  }

  // Randomness only through the passed-in generator: same seed, same draw; input unchanged.
  @Test
  void drawIsPureAndReproducible() {
    Globals g = sample();
    double[] before = g.toFlat();
    GlobalStats s = new GlobalStats(DIMS);
    Well19937c data = new Well19937c(5);
    for (int store = 0; store < 20; store++) {
      s.addStore(new double[] {1, data.nextGaussian()},
          new double[] {data.nextGaussian(), data.nextGaussian(), data.nextGaussian()});
      for (int j = 0; j < 3; j++) {
        s.addIntercept(j, data.nextGaussian());
        s.addRow(new double[] {data.nextGaussian()}, 0, j,
            new double[] {data.nextGaussian(), data.nextGaussian()}, 0, data.nextGaussian(),
            data.nextGaussian());
      }
    }
    Priors priors = Priors.defaults(2, 1);
    Globals a = GlobalGibbs.draw(g, s, priors, new Well19937c(77));
    Globals b = GlobalGibbs.draw(g, s, priors, new Well19937c(77));
    Globals c = GlobalGibbs.draw(g, s, priors, new Well19937c(78));
    assertArrayEquals(before, g.toFlat());
    assertEquals(a, b);
    assertNotEquals(a, c);
    assertThrows(
        IllegalArgumentException.class,
        () -> GlobalGibbs.draw(g, new GlobalStats(new Dims(2, 3, 4, 1, 2)), priors,
            new Well19937c(1)));
  }
}
