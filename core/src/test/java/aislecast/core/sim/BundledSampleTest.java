package aislecast.core.sim;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The committed sample equals what the demo settings generate today. It fails when a change to
 * the simulator or the kernel it uses (ShareKernel, ShopperDraws, streams) alters the bytes:
 * then regenerate the sample with the command in data-samples/README.md (and bump
 * DemandSimulator.VERSION if the simulator itself changed).
 */
class BundledSampleTest {
  // tests run from the module folder; the sample is at the repository root
  private static final Path SAMPLE = Path.of("..", "data-samples", "chilled-drinks");

  @TempDir Path tmp;

  @Test
  void committedSampleIsReproducedByteForByte() throws IOException {
    assertTrue(Files.isDirectory(SAMPLE), "sample folder missing: " + SAMPLE.toAbsolutePath());
    Path out = tmp.resolve("demo");
    SimWriter.write(DemandSimulator.simulate(SimSettings.demo()), out, false);
    long total = 0;
    for (String f : SimWriter.FILES) {
      byte[] committed = Files.readAllBytes(SAMPLE.resolve(f));
      total += committed.length;
      assertArrayEquals(committed, Files.readAllBytes(out.resolve(f)),
          f + " differs from the demo settings' output: regenerate (data-samples/README.md)");
    }
    assertTrue(total < 5_000_000, "sample must stay under 5 MB, is " + total);
  }
}
