/**
 * A mistake in what a person typed, chose or uploaded: the one kind of error a route shows back as
 * a message on the form (on the field named by `field`, else above the form). Anything else is a
 * bug and must reach the error boundary and the log, never be worded as the user's fault.
 */
export class UserError extends Error {
  constructor(
    message: string,
    /** The form field the message belongs beside; none for the form as a whole. */
    readonly field?: string,
  ) {
    super(message);
    this.name = "UserError";
  }
}

export type FormErrors = Partial<Record<string, string>>;

/** The form's errors for a user's mistake; any other error is thrown on. */
export function formErrors(error: unknown): FormErrors {
  if (error instanceof UserError) return { [error.field ?? "form"]: error.message };
  throw error;
}
