package aislecast.jobs.io;

import aislecast.jobs.config.RunFailure;

/** The input data cannot be used as given (missing table, wrong schema, too many rejects). */
public class InputException extends RunFailure {
  private static final long serialVersionUID = 1L;

  public InputException(String message) {
    super(BAD_INPUT, message);
  }

  public InputException(String message, Throwable cause) {
    super(BAD_INPUT, message, cause);
  }
}
