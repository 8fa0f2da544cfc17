package aislecast.jobs.config;

import com.fasterxml.jackson.annotation.JsonCreator;
import com.fasterxml.jackson.annotation.JsonProperty;

/**
 * Input validation settings.
 *
 * @param maxRejectShare largest share of rejected rows, over all input tables together, that a
 *     run tolerates; above it the run stops with exit code 2 (rejects are still written). Default
 *     {@value #DEFAULT_MAX_REJECT_SHARE}. Must lie in [0, 1].
 */
public record ValidationConfig(@JsonProperty("max_reject_share") double maxRejectShare) {
  public static final double DEFAULT_MAX_REJECT_SHARE = 0.01;

  public ValidationConfig {
    if (!(maxRejectShare >= 0.0 && maxRejectShare <= 1.0)) {
      throw new ConfigException(
          "validation.max_reject_share: " + maxRejectShare + " is not a share in [0, 1]");
    }
  }

  /** YAML entry point: absent keys take their defaults (a primitive cannot say "absent"). */
  @JsonCreator
  static ValidationConfig fromYaml(@JsonProperty("max_reject_share") Double maxRejectShare) {
    return new ValidationConfig(
        maxRejectShare == null ? DEFAULT_MAX_REJECT_SHARE : maxRejectShare);
  }

  public static ValidationConfig defaults() {
    return new ValidationConfig(DEFAULT_MAX_REJECT_SHARE);
  }
}
