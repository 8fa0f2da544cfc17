package aislecast.jobs.io;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Map;
import java.util.TreeMap;
import java.util.stream.Stream;

/** Every regular file under a folder: relative path to size, modification time and digest. */
public final class FolderSnapshot {
  private FolderSnapshot() {}

  public static Map<String, String> of(Path root) throws IOException {
    Map<String, String> m = new TreeMap<>();
    try (Stream<Path> s = Files.walk(root)) {
      for (Path p : (Iterable<Path>) s::iterator) {
        if (Files.isRegularFile(p)) {
          m.put(root.relativize(p).toString(), Files.size(p) + " "
              + Files.getLastModifiedTime(p).toMillis() + " "
              + InputFingerprint.sha256(Files.readAllBytes(p)));
        }
      }
    }
    return m;
  }

  /** Names in {@code dir} (not recursive), sorted; hidden ones included. */
  public static java.util.List<String> names(Path dir) throws IOException {
    try (Stream<Path> s = Files.list(dir)) {
      return s.map(p -> p.getFileName().toString()).sorted().toList();
    }
  }
}
