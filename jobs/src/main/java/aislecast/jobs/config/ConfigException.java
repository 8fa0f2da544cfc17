package aislecast.jobs.config;

/** The run configuration (file or value) is invalid; exit code 2. */
public final class ConfigException extends RunFailure {
  private static final long serialVersionUID = 1L;

  public ConfigException(String message) {
    super(BAD_INPUT, message);
  }

  public ConfigException(String message, Throwable cause) {
    super(BAD_INPUT, message, cause);
  }
}
