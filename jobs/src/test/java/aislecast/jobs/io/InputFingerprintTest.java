package aislecast.jobs.io;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import aislecast.jobs.io.InputFingerprint.FileDigest;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import org.apache.hadoop.conf.Configuration;
import org.apache.hadoop.fs.FileSystem;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** Fingerprints of input folders, without Spark (Hadoop's local file system). */
class InputFingerprintTest {

  @TempDir Path dir;

  private static org.apache.hadoop.fs.Path hadoop(Path p) {
    return new org.apache.hadoop.fs.Path(p.toUri());
  }

  /** Known answer: SHA-256("abc"), FIPS 180-2 Appendix B.1. */
  @Test
  void sha256OfAbcIsTheFipsExample() {
    assertEquals("ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad",
        InputFingerprint.sha256("abc".getBytes(StandardCharsets.US_ASCII)));
  }

  @Test
  void tablesAreFingerprintedFileByFileAndEqualSha256sum() throws Exception {
    Path in = dir.resolve("in");
    Files.createDirectories(in.resolve("stores/region=north"));
    Files.writeString(in.resolve("sales.csv"), "store_id,week,product_id,units,price\n"
        + "S1,2026-01-05,P1,3,1.99\n");
    Files.writeString(in.resolve("products.parquet"), "not really parquet, only bytes");
    Files.write(in.resolve("stores/region=north/part-0.parquet"), new byte[] {1, 2, 3, 4});
    Files.write(in.resolve("stores/part-1.parquet"), new byte[] {5, 6});
    // what readers skip is skipped: Spark's marker, Hadoop's checksums, temporary folders
    Files.writeString(in.resolve("stores/_SUCCESS"), "");
    Files.writeString(in.resolve("stores/.part-9.parquet.crc"), "crc");
    Files.createDirectories(in.resolve("stores/_temporary"));
    Files.writeString(in.resolve("stores/_temporary/x"), "half-written");
    // not a table entry the jobs read
    Files.writeString(in.resolve("truth.json"), "{}");

    FileSystem fs = FileSystem.getLocal(new Configuration());
    List<FileDigest> files = InputFingerprint.ofTables(fs, hadoop(in),
        List.of("sales", "products", "stores", "traffic"));
    List<String> paths = files.stream().map(FileDigest::path).toList();
    assertEquals(List.of("products.parquet", "sales.csv", "stores/part-1.parquet",
        "stores/region=north/part-0.parquet"), paths);
    for (FileDigest f : files) {
      Path p = in.resolve(f.path());
      assertEquals(Sha256Sum.of(p), f.sha256(), f.path());
      assertEquals(Files.size(p), f.bytes(), f.path());
    }

    // one byte changed: that file's digest and the combined one change, the others do not
    String before = InputFingerprint.combined(files);
    Files.write(in.resolve("stores/part-1.parquet"), new byte[] {5, 7});
    List<FileDigest> after = InputFingerprint.ofTables(fs, hadoop(in),
        List.of("sales", "products", "stores", "traffic"));
    assertNotEquals(before, InputFingerprint.combined(after));
    assertEquals(files.get(1), after.get(1));
    assertNotEquals(files.get(2).sha256(), after.get(2).sha256());
  }

  @Test
  void combinedDigestIsTheDocumentedLinesAndIgnoresListOrder() throws Exception {
    FileDigest a = new FileDigest("a.csv", 3, "00aa");
    FileDigest b = new FileDigest("b/part-0.parquet", 10, "11bb");
    // the documented form, hashed by sha256sum from a file
    Path lines = dir.resolve("lines.txt");
    Files.writeString(lines, "a.csv\t3\t00aa\nb/part-0.parquet\t10\t11bb\n",
        StandardCharsets.UTF_8);
    assertEquals(Sha256Sum.of(lines), InputFingerprint.combined(List.of(a, b)));
    assertEquals(InputFingerprint.combined(List.of(a, b)),
        InputFingerprint.combined(new ArrayList<>(List.of(b, a))));
  }

  @Test
  void jsonDigestIgnoresKeyOrderButNotValues() throws Exception {
    ObjectMapper m = new ObjectMapper();
    String x = InputFingerprint.ofJson(m.readTree("{\"b\": {\"y\": 1, \"x\": [1, 2]}, \"a\": 0.1}"));
    String y = InputFingerprint.ofJson(m.readTree("{\"a\": 0.1, \"b\": {\"x\": [1, 2], \"y\": 1}}"));
    String z = InputFingerprint.ofJson(m.readTree("{\"a\": 0.1, \"b\": {\"x\": [2, 1], \"y\": 1}}"));
    assertEquals(x, y);
    assertNotEquals(x, z);
  }

  @Test
  void aMissingInputFolderIsBadInput() throws Exception {
    FileSystem fs = FileSystem.getLocal(new Configuration());
    InputException e = assertThrows(InputException.class, () -> InputFingerprint.ofTables(fs,
        hadoop(dir.resolve("nowhere")), List.of("sales")));
    assertEquals(2, e.exitCode());
  }
}
