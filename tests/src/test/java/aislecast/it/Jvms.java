package aislecast.it;

import java.io.IOException;
import java.net.ServerSocket;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.Optional;
import java.util.concurrent.TimeUnit;
import java.util.function.BooleanSupplier;

/**
 * Starts JVMs as child processes (output to log files) and remembers every one, so
 * {@link #close()} can end them all, including executor JVMs the Spark worker started on our
 * behalf (descendants of a child).
 */
final class Jvms implements AutoCloseable {

  /** JVM flags Spark needs on Java 17 (the same list as the launcher jar's Add-Opens). */
  static final List<String> OPENS = List.of(
      "java.base/java.lang", "java.base/java.lang.invoke", "java.base/java.nio",
      "java.base/sun.nio.ch", "java.base/java.util", "java.base/sun.util.calendar",
      "java.base/java.util.concurrent", "java.base/java.net", "java.base/java.io",
      "java.base/sun.nio.cs", "java.base/sun.security.action").stream()
      .map(m -> "--add-opens=" + m + "=ALL-UNNAMED").toList();

  private final List<Process> started = new ArrayList<>();
  private final Path logDir;
  private final Map<String, String> env;

  Jvms(Path logDir, Map<String, String> env) {
    this.logDir = logDir;
    this.env = env;
    // also when the test JVM itself is stopped (Maven interrupted, fork timeout)
    Runtime.getRuntime().addShutdownHook(new Thread(this::close, "kill-test-jvms"));
  }

  /** The java executable running this test, so children use the same JDK. */
  static String javaBin() {
    return ProcessHandle.current().info().command()
        .orElse(Path.of(System.getProperty("java.home"), "bin", "java").toString());
  }

  /** A free TCP port on loopback (closed again before use: a tiny race, acceptable in tests). */
  static int freePort() throws IOException {
    try (ServerSocket s = new ServerSocket(0, 1, java.net.InetAddress.getLoopbackAddress())) {
      s.setReuseAddress(true);
      return s.getLocalPort();
    }
  }

  /** Starts {@code java <args>} with stdout and stderr in {@code <logDir>/<name>.log}. */
  Process start(String name, List<String> args) throws IOException {
    List<String> cmd = new ArrayList<>();
    cmd.add(javaBin());
    cmd.addAll(args);
    ProcessBuilder pb = new ProcessBuilder(cmd).redirectErrorStream(true)
        .redirectOutput(log(name).toFile());
    pb.environment().putAll(env);
    Process p = pb.start();
    synchronized (started) {
      started.add(p);
    }
    return p;
  }

  Path log(String name) {
    return logDir.resolve(name + ".log");
  }

  String logText(String name) {
    try {
      return Files.exists(log(name)) ? Files.readString(log(name)) : "";
    } catch (IOException e) {
      return "(cannot read " + log(name) + ": " + e + ")";
    }
  }

  /** Waits for the process to end; on timeout kills it and fails. Returns the exit code. */
  int await(Process p, String name, Duration timeout) throws InterruptedException {
    if (!p.waitFor(timeout.toMillis(), TimeUnit.MILLISECONDS)) {
      kill(p);
      throw new AssertionError(name + " did not finish within " + timeout + "; log:\n"
          + tail(logText(name)));
    }
    return p.exitValue();
  }

  /** Polls {@code condition} every 50 ms; false when {@code timeout} passes first. */
  static boolean waitFor(BooleanSupplier condition, Duration timeout) throws InterruptedException {
    long end = System.nanoTime() + timeout.toNanos();
    while (System.nanoTime() < end) {
      if (condition.getAsBoolean()) {
        return true;
      }
      Thread.sleep(50);
    }
    return condition.getAsBoolean();
  }

  /** Kills a process and its descendants at once (no shutdown hooks: a real crash). */
  static void kill(Process p) {
    kill(p.toHandle());
  }

  static void kill(ProcessHandle h) {
    h.descendants().forEach(ProcessHandle::destroyForcibly);
    h.destroyForcibly();
    try {
      h.onExit().get(30, TimeUnit.SECONDS);
    } catch (Exception e) {
      // best effort: the handle is gone or stuck; close() tries again
    }
  }

  /** JVMs on this machine whose command line contains {@code marker}, children of ours only. */
  Optional<ProcessHandle> descendantWith(String marker) {
    List<Process> snapshot;
    synchronized (started) {
      snapshot = List.copyOf(started);
    }
    return snapshot.stream().flatMap(Process::descendants)
        .filter(ProcessHandle::isAlive)
        .filter(h -> h.info().commandLine().map(c -> c.contains(marker)).orElse(false))
        .findFirst();
  }

  /** Last lines of a log, for failure messages. */
  static String tail(String text) {
    String[] lines = text.split("\n");
    int from = Math.max(0, lines.length - 60);
    return String.join("\n", java.util.Arrays.copyOfRange(lines, from, lines.length));
  }

  @Override
  public void close() {
    List<Process> snapshot;
    synchronized (started) {
      snapshot = List.copyOf(started);
    }
    // newest first: drivers, then the worker (and its executors), then the master
    for (int i = snapshot.size() - 1; i >= 0; i--) {
      kill(snapshot.get(i));
    }
  }
}
