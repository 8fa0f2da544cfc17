package aislecast.jobs.estimate;

import java.io.BufferedInputStream;
import java.io.FileInputStream;
import java.io.IOException;
import java.io.ObjectInputStream;

/** What the manual probes share: reading a checkpoint's driver state from a local file. */
final class ProbeFiles {
  private ProbeFiles() {}

  /** The {@link ChainRecord} in a checkpoint's {@code driver.bin} (a local path). */
  static ChainRecord readRecord(String driverBin) throws IOException, ClassNotFoundException {
    try (ObjectInputStream in = new ObjectInputStream(
        new BufferedInputStream(new FileInputStream(driverBin)))) {
      return (ChainRecord) in.readObject();
    }
  }
}
