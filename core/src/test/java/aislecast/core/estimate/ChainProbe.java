package aislecast.core.estimate;

import aislecast.core.globals.Priors;
import aislecast.core.model.ReferenceFixtures;

/** Manual probe: per-chain means of selected globals over consecutive blocks of sweeps. */
public final class ChainProbe {
  public static void main(String[] args) throws Exception {
    var f = ReferenceFixtures.load();
    int warm = Integer.parseInt(args[0]), keep = Integer.parseInt(args[1]);
    var set = new SamplerSettings(4, warm, keep, Integer.parseInt(args[2]), 16, 0.8, 7, false, !"0".equals(System.getenv("RIDGE")));
    var res = InProcessRunner.run(f.stores(), f.catalog(), 1, 1, 1, Priors.defaults(1, 2), set);
    String[] names = res.parameterNames();
    int block = keep / 5;
    for (int p : new int[] {0, 1, 2, 20, 26, 27}) {
      System.out.println(names[p]);
      for (int c = 0; c < 4; c++) {
        StringBuilder sb = new StringBuilder("  chain " + c + ":");
        for (int b = 0; b < 5; b++) {
          double m = 0;
          for (int i = b * block; i < (b + 1) * block; i++) m += res.globalDraws()[c][i][p];
          sb.append(String.format(" %7.3f", m / block));
        }
        System.out.println(sb);
      }
    }
    // per-store a_s chain means at the end
    for (StoreBlock b : res.stores()) {
      StringBuilder sb = new StringBuilder(b.data.storeId + " a_s last:");
      for (int c = 0; c < 4; c++) sb.append(String.format(" %7.3f", b.chains[c].position[0]));
      sb.append("  log_sigma:");
      for (int c = 0; c < 4; c++) sb.append(String.format(" %7.3f", b.chains[c].position[1]));
      sb.append(String.format("  step %.4f", b.chains[0].stepSize));
      System.out.println(sb);
    }
  }
}
