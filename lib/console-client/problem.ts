/** RFC 9457 problem details as the console and the public API send them. */
export interface FieldProblem {
  pointer: string;
  message: string;
}

export interface ProblemBody {
  type: string;
  title: string;
  status: number;
  detail?: string;
  instance?: string;
  errors?: FieldProblem[];
  /** Field errors beyond those listed (the API lists at most 20). */
  omittedErrors?: number;
}

/** The one error the console's fetcher throws: an HTTP failure described as problem details. */
export class ProblemError extends Error implements ProblemBody {
  readonly type: string;
  readonly title: string;
  readonly status: number;
  readonly detail?: string;
  readonly instance?: string;
  readonly errors?: FieldProblem[];

  constructor(body: ProblemBody) {
    super(body.detail ? `${body.title}: ${body.detail}` : body.title);
    this.name = "ProblemError";
    this.type = body.type;
    this.title = body.title;
    this.status = body.status;
    this.detail = body.detail;
    this.instance = body.instance;
    this.errors = body.errors;
  }

  /** The problem code: the last segment of `type` (e.g. "last-owner" for /problems/last-owner). */
  get code(): string {
    return this.type.split("/").filter(Boolean).at(-1) ?? "";
  }
}

export function isProblemBody(v: unknown): v is ProblemBody {
  if (typeof v !== "object" || v === null) return false;
  const o = v as Record<string, unknown>;
  return typeof o.title === "string" && typeof o.status === "number";
}

export function isProblem(err: unknown, status?: number, code?: string): err is ProblemError {
  return err instanceof ProblemError && (status === undefined || err.status === status) && (code === undefined || err.code === code);
}

/** A readable problem for any thrown value (network failure, bad JSON, …). */
export function toProblem(err: unknown): ProblemError {
  if (err instanceof ProblemError) return err;
  if (err instanceof TypeError) {
    return new ProblemError({ type: "about:blank", title: "The server could not be reached", status: 0, detail: "Check your connection and try again." });
  }
  return new ProblemError({ type: "about:blank", title: "Something went wrong", status: 0, detail: err instanceof Error ? err.message : String(err) });
}
