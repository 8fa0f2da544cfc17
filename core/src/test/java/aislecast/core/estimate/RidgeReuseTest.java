package aislecast.core.estimate;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import aislecast.core.globals.Priors;
import aislecast.core.sim.SimSettings;
import org.junit.jupiter.api.Test;

/**
 * Applying an accepted ridge shift from the position computed when it was proposed must give the
 * very draws that repeating the re-inversion gives: the same run both ways, compared bit for bit
 * (globals, every store's kept {@code psi} and final position), with shifts actually accepted.
 */
class RidgeReuseTest {

  @Test
  void reusedAndRecomputedRidgePositionsGiveIdenticalDraws() {
    SimFixture data = new SimFixture(SimSettings.demo().withSizes(4, 6, 5, 2, 2, 20));
    Priors pr = Priors.defaults(2, 2);
    SamplerSettings set = new SamplerSettings(2, 10, 20, 1, 4, 0.8, 17L, false, true,
        SamplerSettings.DEFAULT_MOMENTUM_PERSISTENCE, 1);
    InProcessRunner.Result reused = InProcessRunner.run(data.stores, data.catalog, 2, 1, 1, pr,
        set);
    InProcessRunner.Result recomputed;
    Sweeps.reuseRidgePositions = false;
    try {
      recomputed = InProcessRunner.run(data.stores, data.catalog, 2, 1, 1, pr, set);
    } finally {
      Sweeps.reuseRidgePositions = true;
    }
    long accepted = 0;
    for (long a : reused.last().ridgeAccepted()) {
      accepted += a;
    }
    assertTrue(accepted > 0, "no ridge shift was accepted, so nothing was reused");
    for (int c = 0; c < 2; c++) {
      for (int d = 0; d < 20; d++) {
        assertArrayEquals(recomputed.globalDraws()[c][d], reused.globalDraws()[c][d],
            "chain " + c + " draw " + d);
      }
      for (int s = 0; s < data.stores.size(); s++) {
        assertArrayEquals(recomputed.stores().get(s).psiDraws[c],
            reused.stores().get(s).psiDraws[c]);
        assertArrayEquals(recomputed.stores().get(s).chains[c].position,
            reused.stores().get(s).chains[c].position);
      }
    }
  }
}
