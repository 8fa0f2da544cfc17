package aislecast.jobs.config;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import aislecast.core.globals.Priors;
import org.junit.jupiter.api.Test;

/** The sampler: and priors: sections: defaults, parsing, and the mapping to the model's priors. */
class EstimateConfigTest {

  @Test
  void defaultPriorsSectionGivesTheModelsDocumentedDefaults() {
    for (int kd = 1; kd <= 3; kd++) {
      for (int kx = 0; kx <= 3; kx++) {
        Priors expected = Priors.defaults(kd, kx);
        Priors actual = PriorsConfig.defaults().toPriors(kd, kx);
        assertArrayEquals(expected.gammaPsiMean(), actual.gammaPsiMean(), 0.0);
        assertArrayEquals(expected.gammaPsiVar(), actual.gammaPsiVar(), 0.0);
        assertEquals(expected.vPsi().df(), actual.vPsi().df(), 0.0);
        assertArrayEquals(expected.vPsi().scale(), actual.vPsi().scale(), 0.0);
        assertEquals(expected.kappabar(), actual.kappabar());
        assertEquals(expected.tau2(), actual.tau2());
        assertEquals(expected.gamma(), actual.gamma());
        assertEquals(expected.pi0(), actual.pi0());
        assertEquals(expected.pi(), actual.pi());
        assertEquals(expected.lambda(), actual.lambda());
        assertEquals(expected.sigmaXi2(), actual.sigmaXi2());
        assertEquals(expected.sigmaP2(), actual.sigmaP2());
      }
    }
  }

  @Test
  void samplerAndPriorKeysParseAndAbsentOnesKeepDefaults() {
    RunConfig c = RunConfigLoader.parse(String.join("\n",
        "sampler:",
        "  chains: 6",
        "  sampling: 1000",
        "  sum_group: 8",
        "priors:",
        "  location_sd: 3",
        "  variance_scale: 0.25",
        ""), "t.yaml");
    assertEquals(6, c.sampler().chains());
    assertEquals(1000, c.sampler().sampling());
    assertEquals(8, c.sampler().sumGroup());
    assertEquals(SamplerConfig.DEFAULT_WARMUP, c.sampler().warmup());
    assertEquals(SamplerConfig.DEFAULT_RHAT_MAX, c.sampler().rhatMax());
    Priors p = c.priors().toPriors(2, 1);
    assertEquals(9.0, p.kappabar().var(), 0.0);
    assertEquals(0.25, p.sigmaP2().scale(), 0.0);
    assertEquals(2.0, p.tau2().shape(), 0.0);
    assertEquals(-1.0, p.gammaPsiMean()[1], 0.0);
  }

  @Test
  void priceNoiseScaleIsANumberOrAutoAndFollowsVarianceScaleWhenAbsent() {
    Priors unset = RunConfigLoader.parse("priors:\n  variance_scale: 0.3\n", "t.yaml").priors()
        .toPriors(2, 1);
    assertEquals(0.3, unset.sigmaP2().scale(), 0.0);
    RunConfig set = RunConfigLoader.parse("priors:\n  price_noise_scale: 0.02\n", "t.yaml");
    assertEquals(0.02, set.priors().toPriors(2, 1).sigmaP2().scale(), 0.0);
    assertEquals(0.5, set.priors().toPriors(2, 1).sigmaXi2().scale(), 0.0, "the others keep 0.5");
    PriorsConfig auto = RunConfigLoader.parse("priors:\n  price_noise_scale: auto\n", "t.yaml")
        .priors();
    assertTrue(auto.priceNoiseAuto());
    assertEquals(0.0123, auto.toPriors(2, 1, 0.0123).sigmaP2().scale(), 0.0);
    assertEquals(0.5, auto.toPriors(2, 1, 0.0123).tau2().scale(), 0.0);
    assertThrows(IllegalArgumentException.class, () -> auto.toPriors(2, 1));
    for (String bad : new String[] {"-0.1", "often", "[1, 2]"}) {
      ConfigException e = assertThrows(ConfigException.class,
          () -> RunConfigLoader.parse("priors:\n  price_noise_scale: " + bad + "\n", "x.yaml"));
      assertTrue(e.getMessage().contains("priors.price_noise_scale"), e.getMessage());
    }
  }

  @Test
  void badValuesNameTheirKey() {
    ConfigException chains = assertThrows(ConfigException.class,
        () -> RunConfigLoader.parse("sampler:\n  chains: 1\n", "x.yaml"));
    assertTrue(chains.getMessage().contains("sampler.chains"), chains.getMessage());
    assertEquals(2, chains.exitCode());
    ConfigException sd = assertThrows(ConfigException.class,
        () -> RunConfigLoader.parse("priors:\n  location_sd: -1\n", "x.yaml"));
    assertTrue(sd.getMessage().contains("priors.location_sd"), sd.getMessage());
    ConfigException unknown = assertThrows(ConfigException.class,
        () -> RunConfigLoader.parse("sampler:\n  chain: 4\n", "x.yaml"));
    assertTrue(unknown.getMessage().contains("sampler.chain"), unknown.getMessage());
  }
}
