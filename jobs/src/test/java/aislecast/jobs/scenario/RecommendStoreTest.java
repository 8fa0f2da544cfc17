package aislecast.jobs.scenario;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import aislecast.core.scenario.Response;
import java.util.List;
import org.apache.spark.sql.Row;
import org.junit.jupiter.api.Test;

/** One store's recommendation task, without Spark: stores that cannot be recommended say so. */
class RecommendStoreTest {
  /** Two products (ours and a rival's), one attribute, four shoppers, the given psi draws. */
  private static StoreWork store(double[][] psi) {
    int d = psi.length;
    int[] chain = new int[d];
    int[] draw = new int[d];
    for (int i = 0; i < d; i++) {
      chain[i] = i % 2;
      draw[i] = i / 2;
    }
    double[] nu = {-1.0, 0.5, -0.3, -1.0, 0.3, 1.0, 1.0, -0.5};
    return new StoreWork("S7", "North", new String[] {"P1", "P2"}, new String[] {"Own", "Rival"},
        1, new double[] {0.5, -0.5}, new double[] {2.0, 2.5}, new double[] {120, 80}, 1000, nu, 4,
        List.of("Own"), chain, draw, psi, List.of(), null);
  }

  @Test
  void aStoreWhoseSharesCannotBeReproducedIsFlaggedNotDropped() {
    // log sigma = 800: exp(800 nu) overflows, every shopper's utility is infinite or NaN, so the
    // share inversion cannot converge at any draw
    StoreWork w = store(new double[][] {{0, 800, 0}, {0, 800, 0}, {0, 800, 0}, {0, 800, 0}});
    RecommendJob.StoreResult r = RecommendJob.recommend(w,
        RecommendJob.settings(0.1, Response.HOLD, 0.5), "mean");
    assertTrue(r.unrecommended());
    assertEquals(List.of(), r.rows());
    assertEquals(4, r.draws().size());
    for (Row row : r.draws()) {
      assertEquals("S7", row.getString(0));
      assertFalse(row.getBoolean(4), "no draw used");
    }
  }

  @Test
  void anOrdinaryStoreIsRecommended() {
    StoreWork w = store(new double[][] {{0, -1, -1}, {0.1, -1, -1}, {0, -1.2, -0.8},
        {-0.1, -1, -1}});
    RecommendJob.StoreResult r = RecommendJob.recommend(w,
        RecommendJob.settings(0.1, Response.HOLD, 0.5), "mean");
    assertFalse(r.unrecommended());
    assertEquals(1, r.rows().size(), "one row for our one product");
  }

  @Test
  void theNoteNamesTheStores() {
    assertNull(RecommendJob.unrecommendedNote(List.of()));
    assertEquals("1 store stocks portfolio products but got no recommendation: at none of the"
        + " selected posterior draws could the base-period shares be reproduced (share inversion"
        + " did not converge): S7. Their draws are in recommendation_draws/ with used = false",
        RecommendJob.unrecommendedNote(List.of("S7")));
    List<String> many = new java.util.ArrayList<>();
    for (int i = 12; i >= 1; i--) {
      many.add(String.format("S%02d", i));
    }
    String note = RecommendJob.unrecommendedNote(many);
    assertTrue(note.startsWith("12 stores stock portfolio products"), note);
    assertTrue(note.contains(": S01, S02, S03, S04, S05, S06, S07, S08, S09, S10 and 2 more."),
        note);
  }
}
