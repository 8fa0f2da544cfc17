package aislecast.jobs.estimate;

import aislecast.core.estimate.SweepStats;
import aislecast.core.globals.Dims;
import java.io.Serializable;
import java.util.Map;
import java.util.TreeMap;

/**
 * The {@code treeAggregate} value of one sweep: every store's {@link SweepStats} added in a fixed
 * order, whatever partitioning, task order or retries Spark chooses.
 *
 * <p>Floating-point addition is not associative, so summing per partition and then across
 * partitions in task-completion order would make the draws depend on the partitioning and on
 * timing. Instead stores are cut into fixed groups of {@code group} consecutive store indices;
 * inside a group the statistics are folded left in store order ({@code ((s_a + s_a+1) + ...)}),
 * which an aggregate can do as soon as it holds a contiguous run from the group's first store.
 * Stores that arrive before their predecessors wait as they are. The driver then adds the groups
 * in order. With one group this is exactly the in-process runner's left fold over all stores.
 *
 * <p>Memory: a partition sends at most one folded value per group it starts plus the stores of
 * the group it enters mid-way, so a smaller group sends less at the price of nothing but a
 * different (still fixed) summation order.
 */
final class OrderedStats implements Serializable {
  private static final long serialVersionUID = 1L;

  private final int group;
  private final int stores;
  private final Dims dims;
  private final int chains;
  private final TreeMap<Integer, Group> groups = new TreeMap<>();
  /** Nanoseconds spent inside the stores' sweeps (summed exactly: long). */
  private long modelNanos;

  private static final class Group implements Serializable {
    private static final long serialVersionUID = 1L;
    /** Left fold of stores first .. next-1; null until the group's first store arrives. */
    SweepStats prefix;
    int next;
    final TreeMap<Integer, SweepStats> waiting = new TreeMap<>();

    Group(int first) {
      next = first;
    }
  }

  OrderedStats(int group, int stores, Dims dims, int chains) {
    if (group < 1 || stores < 1) {
      throw new IllegalArgumentException("need group >= 1 and stores >= 1");
    }
    this.group = group;
    this.stores = stores;
    this.dims = dims;
    this.chains = chains;
  }

  /** Sequence operation: one store's statistics (not modified, not kept if folded). */
  OrderedStats add(int store, SweepStats s, long nanos) {
    modelNanos += nanos;
    int g = store / group;
    Group grp = groups.computeIfAbsent(g, k -> new Group(k * group));
    if (store < grp.next || grp.waiting.containsKey(store)) {
      throw new IllegalStateException("store " + store + " was aggregated twice");
    }
    grp.waiting.put(store, s);
    fold(grp);
    return this;
  }

  /** Combine operation: adds {@code o} into this (o is not used afterwards). */
  OrderedStats merge(OrderedStats o) {
    modelNanos += o.modelNanos;
    for (Map.Entry<Integer, Group> e : o.groups.entrySet()) {
      Group mine = groups.get(e.getKey());
      Group theirs = e.getValue();
      if (mine == null) {
        groups.put(e.getKey(), theirs);
        continue;
      }
      // at most one side can hold the group's leading run
      if (theirs.prefix != null) {
        if (mine.prefix != null) {
          throw new IllegalStateException("a store was aggregated twice");
        }
        mine.prefix = theirs.prefix;
        mine.next = theirs.next;
      }
      for (Map.Entry<Integer, SweepStats> w : theirs.waiting.entrySet()) {
        if (mine.waiting.put(w.getKey(), w.getValue()) != null) {
          throw new IllegalStateException("store " + w.getKey() + " was aggregated twice");
        }
      }
      fold(mine);
    }
    return this;
  }

  private void fold(Group grp) {
    SweepStats s;
    while ((s = grp.waiting.remove(grp.next)) != null) {
      if (grp.prefix == null) {
        // a fresh zero plus the first store, as the in-process runner starts its sum
        grp.prefix = new SweepStats(dims, chains);
      }
      grp.prefix.merge(s);
      grp.next++;
    }
  }

  /** The statistics of all stores: groups added in order. Fails if any store is missing. */
  SweepStats total() {
    int expectedGroups = (stores + group - 1) / group;
    SweepStats out = null;
    for (int g = 0; g < expectedGroups; g++) {
      Group grp = groups.get(g);
      int end = Math.min(stores, (g + 1) * group);
      if (grp == null || grp.prefix == null || grp.next != end || !grp.waiting.isEmpty()) {
        throw new IllegalStateException("sweep statistics are missing stores of group " + g);
      }
      out = out == null ? grp.prefix : out.merge(grp.prefix);
    }
    if (groups.size() != expectedGroups) {
      throw new IllegalStateException("sweep statistics hold unknown stores");
    }
    return out;
  }

  long modelNanos() {
    return modelNanos;
  }
}
