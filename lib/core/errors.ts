/** Invalid input to a core function; `path` locates the bad part inside the argument (e.g. [3] for the fourth word of a list). */
export class InputError extends Error {
  constructor(
    message: string,
    readonly path: (string | number)[] = [],
  ) {
    super(message);
    this.name = "InputError";
  }
}
