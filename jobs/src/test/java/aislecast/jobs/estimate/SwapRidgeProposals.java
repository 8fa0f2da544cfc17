package aislecast.jobs.estimate;

import aislecast.core.estimate.DriverState;
import java.io.FileOutputStream;
import java.io.ObjectOutputStream;

/**
 * Manual probe (not a test): rewrites a checkpoint's {@code driver.bin} with two chains' ridge
 * proposals (scale and factor) swapped, nothing else changed, so that continuing the copy with
 * {@code --resume} shows how much of a chain's mixing its proposal carries. Delete the copy's
 * {@code .driver.bin.crc} after rewriting (Hadoop's local checksum).
 *
 * <p>Usage: {@code SwapRidgeProposals <driver.bin> <out> <chain a> <chain b>}, on the jobs test
 * class path.
 */
public final class SwapRidgeProposals {
  private SwapRidgeProposals() {}

  public static void main(String[] args) throws Exception {
    ChainRecord r = ProbeFiles.readRecord(args[0]);
    int a = Integer.parseInt(args[2]);
    int b = Integer.parseInt(args[3]);
    DriverState s = r.state;
    double[] scale = s.ridgeScale().clone();
    double[][] chol = s.ridgeChol().clone();
    double t = scale[a];
    scale[a] = scale[b];
    scale[b] = t;
    double[] l = chol[a];
    chol[a] = chol[b];
    chol[b] = l;
    r.state = new DriverState(s.globals(), scale, chol, s.ridgeHistory(), s.pendingShift(),
        s.ridgeAccepted(), s.ridgeProposed(), s.nextSweep());
    try (ObjectOutputStream out = new ObjectOutputStream(new FileOutputStream(args[1]))) {
      out.writeObject(r);
    }
    System.out.println("chains " + a + " and " + b + " swapped their ridge proposals, after sweep "
        + (s.nextSweep() - 1));
  }
}
