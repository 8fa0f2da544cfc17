package aislecast.jobs.config;

import com.fasterxml.jackson.annotation.JsonProperty;

/**
 * The run configuration: one typed, validated object; every key is optional and takes the
 * default documented on its section. Loaded from YAML by {@link RunConfigLoader}; unknown keys are
 * a configuration error.
 *
 * <p>To add a section (model priors, sampler, scenarios): add a record component with its own
 * record type whose compact constructor fills defaults for absent keys, default it here when
 * absent, and document it in {@code conf/defaults.yaml} (a test keeps that file equal to
 * {@link #defaults()}).
 */
public record RunConfig(
    @JsonProperty("input") InputConfig input,
    @JsonProperty("validation") ValidationConfig validation,
    @JsonProperty("sampler") SamplerConfig sampler,
    @JsonProperty("priors") PriorsConfig priors) {

  public RunConfig {
    input = input == null ? InputConfig.defaults() : input;
    validation = validation == null ? ValidationConfig.defaults() : validation;
    sampler = sampler == null ? SamplerConfig.defaults() : sampler;
    priors = priors == null ? PriorsConfig.defaults() : priors;
  }

  public static RunConfig defaults() {
    return new RunConfig(null, null, null, null);
  }

  /** Copy with another sampler section. */
  public RunConfig withSampler(SamplerConfig s) {
    return new RunConfig(input, validation, s, priors);
  }
}
