package aislecast.jobs.io;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.util.concurrent.TimeUnit;

/**
 * SHA-256 of a file computed outside the JVM by GNU coreutils' {@code sha256sum} (FIPS 180-4),
 * an implementation independent of the JDK's {@code MessageDigest} that the code under test uses.
 * Debian ships it in coreutils, so it is present wherever the build runs.
 */
public final class Sha256Sum {
  private Sha256Sum() {}

  /** Lower-case hex digest of {@code file}. */
  public static String of(Path file) throws IOException, InterruptedException {
    Process p = new ProcessBuilder("sha256sum", "-b", file.toString())
        .redirectErrorStream(true).start();
    String out = new String(p.getInputStream().readAllBytes(), StandardCharsets.UTF_8);
    if (!p.waitFor(60, TimeUnit.SECONDS) || p.exitValue() != 0) {
      throw new IOException("sha256sum failed on " + file + ": " + out);
    }
    return out.substring(0, 64);
  }
}
