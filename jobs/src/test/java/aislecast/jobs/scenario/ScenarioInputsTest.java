package aislecast.jobs.scenario;

import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import aislecast.jobs.estimate.EstimateJob;
import org.junit.jupiter.api.Test;

/** Scenario runs on an unconverged posterior say so in their notes. */
class ScenarioInputsTest {
  @Test
  void notesAPosteriorBeyondItsConvergenceLimits() {
    for (var st : new EstimateJob.Status[] {EstimateJob.Status.NOT_CONVERGED,
        EstimateJob.Status.UNCONVERGED_ALLOWED, EstimateJob.Status.STOPPED}) {
      String note = ScenarioInputs.convergenceNote(st.label);
      assertNotNull(note, st.label);
      assertTrue(note.contains(st.label) && note.contains("indicative only"), note);
    }
    assertNull(ScenarioInputs.convergenceNote(EstimateJob.Status.CONVERGED.label));
    assertNull(ScenarioInputs.convergenceNote(null));
  }
}
