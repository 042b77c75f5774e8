import { LineCounter, parseDocument, isNode, type Document } from "yaml";
import { z } from "zod";

/**
 * The claims file: YAML or JSON with top-level defaults and a list of claims, each sent as one POST /claims.
 * Field names inside a claim are the API's (`label`, `statement`, `target`, `confidence`, `evidence`); `name`
 * is the file's own handle for a claim (the test case's name in the report). The API checks the evidence in
 * full; this schema checks what the file must get right before anything is sent.
 */

const LABEL_PATTERN = /^[\x21-\x7e](?:[\x20-\x7e]*[\x21-\x7e])?$/;
const label = z.string().min(1).max(120).regex(LABEL_PATTERN, "a label is 1 to 120 printable ASCII characters, not starting or ending with a space");
const confidence = z.number().min(0.5, "a confidence is a fraction from 0.5 to 0.999999").max(0.999999, "a confidence is a fraction from 0.5 to 0.999999");

const ATMOST_RULE = { error: "`atMost` is a rate above 0 and below 1, e.g. 1e-9" };
const target = z.union(
  [
    z.strictObject({ metric: z.enum(["ber", "fer"], { error: "`metric` is ber or fer" }), atMost: z.number(ATMOST_RULE).gt(0, ATMOST_RULE).lt(1, ATMOST_RULE) }),
    z.strictObject({ preset: z.string().min(1) }),
  ],
  { error: "a target is either `metric` (ber or fer) with `atMost` (above 0, below 1), or a `preset` name" },
);

const TRIALS_RULE = { error: "`trials` is a whole number of bits or frames tested, at least 1" };
const ERRORS_RULE = { error: "`errors` is a whole number of errors seen, 0 or more" };
const measured = z
  .strictObject({
    mode: z.literal("measured"),
    trials: z.number(TRIALS_RULE).int(TRIALS_RULE).min(1, TRIALS_RULE).max(Number.MAX_SAFE_INTEGER, TRIALS_RULE),
    errors: z.number(ERRORS_RULE).int(ERRORS_RULE).min(0, ERRORS_RULE).max(Number.MAX_SAFE_INTEGER, ERRORS_RULE),
  })
  .refine((e) => e.errors <= e.trials, { path: ["errors"], message: "there cannot be more errors than trials" });
// Analytic and simulated evidence carry a code and a channel whose rules live in the API; it answers with the field at fault.
const computed = z.looseObject({ mode: z.enum(["analytic", "simulated"]) });
const evidence = z.discriminatedUnion("mode", [measured, computed], { error: "`mode` must be analytic, measured or simulated" });

const claim = z.strictObject({
  name: z.string({ error: "each claim needs a `name` (the test case's name in reports)" }).min(1).max(200),
  label: label.optional(),
  statement: z.string().max(300).optional(),
  target,
  confidence: confidence.optional(),
  evidence,
});

export const claimsFileSchema = z
  .strictObject({
    label: label.optional(),
    confidence: confidence.optional(),
    inconclusive: z.enum(["fail", "pass"], { error: "`inconclusive` is fail or pass" }).default("fail"),
    claims: z.array(claim).min(1, "list at least one claim"),
  })
  .superRefine((f, ctx) => {
    const seen = new Set<string>();
    f.claims.forEach((c, i) => {
      if (c.label === undefined && f.label === undefined) ctx.addIssue({ code: "custom", path: ["claims", i, "label"], message: "no label: give this claim a `label` or the file a top-level one" });
      if (seen.has(c.name)) ctx.addIssue({ code: "custom", path: ["claims", i, "name"], message: `the name "${c.name}" is used twice; each claim needs its own` });
      seen.add(c.name);
    });
  });

export type ClaimsFile = z.output<typeof claimsFileSchema>;
export type FileClaim = ClaimsFile["claims"][number];

/** One problem in the file: where it is (1-based line, a dotted field path) and what is wrong, in our words. */
export interface FileProblem {
  line?: number;
  field: string;
  message: string;
}

export class ClaimsFileError extends Error {
  constructor(
    readonly file: string,
    readonly problems: FileProblem[],
  ) {
    super(problems.map((p) => `${file}${p.line ? `:${p.line}` : ""}: ${p.field ? `${p.field}: ` : ""}${p.message}`).join("\n"));
  }
}

/** A parsed file that can still say on which line each field stands. */
export interface LoadedClaims {
  file: string;
  data: ClaimsFile;
  lineOf(path: (string | number)[]): number | undefined;
}

/** A field path as people read it: claims[2].evidence.trials. */
export function fieldName(path: readonly PropertyKey[]): string {
  return path.map((k, i) => (typeof k === "number" ? `[${k}]` : `${i === 0 ? "" : "."}${String(k)}`)).join("");
}

function locator(doc: Document, lines: LineCounter) {
  return (path: (string | number)[]): number | undefined => {
    // The deepest node that exists: a missing field is reported at the entry that lacks it.
    for (let n = path.length; n >= 0; n--) {
      const node = n === 0 ? doc.contents : doc.getIn(path.slice(0, n), true);
      if (isNode(node) && node.range) return lines.linePos(node.range[0]).line;
    }
    return undefined;
  };
}

function issueMessage(issue: z.core.$ZodIssue): string {
  if (issue.code === "unrecognized_keys") return `unknown field${issue.keys.length > 1 ? "s" : ""} ${issue.keys.map((k) => `\`${k}\``).join(", ")}`;
  if (issue.code === "invalid_type" && issue.input === undefined) return "missing";
  return issue.message;
}

/**
 * Parses a claims file's text (YAML, or JSON, which YAML 1.2 reads as well) and checks it. Every problem
 * found is thrown at once, each with its line, so one run fixes a file.
 */
export function parseClaims(text: string, file: string): LoadedClaims {
  const lines = new LineCounter();
  // JSON files are held to JSON: YAML would quietly accept comments and bare words in them.
  const json = file.toLowerCase().endsWith(".json");
  const doc = parseDocument(text, { lineCounter: lines, uniqueKeys: true, ...(json ? { schema: "json" } : {}) });
  if (doc.errors.length > 0) {
    throw new ClaimsFileError(
      file,
      doc.errors.map((e) => ({ line: e.linePos?.[0].line, field: "", message: `not valid ${json ? "JSON" : "YAML"}: ${e.message.split("\n")[0]!.replace(/ at line \d+, column \d+:?$/, "")}` })),
    );
  }
  if (json) {
    try {
      JSON.parse(text);
    } catch (e) {
      const pos = /position (\d+)/.exec((e as Error).message)?.[1];
      throw new ClaimsFileError(file, [{ line: pos === undefined ? undefined : lines.linePos(Number(pos)).line, field: "", message: `not valid JSON: ${(e as Error).message.replace(/ in JSON at position \d+.*$/, "")}` }]);
    }
  }
  const lineOf = locator(doc, lines);
  const parsed = claimsFileSchema.safeParse(doc.toJS());
  if (!parsed.success) {
    const problems = parsed.error.issues.map((issue) => {
      const path = issue.path.filter((k): k is string | number => typeof k !== "symbol");
      const keyed = issue.code === "unrecognized_keys" ? [...path, issue.keys[0]!] : path;
      return { line: lineOf(keyed), field: fieldName(path), message: issueMessage(issue) };
    });
    problems.sort((a, b) => (a.line ?? 0) - (b.line ?? 0));
    throw new ClaimsFileError(file, problems);
  }
  return { file, data: parsed.data, lineOf };
}

/** The POST /claims body for a claim: its own fields over the file's defaults. */
export function requestBody(f: ClaimsFile, c: FileClaim) {
  const conf = c.confidence ?? f.confidence;
  return {
    label: (c.label ?? f.label)!,
    ...(c.statement !== undefined ? { statement: c.statement } : {}),
    target: c.target,
    ...(conf !== undefined ? { confidence: conf } : {}),
    evidence: c.evidence,
  };
}

/** Where a field of claim `index`'s request body came from in the file (a default comes from the top). */
export function filePath(f: ClaimsFile, index: number, bodyPath: string[]): (string | number)[] {
  const [head, ...rest] = bodyPath;
  const c = f.claims[index]!;
  if ((head === "label" && c.label === undefined) || (head === "confidence" && c.confidence === undefined)) return [head, ...rest];
  return ["claims", index, ...bodyPath];
}
