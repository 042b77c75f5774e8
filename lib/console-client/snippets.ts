/** The curl command and the typed-client snippet equivalent to a request the bench sent. */

const shellQuote = (s: string) => `'${s.replace(/'/g, `'\\''`)}'`;

export interface RequestShape {
  method: "GET" | "POST" | "DELETE";
  /** Path below /api/v1, e.g. "/encode". */
  path: string;
  /** The JSON body (POST) or the query parameters (GET). */
  input: Record<string, unknown>;
  origin: string;
}

export function queryString(input: Record<string, unknown>): string {
  const q = new URLSearchParams();
  for (const [k, v] of Object.entries(input)) if (v !== undefined && v !== null) q.set(k, typeof v === "object" ? JSON.stringify(v) : String(v));
  const s = q.toString();
  return s ? `?${s}` : "";
}

/** curl with the key left as $PARITAS_KEY, so a copied command never carries a secret. */
export function curlCommand(r: RequestShape): string {
  const url = `${r.origin}/api/v1${r.path}${r.method === "GET" ? queryString(r.input) : ""}`;
  const lines = [`curl -sS -X ${r.method} ${shellQuote(url)}`, `  -H "Authorization: Bearer $PARITAS_KEY"`];
  if (r.method === "POST") {
    lines.push(`  -H "Content-Type: application/json"`);
    lines.push(`  -d ${shellQuote(JSON.stringify(r.input))}`);
  }
  return lines.join(" \\\n");
}

function indent(text: string, by: string): string {
  return text
    .split("\n")
    .map((l, i) => (i === 0 ? l : by + l))
    .join("\n");
}

/** The same call through the typed client package, @paritas/client (packages/client). */
export function clientSnippet(r: RequestShape): string {
  const input = indent(JSON.stringify(r.input, null, 2), "  ");
  const call =
    r.method === "GET"
      ? `await paritas.GET(${JSON.stringify(r.path)}, {\n  params: { query: ${indent(input, "  ")} },\n});`
      : `await paritas.${r.method}(${JSON.stringify(r.path)}, {\n  body: ${input},\n});`;
  return [
    `import { createParitasClient } from "@paritas/client";`,
    ``,
    `const paritas = createParitasClient({`,
    `  baseUrl: ${JSON.stringify(`${r.origin}/api/v1`)},`,
    `  key: process.env.PARITAS_KEY!,`,
    `});`,
    ``,
    `const { data, error, response } = ${call}`,
    `if (error) throw new Error(\`\${error.title}: \${error.detail}\`);`,
    `console.log(response.headers.get("x-request-id"), data);`,
  ].join("\n");
}
