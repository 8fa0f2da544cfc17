package aislecast.jobs.estimate;

import aislecast.core.diag.Diagnostics;
import java.util.Arrays;
import java.util.Locale;

/**
 * Manual probe (not a test): each chain's own bulk ESS and mean of one global parameter over
 * windows of a checkpoint's kept draws, from draw {@code from} in windows of {@code len} ({@code
 * all}: every window from draw 0). The means show a chain that sits apart from the others.
 *
 * <p>Usage: {@code WindowEssProbe <driver.bin> <parameter index or name, e.g. kappabar[28]>
 * <from> <len> [all]}, on the jobs test class path.
 */
public final class WindowEssProbe {
  private WindowEssProbe() {}

  public static void main(String[] args) throws Exception {
    ChainRecord r = ProbeFiles.readRecord(args[0]);
    String[] names = aislecast.core.globals.Globals.parameterNames(r.state.globals()[0].dims());
    int p = args[1].matches("\\d+") ? Integer.parseInt(args[1])
        : Arrays.asList(names).indexOf(args[1]);
    if (p < 0 || p >= names.length) {
      throw new IllegalArgumentException("no global parameter " + args[1]);
    }
    int from = Integer.parseInt(args[2]);
    int len = Integer.parseInt(args[3]);
    boolean all = args.length > 4 && args[4].equals("all");
    double[][] chains = r.chainsOf(p);
    System.out.println(r.keptDraws + " kept draws per chain; " + names[p]
        + ": each chain's bulk ESS, then its mean, per window");
    for (int s = all ? 0 : from; s + len <= r.keptDraws; s += len) {
      StringBuilder b = new StringBuilder(String.format(Locale.ROOT, "draws %5d-%5d:", s, s + len));
      for (double[] c : chains) {
        b.append(String.format(Locale.ROOT, " %6.1f",
            Diagnostics.essBulk(new double[][] {Arrays.copyOfRange(c, s, s + len)})));
      }
      b.append("  |");
      for (double[] c : chains) {
        b.append(String.format(Locale.ROOT, " %9.4f",
            Arrays.stream(c, s, s + len).average().orElse(Double.NaN)));
      }
      System.out.println(b);
      if (!all) {
        break;
      }
    }
  }
}
