package aislecast.jobs.report;

import aislecast.jobs.config.RunFailure;
import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.io.IOException;
import java.io.InputStream;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import org.apache.hadoop.conf.Configuration;
import org.apache.hadoop.fs.FileSystem;
import org.apache.hadoop.fs.Path;

/**
 * The run folders a report draws on and where each table lives. Estimation, scenarios and
 * recommend each publish their own run folder; a scenarios or recommend run names its estimation
 * run in {@code run.json} ({@code posterior}), so the report follows that link. A table is taken
 * from the first folder that has it, in the order: the report's run, the extra runs given, then
 * the linked estimation runs.
 */
final class RunTables {
  static final String RUN_JSON = "run.json";
  static final String GLOBAL_DRAWS = "posterior/global_draws";
  static final String SUMMARY = "posterior/summary";
  static final String STORE_SUMMARY = "scenarios/store_summary";
  static final String REGION_SUMMARY = "scenarios/region_summary";
  static final String ELASTICITIES = "elasticities";
  static final String RECOMMENDATIONS = "recommendations";

  /** A run folder and its manifest (null when it has none or it does not parse). */
  record RunFolder(String dir, JsonNode manifest, String problem) {}

  private final FileSystem fs;
  private final List<RunFolder> folders;

  private RunTables(FileSystem fs, List<RunFolder> folders) {
    this.fs = fs;
    this.folders = folders;
  }

  /**
   * Opens the report's run folder and the extra ones.
   *
   * @throws RunFailure exit 2 when a given folder does not exist
   */
  static RunTables open(Configuration hadoop, String run, List<String> extra) {
    try {
      Path root = new Path(run);
      FileSystem fs = root.getFileSystem(hadoop);
      Map<String, RunFolder> seen = new LinkedHashMap<>();
      List<String> given = new ArrayList<>();
      given.add(run);
      given.addAll(extra);
      for (String dir : given) {
        if (!fs.getFileStatus(requireDir(fs, dir)).isDirectory()) {
          throw new RunFailure(RunFailure.BAD_INPUT, "run folder " + dir + " is not a folder");
        }
        add(fs, dir, seen);
      }
      // follow the posterior links once (an estimation run has none)
      for (RunFolder f : new ArrayList<>(seen.values())) {
        JsonNode link = f.manifest() == null ? null : f.manifest().get("posterior");
        if (link != null && link.isTextual() && fs.exists(new Path(link.asText()))) {
          add(fs, link.asText(), seen);
        }
      }
      return new RunTables(fs, new ArrayList<>(seen.values()));
    } catch (IOException e) {
      throw new RunFailure(RunFailure.BAD_INPUT, "cannot read run folder " + run + ": "
          + e.getMessage(), e);
    }
  }

  private static Path requireDir(FileSystem fs, String dir) throws IOException {
    Path p = new Path(dir);
    if (!fs.exists(p)) {
      throw new RunFailure(RunFailure.BAD_INPUT, "run folder " + dir + " does not exist");
    }
    return p;
  }

  private static void add(FileSystem fs, String dir, Map<String, RunFolder> seen)
      throws IOException {
    Path p = fs.makeQualified(new Path(dir));
    String key = p.toString();
    if (seen.containsKey(key)) {
      return;
    }
    Path json = new Path(p, RUN_JSON);
    JsonNode manifest = null;
    String problem = null;
    if (fs.exists(json)) {
      try (InputStream in = fs.open(json)) {
        manifest = new ObjectMapper().readTree(in);
      } catch (IOException e) {
        problem = RUN_JSON + " does not parse: " + e.getMessage();
      }
    } else {
      problem = "no " + RUN_JSON;
    }
    seen.put(key, new RunFolder(dir, manifest, problem));
  }

  List<RunFolder> folders() {
    return folders;
  }

  /** The path of {@code table} in the first folder that has it, or null. */
  String find(String table) {
    try {
      for (RunFolder f : folders) {
        Path p = new Path(f.dir(), table);
        if (fs.exists(p)) {
          return p.toString();
        }
      }
      return null;
    } catch (IOException e) {
      throw new RunFailure(RunFailure.OTHER, "cannot look for " + table + ": " + e.getMessage(), e);
    }
  }

  /** The first manifest that has a value at {@code pointer} (JSON pointer), or a missing node. */
  JsonNode manifestValue(String pointer) {
    for (RunFolder f : folders) {
      if (f.manifest() != null && !f.manifest().at(pointer).isMissingNode()) {
        return f.manifest().at(pointer);
      }
    }
    return com.fasterxml.jackson.databind.node.MissingNode.getInstance();
  }

  FileSystem fs() {
    return fs;
  }
}
