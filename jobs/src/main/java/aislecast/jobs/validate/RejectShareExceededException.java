package aislecast.jobs.validate;

import aislecast.jobs.io.InputException;

/** More rows were rejected than {@code validation.max_reject_share} allows; exit code 2. */
public final class RejectShareExceededException extends InputException {
  private static final long serialVersionUID = 1L;

  public RejectShareExceededException(String message) {
    super(message);
  }
}
