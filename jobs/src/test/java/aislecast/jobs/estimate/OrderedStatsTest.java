package aislecast.jobs.estimate;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;

import aislecast.core.estimate.SweepStats;
import aislecast.core.globals.Dims;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.Random;
import org.junit.jupiter.api.Test;

/**
 * The ordered aggregation must give bit-identical totals whatever way the stores are split into
 * partitions and whatever order partial results are combined in; with one group it must equal
 * the plain left fold over stores in index order (what the in-process runner computes).
 */
class OrderedStatsTest {
  private static final Dims DIMS = new Dims(2, 3, 4, 1, 1);
  private static final int CHAINS = 2;
  private static final int STORES = 23;

  /** Statistics with values of very different magnitudes, so summation order shows. */
  private static List<SweepStats> stores(long seed) {
    Random rng = new Random(seed);
    List<SweepStats> out = new ArrayList<>();
    for (int s = 0; s < STORES; s++) {
      SweepStats st = new SweepStats(DIMS, CHAINS);
      for (int c = 0; c < CHAINS; c++) {
        double scale = Math.pow(10, rng.nextInt(12) - 6);
        st.current[c].addStore(new double[] {1, rng.nextGaussian()},
            new double[] {scale * rng.nextGaussian(), rng.nextGaussian(), rng.nextGaussian()});
        st.current[c].addIntercept(rng.nextInt(4), scale * rng.nextGaussian());
        st.current[c].addRow(new double[] {rng.nextGaussian()}, 0, rng.nextInt(4),
            new double[] {rng.nextGaussian()}, 0, scale * rng.nextGaussian(), rng.nextGaussian());
        st.salesDelta[c] = scale * rng.nextGaussian();
        st.acceptSum[c] = rng.nextDouble();
        st.transitions[c] = 1;
      }
      out.add(st);
    }
    return out;
  }

  private static double[] flat(SweepStats s) {
    List<Double> v = new ArrayList<>();
    for (int c = 0; c < CHAINS; c++) {
      for (double x : s.current[c].hierarchy().data()) {
        v.add(x);
      }
      for (double x : s.current[c].intercepts().data()) {
        v.add(x);
      }
      for (double x : s.current[c].regression().data()) {
        v.add(x);
      }
      v.add(s.salesDelta[c]);
      v.add(s.acceptSum[c]);
    }
    return v.stream().mapToDouble(Double::doubleValue).toArray();
  }

  /** Random contiguous partitions, partial aggregates combined in random order. */
  private static SweepStats shuffled(List<SweepStats> st, int group, Random rng) {
    List<OrderedStats> parts = new ArrayList<>();
    int s = 0;
    while (s < STORES) {
      int len = 1 + rng.nextInt(6);
      OrderedStats p = new OrderedStats(group, STORES, DIMS, CHAINS);
      List<Integer> idx = new ArrayList<>();
      for (int k = s; k < Math.min(STORES, s + len); k++) {
        idx.add(k);
      }
      Collections.shuffle(idx, rng);
      for (int k : idx) {
        p.add(k, st.get(k), 1L);
      }
      parts.add(p);
      s += len;
    }
    while (parts.size() > 1) {
      OrderedStats a = parts.remove(rng.nextInt(parts.size()));
      OrderedStats b = parts.remove(rng.nextInt(parts.size()));
      parts.add(a.merge(b));
    }
    return parts.get(0).total();
  }

  @Test
  void oneGroupEqualsTheLeftFoldInStoreOrder() {
    List<SweepStats> st = stores(1);
    SweepStats fold = new SweepStats(DIMS, CHAINS);
    for (SweepStats s : st) {
      fold.merge(s);
    }
    // the data are order-sensitive: the same sum taken backwards differs in some bits
    SweepStats backwards = new SweepStats(DIMS, CHAINS);
    for (int k = STORES - 1; k >= 0; k--) {
      backwards.merge(st.get(k));
    }
    assertFalse(java.util.Arrays.equals(flat(fold), flat(backwards)));
    Random rng = new Random(2);
    for (int trial = 0; trial < 50; trial++) {
      assertArrayEquals(flat(fold), flat(shuffled(stores(1), STORES, rng)), 0.0);
    }
  }

  @Test
  void anyGroupSizeGivesTheSameBitsForEverySplitAndOrder() {
    Random rng = new Random(3);
    for (int group : new int[] {1, 2, 5, 8}) {
      double[] first = flat(shuffled(stores(4), group, rng));
      for (int trial = 0; trial < 30; trial++) {
        assertArrayEquals(first, flat(shuffled(stores(4), group, rng)), 0.0, "group " + group);
      }
    }
  }

  @Test
  void aMissingOrRepeatedStoreIsAnError() {
    List<SweepStats> st = stores(5);
    OrderedStats missing = new OrderedStats(4, STORES, DIMS, CHAINS);
    for (int s = 0; s < STORES - 1; s++) {
      missing.add(s, st.get(s), 0L);
    }
    assertThrows(IllegalStateException.class, missing::total);
    OrderedStats twice = new OrderedStats(4, STORES, DIMS, CHAINS);
    twice.add(3, st.get(3), 0L);
    assertThrows(IllegalStateException.class, () -> twice.add(3, st.get(3), 0L));
  }
}
