package aislecast.jobs.io;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import aislecast.jobs.config.RunConfig;
import aislecast.jobs.config.RunFailure;
import aislecast.jobs.io.InputFingerprint.FileDigest;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.apache.hadoop.conf.Configuration;
import org.apache.hadoop.fs.FileSystem;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * Reruns of one run id without Spark (Hadoop's local file system): identical runs are found,
 * different ones refused with the difference named, replacements swap the folder whole, and a
 * failure or a dead process between the two renames leaves the old folder in place.
 */
class RunDirectoryTest {
  private static final String SALES = "0".repeat(63) + "1";

  @TempDir Path root;
  private FileSystem fs;

  @BeforeEach
  void localFs() throws Exception {
    fs = FileSystem.getLocal(new Configuration());
  }

  private static RunIdentity identity(String salesSha, long seed) {
    return RunIdentity.of("estimate", RunConfig.defaults())
        .part("inputs", "input files", List.of(new FileDigest("products.csv", 10, "ab"),
            new FileDigest("sales.csv", 20, salesSha)))
        .seed(seed);
  }

  /** A published run as a job leaves it: a data file and run.json with the identity. */
  private Path publish(String runId, RunIdentity id, String data) throws Exception {
    Path run = root.resolve(runId);
    Files.createDirectories(run.resolve("posterior/summary"));
    Files.writeString(run.resolve("posterior/summary/part-0.parquet"), data);
    Map<String, Object> m = new LinkedHashMap<>();
    m.put("command", id.command());
    m.put("run_id", runId);
    m.put("status", "converged");
    m.put("seed", id.seed());
    m.put("configuration", id.configuration());
    m.put("fingerprints", id.fingerprints());
    new ObjectMapper().writeValue(run.resolve(RunJson.FILE).toFile(), m);
    return run;
  }

  private RunDirectory open(String runId, RunIdentity id, boolean replace) throws Exception {
    return RunDirectory.create(fs, new org.apache.hadoop.fs.Path(root.toUri()), runId, id,
        replace);
  }

  @Test
  void theSameRunIsFoundAndNothingIsStaged() throws Exception {
    Path run = publish("r", identity(SALES, 7), "old");
    Map<String, String> before = FolderSnapshot.of(run);
    RunDirectory d = open("r", identity(SALES, 7), false);
    assertTrue(d.identicalExists());
    assertEquals("converged", d.existing().path("status").asText());
    assertEquals(List.of("r"), FolderSnapshot.names(root), "no staging folder");
    assertEquals(before, FolderSnapshot.of(run));
    assertThrows(IllegalStateException.class, d::staging);
  }

  @Test
  void anotherRunIsRefusedNamingWhatDiffers() throws Exception {
    Path run = publish("r", identity(SALES, 7), "old");
    Map<String, String> before = FolderSnapshot.of(run);
    RunFailure inputs = assertThrows(RunFailure.class,
        () -> open("r", identity("f".repeat(64), 7), false));
    assertEquals(2, inputs.exitCode());
    assertTrue(inputs.getMessage().contains("input files differ (changed sales.csv)"),
        inputs.getMessage());
    assertTrue(inputs.getMessage().contains("--replace"), inputs.getMessage());

    RunFailure seed = assertThrows(RunFailure.class, () -> open("r", identity(SALES, 8), false));
    assertTrue(seed.getMessage().contains("seed differs (existing 7, now 8)"), seed.getMessage());

    RunFailure conf = assertThrows(RunFailure.class,
        () -> open("r", identity(SALES, 7).option("draws", 5), false));
    assertTrue(conf.getMessage().contains("configuration differs (options.draws)"),
        conf.getMessage());
    assertFalse(conf.getMessage().contains("input files"), conf.getMessage());

    Files.delete(run.resolve(RunJson.FILE));
    RunFailure none = assertThrows(RunFailure.class, () -> open("r", identity(SALES, 7), false));
    assertTrue(none.getMessage().contains("no readable run.json"), none.getMessage());
    before.remove(RunJson.FILE);
    assertEquals(before, FolderSnapshot.of(run), "the old folder is untouched");
    assertEquals(List.of("r"), FolderSnapshot.names(root));
  }

  @Test
  void replaceSwapsTheFolderWhole() throws Exception {
    publish("r", identity(SALES, 7), "old");
    RunDirectory d = open("r", identity("f".repeat(64), 7), true);
    assertFalse(d.identicalExists());
    Path staging = Path.of(new org.apache.hadoop.fs.Path(d.staging()).toUri().getPath());
    Files.writeString(staging.resolve("new.txt"), "new");
    d.commit();
    d.abort();
    assertEquals(Map.of("new.txt", FolderSnapshot.of(root.resolve("r")).get("new.txt")),
        FolderSnapshot.of(root.resolve("r")), "only the new run's files");
    assertEquals(List.of("r"), FolderSnapshot.names(root), "no staging or old copy left");
  }

  @Test
  void aFailureBetweenTheMovesLeavesTheOldFolderIntact() throws Exception {
    Path run = publish("r", identity(SALES, 7), "old");
    Map<String, String> before = FolderSnapshot.of(run);
    RunDirectory d = open("r", identity("f".repeat(64), 7), true);
    Path staging = Path.of(new org.apache.hadoop.fs.Path(d.staging()).toUri().getPath());
    Files.writeString(staging.resolve("new.txt"), "new");
    RunDirectory.betweenMoves = () -> {
      // the old folder is aside now: no run folder is visible, never a mixed one
      assertFalse(Files.exists(run));
      throw new IllegalStateException("injected failure between the moves");
    };
    try {
      IllegalStateException e = assertThrows(IllegalStateException.class, d::commit);
      assertEquals("injected failure between the moves", e.getMessage());
    } finally {
      RunDirectory.betweenMoves = () -> { };
      d.abort();
    }
    assertEquals(before, FolderSnapshot.of(run), "old folder back, unchanged");
    assertEquals(List.of("r"), FolderSnapshot.names(root), "staging removed, nothing aside");
  }

  @Test
  void aReplaceInterruptedByADeadProcessIsUndoneByTheNextRun() throws Exception {
    Path run = publish("r", identity(SALES, 7), "old");
    Map<String, String> before = FolderSnapshot.of(run);
    // the process died after moving the old folder aside, before the new one was in place
    Files.move(run, root.resolve(".replaced-r"));
    RunDirectory d = open("r", identity(SALES, 7), false);
    assertTrue(d.identicalExists(), "the restored folder is the same run");
    assertTrue(d.notes().get(0).contains("restored"), d.notes().toString());
    assertEquals(before, FolderSnapshot.of(run));
    assertEquals(List.of("r"), FolderSnapshot.names(root));

    // died after the new folder was in place: the old copy is stale and removed
    Files.createDirectories(root.resolve(".replaced-r"));
    RunDirectory again = open("r", identity(SALES, 7), false);
    assertTrue(again.identicalExists());
    assertEquals(List.of("r"), FolderSnapshot.names(root));
  }

  @Test
  void aRunIdMustBeAPlainFolderName() {
    RunFailure e = assertThrows(RunFailure.class, () -> open("../x", identity(SALES, 7), false));
    assertEquals(2, e.exitCode());
  }
}
