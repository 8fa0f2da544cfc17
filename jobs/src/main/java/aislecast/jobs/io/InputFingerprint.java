package aislecast.jobs.io;

import aislecast.jobs.config.InputConfig;
import aislecast.jobs.config.RunConfig;
import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.SerializationFeature;
import java.io.IOException;
import java.io.InputStream;
import java.nio.charset.StandardCharsets;
import java.security.MessageDigest;
import java.security.NoSuchAlgorithmException;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.HexFormat;
import java.util.List;
import org.apache.hadoop.fs.FileStatus;
import org.apache.hadoop.fs.FileSystem;
import org.apache.hadoop.fs.Path;
import org.apache.spark.sql.SparkSession;

/**
 * SHA-256 fingerprints of what a run reads: files (one digest each, with the path relative to
 * the folder they were found in and the size in bytes), one combined digest over a list of them,
 * and digests of JSON values (the effective configuration). A Parquet dataset or a folder of CSV
 * parts is fingerprinted file by file; names starting with '.' or '_' (Spark's {@code _SUCCESS},
 * Hadoop's {@code .crc} checksums, {@code _temporary}) are skipped because readers skip them too.
 *
 * <p>Files are read through Hadoop's {@link FileSystem}, so HDFS and object stores work like
 * local folders.
 */
public final class InputFingerprint {

  /** One file: path relative to its folder ('/'-separated), size, lower-case hex SHA-256. */
  public record FileDigest(String path, long bytes, String sha256) {}

  private static final ObjectMapper CANONICAL =
      new ObjectMapper().enable(SerializationFeature.ORDER_MAP_ENTRIES_BY_KEYS);

  private InputFingerprint() {}

  /**
   * The files of every input table a job with {@code config} may read from {@code input} (the
   * entries InputTables looks up: required and optional tables).
   */
  public static List<FileDigest> ofInput(SparkSession spark, RunConfig config, String input) {
    InputConfig in = config.input();
    Path dir = new Path(input);
    try {
      FileSystem fs = dir.getFileSystem(spark.sparkContext().hadoopConfiguration());
      return ofTables(fs, dir, List.of(in.sales().name(), in.products().name(),
          in.stores().name(), in.traffic().name(), in.shopperDraws().name()));
    } catch (IOException e) {
      throw new InputException("cannot open input " + input + ": " + e.getMessage(), e);
    }
  }

  /**
   * The files of the table entries {@code names} found in {@code inputDir}: for each name its
   * {@code <name>.csv}, {@code <name>.parquet} and {@code <name>/} (whichever exist; a file or a
   * folder). Entries that do not exist are left out (the validator reports missing tables).
   *
   * @throws InputException exit 2 when the input folder does not exist or cannot be read
   */
  public static List<FileDigest> ofTables(FileSystem fs, Path inputDir, List<String> names) {
    List<FileDigest> out = new ArrayList<>();
    try {
      if (!fs.exists(inputDir) || !fs.getFileStatus(inputDir).isDirectory()) {
        throw new InputException("input folder " + inputDir + " does not exist");
      }
      for (String name : names) {
        for (String entry : new String[] {name + ".csv", name + ".parquet", name}) {
          Path p = new Path(inputDir, entry);
          if (fs.exists(p)) {
            collect(fs, fs.getFileStatus(p), entry, out);
          }
        }
      }
    } catch (IOException e) {
      throw new InputException("cannot read input folder " + inputDir + ": " + e.getMessage(), e);
    }
    out.sort(Comparator.comparing(FileDigest::path));
    return out;
  }

  /** Digest of one file, named {@code relativePath} in the list. */
  public static FileDigest ofFile(FileSystem fs, Path file, String relativePath)
      throws IOException {
    FileStatus st = fs.getFileStatus(file);
    try (InputStream in = fs.open(file)) {
      return new FileDigest(relativePath, st.getLen(), sha256(in));
    }
  }

  /**
   * Digests of files on the driver's local disk (e.g. scenario files), each named by its file
   * name, or by the path as given when two share a name.
   */
  public static List<FileDigest> ofLocalFiles(List<String> paths) {
    List<FileDigest> out = new ArrayList<>();
    java.util.Set<String> seen = new java.util.HashSet<>();
    java.util.Set<String> repeated = new java.util.HashSet<>();
    for (String p : paths) {
      if (!seen.add(java.nio.file.Path.of(p).getFileName().toString())) {
        repeated.add(java.nio.file.Path.of(p).getFileName().toString());
      }
    }
    for (String p : paths) {
      java.nio.file.Path f = java.nio.file.Path.of(p);
      String name = f.getFileName().toString();
      try {
        byte[] bytes = java.nio.file.Files.readAllBytes(f);
        out.add(new FileDigest(repeated.contains(name) ? p : name, bytes.length, sha256(bytes)));
      } catch (IOException e) {
        throw new InputException("cannot read " + p + ": " + e.getMessage(), e);
      }
    }
    out.sort(Comparator.comparing(FileDigest::path));
    return out;
  }

  private static void collect(FileSystem fs, FileStatus st, String rel, List<FileDigest> out)
      throws IOException {
    if (st.isDirectory()) {
      for (FileStatus child : fs.listStatus(st.getPath())) {
        String name = child.getPath().getName();
        if (!name.startsWith(".") && !name.startsWith("_")) {
          collect(fs, child, rel + "/" + name, out);
        }
      }
    } else {
      out.add(ofFile(fs, st.getPath(), rel));
    }
  }

  /**
   * One digest over a list of file digests: SHA-256 of the UTF-8 lines {@code
   * path<TAB>bytes<TAB>sha256<LF>} in path order, so it changes when any file is added, removed,
   * renamed or changed, and not when the list is given in another order.
   */
  public static String combined(List<FileDigest> files) {
    List<FileDigest> sorted = new ArrayList<>(files);
    sorted.sort(Comparator.comparing(FileDigest::path));
    StringBuilder b = new StringBuilder();
    for (FileDigest f : sorted) {
      b.append(f.path()).append('\t').append(f.bytes()).append('\t').append(f.sha256())
          .append('\n');
    }
    return sha256(b.toString().getBytes(StandardCharsets.UTF_8));
  }

  /**
   * Digest of a JSON value in canonical form (object keys sorted at every level, no spaces), so
   * key order and formatting do not matter, values do.
   */
  public static String ofJson(JsonNode value) {
    try {
      Object plain = CANONICAL.treeToValue(value, Object.class);
      return sha256(CANONICAL.writeValueAsBytes(plain));
    } catch (IOException e) {
      throw new IllegalStateException("JSON value does not serialise", e);
    }
  }

  /** Lower-case hex SHA-256 of {@code bytes}. */
  public static String sha256(byte[] bytes) {
    return HexFormat.of().formatHex(digest().digest(bytes));
  }

  /** Lower-case hex SHA-256 of everything {@code in} yields (not closed). */
  public static String sha256(InputStream in) throws IOException {
    MessageDigest md = digest();
    byte[] buf = new byte[1 << 16];
    int n;
    while ((n = in.read(buf)) > 0) {
      md.update(buf, 0, n);
    }
    return HexFormat.of().formatHex(md.digest());
  }

  private static MessageDigest digest() {
    try {
      return MessageDigest.getInstance("SHA-256");
    } catch (NoSuchAlgorithmException e) {
      throw new IllegalStateException("every Java platform has SHA-256", e);
    }
  }
}
