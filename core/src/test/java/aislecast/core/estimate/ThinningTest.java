package aislecast.core.estimate;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import aislecast.core.globals.Priors;
import aislecast.core.sim.SimSettings;
import org.junit.jupiter.api.Test;

/**
 * Thinning only chooses which states are recorded: the thinned run's draws must be exactly every
 * k-th draw of the same run unthinned (the chains themselves are untouched, every random stream
 * being keyed by sweep), globals and stores' {@code psi} alike.
 */
class ThinningTest {

  private static SamplerSettings settings(int thin) {
    return new SamplerSettings(2, 6, 12, 1, 4, 0.8, 9L, false, true,
        SamplerSettings.DEFAULT_MOMENTUM_PERSISTENCE, thin);
  }

  @Test
  void everyThirdDrawOfTheUnthinnedRun() {
    SimFixture data = new SimFixture(SimSettings.demo().withSizes(3, 6, 5, 2, 2, 20));
    Priors pr = Priors.defaults(2, 2);
    InProcessRunner.Result all = InProcessRunner.run(data.stores, data.catalog, 2, 1, 1, pr,
        settings(1));
    InProcessRunner.Result third = InProcessRunner.run(data.stores, data.catalog, 2, 1, 1, pr,
        settings(3));
    assertEquals(12, all.globalDraws()[0].length);
    assertEquals(4, third.globalDraws()[0].length);
    int kpsi = data.dims.kpsi();
    for (int c = 0; c < 2; c++) {
      for (int d = 0; d < 4; d++) {
        // kept: sampling sweeps 3, 6, 9, 12 (1-based), i.e. unthinned draws 2, 5, 8, 11
        assertArrayEquals(all.globalDraws()[c][3 * d + 2], third.globalDraws()[c][d],
            "chain " + c + " draw " + d);
      }
      for (int s = 0; s < data.stores.size(); s++) {
        StoreBlock a = all.stores().get(s);
        StoreBlock b = third.stores().get(s);
        assertEquals(4, b.keptDraws);
        for (int d = 0; d < 4; d++) {
          assertArrayEquals(
              java.util.Arrays.copyOfRange(a.psiDraws[c], (3 * d + 2) * kpsi, (3 * d + 3) * kpsi),
              java.util.Arrays.copyOfRange(b.psiDraws[c], d * kpsi, (d + 1) * kpsi));
        }
      }
    }
    // the final states agree too: thinning did not touch the chains
    assertArrayEquals(all.last().globals()[1].toFlat(), third.last().globals()[1].toFlat());
  }

  @Test
  void samplingMustBeAMultipleOfThinAndKeysOfUnthinnedRunsAreUnchanged() {
    IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
        () -> new SamplerSettings(2, 6, 10, 1, 4, 0.8, 9L, false, true, 0.9, 3));
    assertTrue(e.getMessage().contains("multiple of thin"), e.getMessage());
    // the text that checkpoints are keyed by, as written by builds before thinning existed (a
    // checkpoint's driver.bin of such a build): unthinned settings must still produce it
    assertEquals("SamplerSettings[chains=4, warmupSweeps=500, samplingSweeps=20000, localSteps=1,"
        + " leapfrogSteps=8, targetAccept=0.8, seed=20240601, fixLambdaZero=false,"
        + " ridgeMove=true, momentumPersistence=0.9]",
        new SamplerSettings(4, 500, 20000, 1, 8, 0.8, 20240601L, false, true, 0.9).toString());
    assertTrue(new SamplerSettings(4, 500, 20000, 1, 8, 0.8, 20240601L, false, true, 0.9, 10)
        .toString().endsWith(", thin=10]"));
  }
}
