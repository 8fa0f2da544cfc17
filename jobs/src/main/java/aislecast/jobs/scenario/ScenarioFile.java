package aislecast.jobs.scenario;

import aislecast.jobs.config.ConfigException;
import com.fasterxml.jackson.annotation.JsonProperty;
import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.core.StreamReadFeature;
import com.fasterxml.jackson.databind.DeserializationFeature;
import com.fasterxml.jackson.databind.JsonMappingException;
import com.fasterxml.jackson.databind.ObjectMapper;
import com.fasterxml.jackson.databind.exc.UnrecognizedPropertyException;
import com.fasterxml.jackson.dataformat.yaml.YAMLFactory;
import com.fasterxml.jackson.dataformat.yaml.YAMLMapper;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.List;
import java.util.Map;
import java.util.Objects;
import java.util.Set;
import java.util.stream.Collectors;
import java.util.stream.Stream;

/**
 * A scenario file (YAML, format documented in the header of {@code conf/scenarios/*.yaml}):
 * run settings plus a list of what-ifs. Parsed with Jackson YAML; unknown keys, duplicate keys and
 * contradictory entries are configuration errors (exit 2) naming the file and scenario.
 *
 * @param settings base period, draws and the user's portfolio
 * @param scenarios the what-ifs
 */
public record ScenarioFile(
    @JsonProperty("settings") Settings settings,
    @JsonProperty("scenarios") List<Spec> scenarios) {

  /** Keyword in {@code owners:} lists that stands for the portfolio owners. */
  public static final String PORTFOLIO = "portfolio";

  /** Responses a scenario may list. */
  public static final List<String> RESPONSES = List.of("hold", "nash");

  /**
   * @param baseWeeks base period: 1 = the latest week, n = the mean of the last n weeks
   * @param draws posterior draws to use, evenly spaced over all kept draws; 0 = all
   * @param portfolio owners whose products form the user's portfolio
   */
  public record Settings(
      @JsonProperty("base_weeks") Integer baseWeeks,
      @JsonProperty("draws") Integer draws,
      @JsonProperty("portfolio") List<String> portfolio) {}

  /**
   * Which products (and in which stores) an entry applies to. Every given field narrows the
   * selection; absent fields do not restrict.
   *
   * @param products product ids
   * @param owners owners ({@value #PORTFOLIO} = the portfolio owners)
   * @param where raw attribute values the product must have, e.g. {@code {sugar_free: 1}}
   * @param regions stores of these regions only
   * @param stores these stores only
   * @param topSeller keep only the best seller of the selected products: the most base-period
   *     units summed over the stores in scope (ties: smallest id)
   */
  public record Select(
      @JsonProperty("products") List<String> products,
      @JsonProperty("owners") List<String> owners,
      @JsonProperty("where") Map<String, Double> where,
      @JsonProperty("regions") List<String> regions,
      @JsonProperty("stores") List<String> stores,
      @JsonProperty("top_seller") Boolean topSeller) {}

  /**
   * A price change on the selected products: exactly one of {@code percent} (new = base x (1 +
   * percent/100)), {@code add} (new = base + add, currency) or {@code set_to} (new = set_to).
   */
  public record Change(
      @JsonProperty("products") List<String> products,
      @JsonProperty("owners") List<String> owners,
      @JsonProperty("where") Map<String, Double> where,
      @JsonProperty("regions") List<String> regions,
      @JsonProperty("stores") List<String> stores,
      @JsonProperty("top_seller") Boolean topSeller,
      @JsonProperty("percent") Double percent,
      @JsonProperty("add") Double add,
      @JsonProperty("set_to") Double setTo) {

    Select select() {
      return new Select(products, owners, where, regions, stores, topSeller);
    }
  }

  /**
   * A new product like an existing one: the like product's mean utility (plus {@code
   * utility_shift}) and marginal cost (unless {@code cost} is given) in each store and draw, its
   * own attributes (raw values; absent ones copied from the like product) and price. Launched in
   * the stores in scope that stock the like product in the base period.
   */
  public record Launch(
      @JsonProperty("product_id") String productId,
      @JsonProperty("owner") String owner,
      @JsonProperty("like") String like,
      @JsonProperty("attributes") Map<String, Double> attributes,
      @JsonProperty("price") Double price,
      @JsonProperty("utility_shift") Double utilityShift,
      @JsonProperty("cost") Double cost,
      @JsonProperty("regions") List<String> regions,
      @JsonProperty("stores") List<String> stores) {}

  /**
   * One what-if, evaluated once per listed response; its output name is {@code
   * <name>-<response>}.
   */
  public record Spec(
      @JsonProperty("name") String name,
      @JsonProperty("responses") List<String> responses,
      @JsonProperty("price_changes") List<Change> priceChanges,
      @JsonProperty("delist") List<Select> delist,
      @JsonProperty("launches") List<Launch> launches) {

    /** Responses in the file's order; [hold] when absent. */
    public List<String> responseList() {
      return responses == null || responses.isEmpty() ? List.of("hold") : responses;
    }

    public List<Change> changes() {
      return priceChanges == null ? List.of() : priceChanges;
    }

    public List<Select> delistings() {
      return delist == null ? List.of() : delist;
    }

    public List<Launch> launchList() {
      return launches == null ? List.of() : launches;
    }
  }

  /** Settings of several files merged, with defaults; see {@link #merge}. */
  public record Resolved(int baseWeeks, int draws, List<String> portfolio, List<Spec> scenarios,
      List<String> sources) {}

  private static final ObjectMapper YAML =
      YAMLMapper.builder(YAMLFactory.builder().build())
          .enable(StreamReadFeature.STRICT_DUPLICATE_DETECTION)
          .enable(DeserializationFeature.FAIL_ON_UNKNOWN_PROPERTIES)
          .enable(DeserializationFeature.FAIL_ON_TRAILING_TOKENS)
          .build();

  /** Parses one file's text; {@code source} names it in messages. */
  public static ScenarioFile parse(String yaml, String source) {
    ScenarioFile f;
    try {
      f = YAML.readValue(yaml, ScenarioFile.class);
    } catch (UnrecognizedPropertyException e) {
      throw new ConfigException(source + ": unknown key '" + e.getPropertyName() + "' at "
          + path(e) + " (known keys here: " + e.getKnownPropertyIds().stream()
              .map(String::valueOf).sorted().collect(Collectors.joining(", ")) + ")");
    } catch (JsonMappingException e) {
      throw new ConfigException(source + ": invalid value at '" + path(e) + "': "
          + e.getOriginalMessage());
    } catch (JsonProcessingException e) {
      throw new ConfigException(source + ": not valid YAML: " + e.getOriginalMessage());
    }
    if (f == null || f.scenarios() == null || f.scenarios().isEmpty()) {
      throw new ConfigException(source + ": no scenarios (a 'scenarios:' list is required)");
    }
    f.check(source);
    return f;
  }

  /**
   * Reads the given files and folders (every {@code *.yaml} / {@code *.yml} in a folder, sorted
   * by name) and merges them: scenario names must be unique over all files, and a setting given
   * in two files must have the same value.
   */
  public static Resolved load(List<Path> paths) {
    List<Path> files = new ArrayList<>();
    for (Path p : paths) {
      if (Files.isDirectory(p)) {
        try (Stream<Path> s = Files.list(p)) {
          List<Path> found = s.filter(q -> q.toString().endsWith(".yaml")
              || q.toString().endsWith(".yml")).sorted().toList();
          if (found.isEmpty()) {
            throw new ConfigException("scenario folder " + p + " holds no .yaml file");
          }
          files.addAll(found);
        } catch (IOException e) {
          throw new ConfigException("cannot list scenario folder " + p + ": " + e.getMessage());
        }
      } else if (Files.isRegularFile(p)) {
        files.add(p);
      } else {
        throw new ConfigException("scenario file " + p + " does not exist");
      }
    }
    List<ScenarioFile> parsed = new ArrayList<>();
    List<String> sources = new ArrayList<>();
    for (Path f : files) {
      try {
        parsed.add(parse(Files.readString(f, StandardCharsets.UTF_8), f.toString()));
        sources.add(f.toString());
      } catch (IOException e) {
        throw new ConfigException("cannot read scenario file " + f + ": " + e.getMessage());
      }
    }
    return merge(parsed, sources);
  }

  /** Merges parsed files (see {@link #load}); {@code sources} name them in messages. */
  public static Resolved merge(List<ScenarioFile> parsed, List<String> sources) {
    Integer baseWeeks = null;
    Integer draws = null;
    List<String> portfolio = null;
    List<Spec> all = new ArrayList<>();
    Set<String> names = new HashSet<>();
    for (int i = 0; i < parsed.size(); i++) {
      ScenarioFile f = parsed.get(i);
      String src = sources.get(i);
      Settings s = f.settings();
      if (s != null) {
        baseWeeks = agree(baseWeeks, s.baseWeeks(), "base_weeks", src);
        draws = agree(draws, s.draws(), "draws", src);
        portfolio = agree(portfolio, s.portfolio(), "portfolio", src);
      }
      for (Spec spec : f.scenarios()) {
        for (String r : spec.responseList()) {
          if (!names.add(spec.name() + "-" + r)) {
            throw new ConfigException(src + ": scenario " + spec.name() + "-" + r
                + " appears twice over the scenario files");
          }
        }
        all.add(spec);
      }
    }
    if (portfolio == null || portfolio.isEmpty()) {
      throw new ConfigException(String.join(", ", sources)
          + ": settings.portfolio is required (the owner or owners of the user's products)");
    }
    return new Resolved(baseWeeks == null ? 1 : baseWeeks, draws == null ? 0 : draws,
        List.copyOf(portfolio), List.copyOf(all), List.copyOf(sources));
  }

  private static <T> T agree(T current, T next, String key, String src) {
    if (next == null) {
      return current;
    }
    if (current != null && !Objects.equals(current, next)) {
      throw new ConfigException(src + ": settings." + key + " = " + next
          + " disagrees with another scenario file's " + current);
    }
    return next;
  }

  private void check(String src) {
    if (settings != null) {
      if (settings.baseWeeks() != null && settings.baseWeeks() < 1) {
        throw new ConfigException(src + ": settings.base_weeks must be >= 1, got "
            + settings.baseWeeks());
      }
      if (settings.draws() != null && settings.draws() < 0) {
        throw new ConfigException(src + ": settings.draws must be >= 0 (0 = all), got "
            + settings.draws());
      }
    }
    Set<String> names = new HashSet<>();
    for (Spec s : scenarios) {
      String where = src + ": scenario " + (s.name() == null ? "(unnamed)" : s.name()) + ": ";
      if (s.name() == null || !s.name().matches("[A-Za-z0-9][A-Za-z0-9_.-]*")) {
        throw new ConfigException(where + "name must be letters, digits, '.', '_' or '-'");
      }
      if (!names.add(s.name())) {
        throw new ConfigException(where + "name used twice");
      }
      for (String r : s.responseList()) {
        if (!RESPONSES.contains(r)) {
          throw new ConfigException(where + "response '" + r + "' is not one of " + RESPONSES);
        }
      }
      if (new HashSet<>(s.responseList()).size() != s.responseList().size()) {
        throw new ConfigException(where + "a response is listed twice");
      }
      for (Change c : s.changes()) {
        int given = (c.percent() != null ? 1 : 0) + (c.add() != null ? 1 : 0)
            + (c.setTo() != null ? 1 : 0);
        if (given != 1) {
          throw new ConfigException(where + "each price change needs exactly one of percent,"
              + " add, set_to");
        }
        if (c.setTo() != null && !(c.setTo() > 0)) {
          throw new ConfigException(where + "set_to must be > 0, got " + c.setTo());
        }
        if (c.percent() != null && !(c.percent() > -100)) {
          throw new ConfigException(where + "percent must be > -100, got " + c.percent());
        }
        checkSelect(c.select(), where + "price change: ");
      }
      for (Select d : s.delistings()) {
        checkSelect(d, where + "delist: ");
      }
      for (Launch l : s.launchList()) {
        if (l.productId() == null || l.owner() == null || l.like() == null || l.price() == null) {
          throw new ConfigException(where + "a launch needs product_id, owner, like and price");
        }
        if (!(l.price() > 0)) {
          throw new ConfigException(where + "launch " + l.productId() + ": price must be > 0");
        }
        if (l.cost() != null && !(l.cost() >= 0)) {
          throw new ConfigException(where + "launch " + l.productId() + ": cost must be >= 0");
        }
      }
      if (s.changes().isEmpty() && s.delistings().isEmpty() && s.launchList().isEmpty()) {
        // allowed: the base itself (useful as a check that hold reproduces the base)
        continue;
      }
    }
  }

  private static void checkSelect(Select s, String where) {
    if (s.products() == null && s.owners() == null && s.where() == null) {
      throw new ConfigException(where + "select products with products, owners or where");
    }
  }

  private static String path(JsonMappingException e) {
    return e.getPath().stream()
        .map(r -> r.getFieldName() != null ? r.getFieldName() : "[" + r.getIndex() + "]")
        .collect(Collectors.joining("."))
        .replace(".[", "[");
  }
}
