package aislecast.jobs.io;

import aislecast.jobs.config.RunConfig;
import aislecast.jobs.config.RunConfigLoader;
import aislecast.jobs.io.InputFingerprint.FileDigest;
import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.node.ObjectNode;
import java.io.IOException;
import java.util.ArrayList;
import java.util.Iterator;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Objects;
import java.util.TreeSet;

/**
 * What makes two runs of one run id the same run: the command, the fingerprints of every file it
 * reads (grouped in parts: the input tables, scenario files, an earlier run's {@code run.json}),
 * the effective configuration with the options that change outputs, and the seed. Written to
 * {@code run.json} under {@code fingerprints} (with {@code configuration}, {@code options} and
 * {@code seed} beside it), and compared with an existing run's {@code run.json} to decide
 * whether a rerun has nothing to do.
 */
public final class RunIdentity {
  private static final ObjectMapper JSON = new ObjectMapper();

  /** A group of fingerprinted files, e.g. {@code inputs}; {@code label} names it in messages. */
  public record Part(String key, String label, List<FileDigest> files) {
    public Part {
      files = List.copyOf(files);
    }

    public String sha256() {
      return InputFingerprint.combined(files);
    }
  }

  private final String command;
  private final List<Part> parts = new ArrayList<>();
  private final ObjectNode configuration;
  private final Map<String, Object> options = new LinkedHashMap<>();
  private Long seed;

  private RunIdentity(String command, JsonNode configuration) {
    this.command = Objects.requireNonNull(command);
    this.configuration = configuration == null ? JSON.createObjectNode()
        : (ObjectNode) configuration.deepCopy();
  }

  /** A run of {@code command} with the effective run configuration {@code config}. */
  public static RunIdentity of(String command, RunConfig config) {
    try {
      return new RunIdentity(command, JSON.readTree(RunConfigLoader.toJson(config)));
    } catch (IOException e) {
      throw new IllegalStateException("configuration JSON does not parse back", e);
    }
  }

  /** Adds a group of fingerprinted files. */
  public RunIdentity part(String key, String label, List<FileDigest> files) {
    parts.add(new Part(key, label, files));
    return this;
  }

  /** Adds a command-line option that changes the outputs (part of the configuration digest). */
  public RunIdentity option(String name, Object value) {
    options.put(name, value);
    return this;
  }

  /** Sets the run seed (compared on reruns); leave unset for jobs that draw no random numbers. */
  public RunIdentity seed(long s) {
    this.seed = s;
    return this;
  }

  public String command() {
    return command;
  }

  public Long seed() {
    return seed;
  }

  public JsonNode configuration() {
    return configuration;
  }

  public Map<String, Object> options() {
    return options;
  }

  public List<Part> parts() {
    return parts;
  }

  /** SHA-256 of the canonical JSON {@code {"configuration": ..., "options": ...}}. */
  public String configurationSha256() {
    ObjectNode n = JSON.createObjectNode();
    n.set("configuration", configuration);
    n.set("options", JSON.valueToTree(options));
    return InputFingerprint.ofJson(n);
  }

  /** The {@code fingerprints} object of run.json. */
  public Map<String, Object> fingerprints() {
    Map<String, Object> m = new LinkedHashMap<>();
    m.put("algorithm", "SHA-256");
    m.put("configuration_sha256", configurationSha256());
    for (Part p : parts) {
      Map<String, Object> q = new LinkedHashMap<>();
      q.put("sha256", p.sha256());
      q.put("files", p.files());
      m.put(p.key(), q);
    }
    return m;
  }

  /**
   * How an existing run's {@code run.json} differs from this run, one phrase per difference
   * (command, each part, configuration, seed); empty when it is the same run.
   */
  public List<String> differences(JsonNode stored) {
    List<String> d = new ArrayList<>();
    String cmd = stored.path("command").asText("");
    if (!command.equals(cmd)) {
      d.add("command: that folder was written by '" + cmd + "', this is '" + command + "'");
      return d;
    }
    JsonNode fp = stored.get("fingerprints");
    if (fp == null || !fp.isObject()) {
      d.add("inputs: its run.json records no fingerprints (written by an older aislecast)");
      return d;
    }
    for (Part p : parts) {
      JsonNode sp = fp.get(p.key());
      if (sp == null) {
        d.add(p.label() + ": not used by the existing run");
      } else if (!p.sha256().equals(sp.path("sha256").asText())) {
        d.add(p.label() + " differ (" + fileChanges(sp.path("files"), p.files()) + ")");
      }
    }
    for (Iterator<String> it = fp.fieldNames(); it.hasNext(); ) {
      String key = it.next();
      if (fp.get(key).has("files") && parts.stream().noneMatch(p -> p.key().equals(key))) {
        d.add(key + ": used by the existing run, not by this one");
      }
    }
    if (!configurationSha256().equals(fp.path("configuration_sha256").asText())) {
      List<String> paths = new ArrayList<>();
      diffPaths(stored.path("configuration"), configuration, "", paths);
      diffPaths(stored.path("options"), JSON.valueToTree(options), "options", paths);
      d.add("configuration differs" + (paths.isEmpty() ? ""
          : " (" + String.join(", ", paths.subList(0, Math.min(5, paths.size())))
              + (paths.size() > 5 ? ", ..." : "") + ")"));
    }
    if (seed != null) {
      JsonNode s = stored.get("seed");
      if (s == null || !s.canConvertToLong() || s.asLong() != seed) {
        d.add("seed differs (existing " + (s == null ? "none" : s.asText()) + ", now " + seed
            + ")");
      }
    }
    return d;
  }

  /** "changed a.csv; added b.csv; removed c.csv" between a stored file list and the current one. */
  private static String fileChanges(JsonNode stored, List<FileDigest> now) {
    Map<String, String> before = new LinkedHashMap<>();
    for (JsonNode f : stored) {
      before.put(f.path("path").asText(), f.path("sha256").asText());
    }
    List<String> changed = new ArrayList<>();
    List<String> added = new ArrayList<>();
    for (FileDigest f : now) {
      String old = before.remove(f.path());
      if (old == null) {
        added.add(f.path());
      } else if (!old.equals(f.sha256())) {
        changed.add(f.path());
      }
    }
    List<String> out = new ArrayList<>();
    if (!changed.isEmpty()) {
      out.add("changed " + String.join(", ", changed));
    }
    if (!added.isEmpty()) {
      out.add("added " + String.join(", ", added));
    }
    if (!before.isEmpty()) {
      out.add("removed " + String.join(", ", before.keySet()));
    }
    return out.isEmpty() ? "same files, different digest" : String.join("; ", out);
  }

  /** Dotted paths of the leaves where two JSON trees differ. */
  private static void diffPaths(JsonNode a, JsonNode b, String prefix, List<String> out) {
    // an absent object (e.g. no options recorded) compares as an empty one
    if (a.isMissingNode() && b.isObject()) {
      a = JSON.createObjectNode();
    } else if (b.isMissingNode() && a.isObject()) {
      b = JSON.createObjectNode();
    }
    if (a.isObject() && b.isObject()) {
      TreeSet<String> keys = new TreeSet<>();
      a.fieldNames().forEachRemaining(keys::add);
      b.fieldNames().forEachRemaining(keys::add);
      for (String k : keys) {
        diffPaths(a.path(k), b.path(k), prefix.isEmpty() ? k : prefix + "." + k, out);
      }
    } else if (!a.equals(b)) {
      out.add(prefix.isEmpty() ? "(all)" : prefix);
    }
  }
}
