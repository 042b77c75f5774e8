/**
 * Writes openapi/response-examples.json: for every request example of every math endpoint, the body its
 * 200 response carries, produced by running the endpoint's own handler in process on the parsed example
 * (the same input parse and JSON encoding the HTTP layer applies). The document shows these next to the
 * request examples; tests/api/response-examples.test.ts fails when a stored one no longer matches.
 *
 *   npm run gen:response-examples
 */
import { writeFileSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import { responseExamples } from "@/openapi/response-examples";

const file = join(dirname(fileURLToPath(import.meta.url)), "..", "openapi", "response-examples.json");
writeFileSync(file, `${JSON.stringify(responseExamples(), null, 2)}\n`);
console.log(`gen-response-examples: wrote ${file}`);
