package aislecast.jobs.config;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import java.util.List;
import org.junit.jupiter.api.Test;

class RunConfigLoaderTest {

  /** Tests run from the module folder; conf/ is at the repository root. */
  private static final Path CONF = Path.of("..", "conf");

  @Test
  void documentedDefaultsFileEqualsBuiltInDefaults() {
    assertEquals(RunConfig.defaults(), RunConfigLoader.load(CONF.resolve("defaults.yaml")));
  }

  @Test
  void demoConfigurationLoads() {
    RunConfig demo = RunConfigLoader.load(CONF.resolve("demo.yaml"));
    assertEquals(0.0, demo.validation().maxRejectShare());
    assertEquals(InputConfig.defaults(), demo.input());
  }

  @Test
  void absentKeysTakeDefaults() {
    RunConfig c = RunConfigLoader.parse(
        "input:\n  sales:\n    columns:\n      units: qty\n    demand_shifters: [promo]\n", "t");
    assertEquals("qty", c.input().sales().columns().units());
    assertEquals("price", c.input().sales().columns().price());
    assertEquals("sales", c.input().sales().name());
    assertEquals(List.of("promo"), c.input().sales().demandShifters());
    assertNull(c.input().sales().costShifters(), "absent list means: resolve from the data");
    assertEquals(ValidationConfig.DEFAULT_MAX_REJECT_SHARE, c.validation().maxRejectShare());
    assertEquals(RunConfig.defaults(), RunConfigLoader.parse("", "t"));
    assertEquals(RunConfig.defaults(), RunConfigLoader.load(null));
  }

  @Test
  void unknownKeyIsAnErrorNamingTheKey() {
    ConfigException top = assertThrows(ConfigException.class,
        () -> RunConfigLoader.parse("sampler_settings: 3\n", "x.yaml"));
    assertTrue(top.getMessage().contains("unknown configuration key 'sampler_settings'"),
        top.getMessage());
    ConfigException nested = assertThrows(ConfigException.class,
        () -> RunConfigLoader.parse("input:\n  sales:\n    colums:\n      units: q\n", "x.yaml"));
    assertTrue(nested.getMessage().contains("'input.sales.colums'"), nested.getMessage());
    assertTrue(nested.getMessage().contains("columns"), "lists the known keys");
    assertEquals(2, nested.exitCode());
  }

  @Test
  void badValuesAreErrorsNamingTheKey() {
    ConfigException share = assertThrows(ConfigException.class,
        () -> RunConfigLoader.parse("validation:\n  max_reject_share: 1.5\n", "x.yaml"));
    assertTrue(share.getMessage().contains("validation.max_reject_share"), share.getMessage());
    ConfigException type = assertThrows(ConfigException.class,
        () -> RunConfigLoader.parse("validation:\n  max_reject_share: lots\n", "x.yaml"));
    assertTrue(type.getMessage().contains("validation.max_reject_share"), type.getMessage());
    ConfigException dup = assertThrows(ConfigException.class,
        () -> RunConfigLoader.parse("validation: {}\nvalidation: {}\n", "x.yaml"));
    assertTrue(dup.getMessage().contains("validation"), dup.getMessage());
    ConfigException roles = assertThrows(ConfigException.class,
        () -> RunConfigLoader.parse("input:\n  sales:\n    cost_shifters: [price]\n", "x.yaml"));
    assertTrue(roles.getMessage().contains("'price'"), roles.getMessage());
    ConfigException persistence = assertThrows(ConfigException.class,
        () -> RunConfigLoader.parse("sampler:\n  momentum_persistence: 1.0\n", "x.yaml"));
    assertTrue(persistence.getMessage().contains("sampler.momentum_persistence"),
        persistence.getMessage());
    assertEquals(0.0, RunConfigLoader.parse("sampler:\n  momentum_persistence: 0\n", "x.yaml")
        .sampler().momentumPersistence());
    ConfigException thin = assertThrows(ConfigException.class,
        () -> RunConfigLoader.parse("sampler:\n  sampling: 500\n  thin: 3\n", "x.yaml"));
    assertTrue(thin.getMessage().contains("multiple of sampler.thin"), thin.getMessage());
    assertEquals(1, RunConfigLoader.parse("sampler: {}\n", "x.yaml").sampler().thin());
    assertEquals(5, RunConfigLoader.parse("sampler:\n  thin: 5\n", "x.yaml").sampler().thin());
    ConfigException missing = assertThrows(ConfigException.class,
        () -> RunConfigLoader.load(Path.of("no-such-file.yaml")));
    assertTrue(missing.getMessage().contains("no-such-file.yaml"), missing.getMessage());
  }

  @Test
  void serialisesToJsonWithYamlKeyNames() {
    String json = RunConfigLoader.toJson(RunConfig.defaults());
    assertTrue(json.contains("\"max_reject_share\" : 0.01"), json);
    assertTrue(json.contains("\"shopper_draws\""), json);
  }
}
