package aislecast.jobs.estimate;

import aislecast.core.diag.Diagnostics;
import java.util.Arrays;
import java.util.Locale;

/**
 * Manual probe (not a test): each chain's own bulk ESS of one global parameter over windows of
 * a checkpoint's kept draws, from draw {@code from} in windows of {@code len} ({@code all}: every
 * window from draw 0).
 *
 * <p>Usage: {@code WindowEssProbe <driver.bin> <parameter index> <from> <len> [all]}, on the jobs
 * test class path.
 */
public final class WindowEssProbe {
  private WindowEssProbe() {}

  public static void main(String[] args) throws Exception {
    ChainRecord r = ProbeFiles.readRecord(args[0]);
    int p = Integer.parseInt(args[1]);
    int from = Integer.parseInt(args[2]);
    int len = Integer.parseInt(args[3]);
    boolean all = args.length > 4 && args[4].equals("all");
    double[][] chains = r.chainsOf(p);
    System.out.println(r.keptDraws + " kept draws per chain");
    for (int s = all ? 0 : from; s + len <= r.keptDraws; s += len) {
      StringBuilder b = new StringBuilder(String.format(Locale.ROOT, "draws %5d-%5d:", s, s + len));
      for (double[] c : chains) {
        b.append(String.format(Locale.ROOT, " %6.1f",
            Diagnostics.essBulk(new double[][] {Arrays.copyOfRange(c, s, s + len)})));
      }
      System.out.println(b);
      if (!all) {
        break;
      }
    }
  }
}
