package aislecast.jobs.config;

import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.core.StreamReadFeature;
import com.fasterxml.jackson.databind.DeserializationFeature;
import com.fasterxml.jackson.databind.JsonMappingException;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.SerializationFeature;
import com.fasterxml.jackson.databind.exc.UnrecognizedPropertyException;
import com.fasterxml.jackson.databind.json.JsonMapper;
import com.fasterxml.jackson.dataformat.yaml.YAMLFactory;
import com.fasterxml.jackson.dataformat.yaml.YAMLMapper;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Collection;
import java.util.TreeSet;
import java.util.stream.Collectors;

/** Reads {@link RunConfig} from YAML; every problem becomes a {@link ConfigException}. */
public final class RunConfigLoader {

  private static final ObjectMapper YAML =
      YAMLMapper.builder(YAMLFactory.builder().build())
          .enable(StreamReadFeature.STRICT_DUPLICATE_DETECTION)
          .enable(DeserializationFeature.FAIL_ON_UNKNOWN_PROPERTIES)
          .enable(DeserializationFeature.FAIL_ON_NULL_FOR_PRIMITIVES)
          .enable(DeserializationFeature.FAIL_ON_TRAILING_TOKENS)
          .build();

  private static final ObjectMapper JSON =
      JsonMapper.builder().enable(SerializationFeature.INDENT_OUTPUT).build();

  private RunConfigLoader() {}

  /** Loads {@code file}, or returns the defaults when {@code file} is null. */
  public static RunConfig load(Path file) {
    if (file == null) {
      return RunConfig.defaults();
    }
    if (!Files.isRegularFile(file)) {
      throw new ConfigException("configuration file " + file + " does not exist");
    }
    String text;
    try {
      text = Files.readString(file, StandardCharsets.UTF_8);
    } catch (IOException e) {
      throw new ConfigException("cannot read configuration file " + file + ": " + e.getMessage());
    }
    return parse(text, file.toString());
  }

  /** Parses YAML text; {@code source} names it in error messages. Empty text gives defaults. */
  public static RunConfig parse(String yaml, String source) {
    if (yaml.isBlank()) {
      return RunConfig.defaults();
    }
    try {
      RunConfig config = YAML.readValue(yaml, RunConfig.class);
      return config == null ? RunConfig.defaults() : config;
    } catch (UnrecognizedPropertyException e) {
      String key = path(e);
      throw new ConfigException(
          source + ": unknown configuration key '" + key + "'" + known(e.getKnownPropertyIds()));
    } catch (JsonMappingException e) {
      ConfigException inner = findConfigException(e);
      if (inner != null) {
        throw new ConfigException(source + ": " + inner.getMessage());
      }
      throw new ConfigException(
          source + ": invalid value at '" + path(e) + "': " + e.getOriginalMessage());
    } catch (JsonProcessingException e) {
      throw new ConfigException(source + ": not valid YAML: " + e.getOriginalMessage());
    }
  }

  /** The configuration as JSON, e.g. for a run manifest. Absent column lists show as null. */
  public static String toJson(RunConfig config) {
    try {
      return JSON.writeValueAsString(config);
    } catch (JsonProcessingException e) {
      throw new IllegalStateException("cannot serialise the run configuration", e);
    }
  }

  private static String path(JsonMappingException e) {
    return e.getPath().stream()
        .map(r -> r.getFieldName() != null ? r.getFieldName() : "[" + r.getIndex() + "]")
        .collect(Collectors.joining("."))
        .replace(".[", "[");
  }

  private static String known(Collection<Object> ids) {
    if (ids == null || ids.isEmpty()) {
      return "";
    }
    TreeSet<String> names = new TreeSet<>();
    ids.forEach(id -> names.add(String.valueOf(id)));
    return " (known keys here: " + String.join(", ", names) + ")";
  }

  private static ConfigException findConfigException(Throwable t) {
    for (Throwable c = t; c != null; c = c.getCause()) {
      if (c instanceof ConfigException ce) {
        return ce;
      }
    }
    return null;
  }
}
