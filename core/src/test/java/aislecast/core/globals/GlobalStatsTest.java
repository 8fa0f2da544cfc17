package aislecast.core.globals;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayInputStream;
import java.io.ByteArrayOutputStream;
import java.io.ObjectInputStream;
import java.io.ObjectOutputStream;
import org.apache.commons.math3.random.Well19937c;
import org.junit.jupiter.api.Test;

class GlobalStatsTest {
  private static final Dims DIMS = new Dims(3, 4, 5, 2, 2);

  /** Fills stats from stores [from, to) of a seeded synthetic data set. */
  private static void fill(GlobalStats s, int from, int to) {
    for (int store = from; store < to; store++) {
      Well19937c rng = new Well19937c(1000 + store);
      double[] d = {1.0, rng.nextGaussian(), rng.nextDouble()};
      double[] psi = new double[DIMS.kpsi()];
      for (int k = 0; k < psi.length; k++) {
        psi[k] = rng.nextGaussian() * (k + 1);
      }
      s.addStore(d, psi);
      for (int j = 0; j < DIMS.products(); j++) {
        if (rng.nextDouble() < 0.8) {
          s.addIntercept(j, 3.0 + rng.nextGaussian());
        }
      }
      for (int week = 0; week < 7; week++) {
        for (int j = 0; j < DIMS.products(); j++) {
          double[] z = {rng.nextDouble() < 0.3 ? 1 : 0, rng.nextGaussian()};
          double[] c = {rng.nextGaussian(), 0.2 * rng.nextGaussian()};
          s.addRow(z, 0, j, c, 0, -4.0 + rng.nextGaussian(), 0.5 + 0.1 * rng.nextGaussian());
        }
      }
    }
  }

  private static double[] all(GlobalStats s) {
    double[] h = s.hierarchy().data();
    double[] i = s.intercepts().data();
    double[] r = s.regression().data();
    double[] out = new double[h.length + i.length + r.length];
    System.arraycopy(h, 0, out, 0, h.length);
    System.arraycopy(i, 0, out, h.length, i.length);
    System.arraycopy(r, 0, out, h.length + i.length, r.length);
    return out;
  }

  private static void assertClose(double[] expected, double[] actual, double rel) {
    assertEquals(expected.length, actual.length);
    for (int i = 0; i < expected.length; i++) {
      double tol = rel * Math.max(1.0, Math.abs(expected[i]));
      assertEquals(expected[i], actual[i], tol, "element " + i);
    }
  }

  // Common practice for treeAggregate combiners: two halves merged equal one pass.
  @Test
  void mergedHalvesEqualOnePass() {
    GlobalStats one = new GlobalStats(DIMS);
    fill(one, 0, 40);
    GlobalStats a = new GlobalStats(DIMS);
    fill(a, 0, 17);
    GlobalStats b = new GlobalStats(DIMS);
    fill(b, 17, 40);
    assertClose(all(one), all(a.merge(b)), 1e-12);
    assertEquals(40.0, one.hierarchy().count());
  }

  @Test
  void mergeIsOrderIndependent() {
    GlobalStats a1 = new GlobalStats(DIMS);
    fill(a1, 0, 10);
    GlobalStats b1 = new GlobalStats(DIMS);
    fill(b1, 10, 25);
    GlobalStats c1 = new GlobalStats(DIMS);
    fill(c1, 25, 31);
    GlobalStats a2 = new GlobalStats(DIMS);
    fill(a2, 0, 10);
    GlobalStats b2 = new GlobalStats(DIMS);
    fill(b2, 10, 25);
    GlobalStats c2 = new GlobalStats(DIMS);
    fill(c2, 25, 31);
    // IEEE addition is commutative, so a+b and b+a agree exactly.
    double[] ab = all(copyOf(a1).merge(b1));
    double[] ba = all(copyOf(b1).merge(a1));
    assertArrayEquals(ab, ba);
    // Associativity holds up to rounding.
    double[] left = all(a1.merge(b1).merge(c1));
    double[] right = all(a2.merge(b2.merge(c2)));
    assertClose(left, right, 1e-12);
  }

  private static GlobalStats copyOf(GlobalStats s) {
    return new GlobalStats(s.dims()).merge(s);
  }

  @Test
  void serialisesAndResets() throws Exception {
    GlobalStats s = new GlobalStats(DIMS);
    fill(s, 0, 5);
    ByteArrayOutputStream bytes = new ByteArrayOutputStream();
    try (ObjectOutputStream out = new ObjectOutputStream(bytes)) {
      out.writeObject(s);
    }
    GlobalStats back;
    try (ObjectInputStream in =
        new ObjectInputStream(new ByteArrayInputStream(bytes.toByteArray()))) {
      back = (GlobalStats) in.readObject();
    }
    assertArrayEquals(all(s), all(back));
    s.reset();
    assertArrayEquals(all(new GlobalStats(DIMS)), all(s));
  }

  // Brute force (from the definition): W'W, W'y, W'l summed from explicit rows of W.
  @Test
  void regressionBlocksMatchExplicitGramMatrix() {
    SimRows rows =
        new SimRows(
            300, 4, new double[] {0.5, -0.3, 0.2}, new double[] {1, 2, 3, 4},
            new double[] {0.7, -0.1}, 0.4, 0.3, 0.2, new Well19937c(7));
    RegressionStats s = rows.stats();
    int p = s.width();
    double[] ww = new double[p * p];
    double[] wy = new double[p];
    double[] wl = new double[p];
    double yy = 0;
    double ll = 0;
    double yl = 0;
    for (int t = 0; t < rows.n; t++) {
      double[] w = rows.w(t);
      for (int a = 0; a < p; a++) {
        for (int b = 0; b < p; b++) {
          ww[a * p + b] += w[a] * w[b];
        }
        wy[a] += w[a] * rows.y[t];
        wl[a] += w[a] * rows.l[t];
      }
      yy += rows.y[t] * rows.y[t];
      ll += rows.l[t] * rows.l[t];
      yl += rows.y[t] * rows.l[t];
    }
    for (int a = 0; a < p; a++) {
      for (int b = 0; b < p; b++) {
        assertEquals(ww[a * p + b], s.ww(a, b), 1e-10, "ww " + a + "," + b);
      }
      assertEquals(wy[a], s.wy(a), 1e-10);
      assertEquals(wl[a], s.wl(a), 1e-10);
    }
    assertEquals(yy, s.yy(), 1e-9);
    assertEquals(ll, s.ll(), 1e-9);
    assertEquals(yl, s.yl(), 1e-9);
    assertEquals(rows.n, s.n());
    double[] h = new double[p];
    Well19937c rng = new Well19937c(8);
    for (int a = 0; a < p; a++) {
      h[a] = rng.nextGaussian();
    }
    double q = 0;
    for (int a = 0; a < p; a++) {
      for (int b = 0; b < p; b++) {
        q += h[a] * ww[a * p + b] * h[b];
      }
    }
    assertEquals(q, s.quadraticForm(h), 1e-9 * Math.abs(q));
  }

  // Brute force: residual scatter summed over explicit residuals psi_s - Gamma'd_s.
  @Test
  void residualScatterMatchesExplicitResiduals() {
    int kd = 3;
    int kpsi = 4;
    HierarchyStats s = new HierarchyStats(kd, kpsi);
    Well19937c rng = new Well19937c(11);
    double[] gammaPsi = new double[kd * kpsi];
    for (int i = 0; i < gammaPsi.length; i++) {
      gammaPsi[i] = rng.nextGaussian();
    }
    double[] expected = new double[kpsi * kpsi];
    for (int store = 0; store < 50; store++) {
      double[] d = {1.0, rng.nextGaussian(), rng.nextGaussian()};
      double[] psi = new double[kpsi];
      for (int k = 0; k < kpsi; k++) {
        psi[k] = 2 * rng.nextGaussian();
      }
      s.add(d, psi);
      double[] r = new double[kpsi];
      for (int k = 0; k < kpsi; k++) {
        r[k] = psi[k];
        for (int m = 0; m < kd; m++) {
          r[k] -= gammaPsi[m * kpsi + k] * d[m];
        }
      }
      for (int i = 0; i < kpsi; i++) {
        for (int k = 0; k < kpsi; k++) {
          expected[i * kpsi + k] += r[i] * r[k];
        }
      }
    }
    assertClose(expected, s.residualScatter(gammaPsi), 1e-11);
  }

  @Test
  void rejectsBadRowsWithMessages() {
    GlobalStats s = new GlobalStats(DIMS);
    double[] z = {0, 1};
    double[] c = {1, 1};
    IllegalArgumentException e =
        assertThrows(IllegalArgumentException.class, () -> s.addRow(z, 0, 0, c, 0, Double.NaN, 0));
    assertTrue(e.getMessage().contains("non-finite"));
    assertThrows(IllegalArgumentException.class, () -> s.addRow(z, 0, 5, c, 0, 0, 0));
    assertThrows(IllegalArgumentException.class, () -> s.addIntercept(-1, 0));
    assertThrows(
        IllegalArgumentException.class,
        () -> s.addStore(new double[] {1, 2}, new double[] {0, 0, 0, 0}));
    assertThrows(
        IllegalArgumentException.class,
        () -> s.merge(new GlobalStats(new Dims(3, 4, 6, 2, 2))));
  }
}
