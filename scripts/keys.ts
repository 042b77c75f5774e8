import { Command, InvalidArgumentError } from "commander";
import { closeDb, getDb } from "@/db";
import { findApiKeyByPrefix } from "@/db/queries/api-keys";
import { findOrgBySlug } from "@/db/queries/orgs";
import { createKey, keyState, listKeys, revokeKey } from "@/lib/api/key-service";
import { isWellFormedKey, KEY_PATTERN, LEGACY_PATTERN, visiblePrefix } from "@/lib/api/keys";
import { allScopes, parseScopes } from "@/lib/api/scopes";

/** Operator commands for API keys. Every change writes an audit row (actor "cli"). */
const program = new Command("keys").description("Create, list and revoke Paritas API keys").showHelpAfterError();

async function orgOrExit(slug: string) {
  const org = await findOrgBySlug(await getDb(), slug);
  if (!org) {
    console.error(`no org with slug "${slug}"`);
    process.exit(2);
  }
  return org;
}

const isoDate = (v: string) => {
  if (Number.isNaN(Date.parse(v))) throw new InvalidArgumentError("expected an ISO-8601 date or time");
  return new Date(v).toISOString();
};

program
  .command("create")
  .description("create a key and print it (only the key, on stdout)")
  .requiredOption("--org <slug>", "organisation slug")
  .option("--name <name>", "a name people will recognise", "cli key")
  .option("--scopes <list>", `comma-separated scopes (default: ${allScopes.join(",")})`, allScopes.join(","))
  .option("--test", "make a test key instead of a live one", false)
  .option("--expires <date>", "expiry, ISO-8601", isoDate)
  .action(async (o: { org: string; name: string; scopes: string; test: boolean; expires?: string }) => {
    const org = await orgOrExit(o.org);
    let scopes;
    try {
      scopes = parseScopes(o.scopes);
    } catch (e) {
      console.error((e as Error).message);
      process.exit(2);
    }
    const { key } = await createKey(await getDb(), { orgId: org.id, name: o.name, mode: o.test ? "test" : "live", scopes, expiresAt: o.expires ?? null }, "cli");
    process.stdout.write(key + "\n");
  });

program
  .command("list")
  .description("list an organisation's keys (never the keys themselves)")
  .requiredOption("--org <slug>", "organisation slug")
  .option("--json", "print JSON", false)
  .action(async (o: { org: string; json: boolean }) => {
    const org = await orgOrExit(o.org);
    const rows = (await listKeys(await getDb(), org.id)).map((k) => ({
      id: k.id,
      prefix: k.prefix,
      name: k.name,
      mode: k.mode,
      state: keyState(k),
      scopes: k.scopes,
      created: k.created_at,
      expires: k.expires_at,
      lastUsed: k.last_used_at,
    }));
    if (o.json) console.log(JSON.stringify(rows, null, 2));
    else console.table(rows);
  });

program
  .command("revoke")
  .description("revoke a key at once, by id or by its visible prefix")
  .requiredOption("--org <slug>", "organisation slug")
  .argument("<key>", "key id or visible prefix (e.g. live.prt1.Ab12)")
  .action(async (ref: string, o: { org: string }) => {
    const org = await orgOrExit(o.org);
    const db = await getDb();
    let id = /^\d+$/.test(ref) ? Number(ref) : undefined;
    if (id === undefined) {
      const found = await findApiKeyByPrefix(db, org.id, ref);
      if (found.length !== 1) {
        console.error(found.length ? `prefix ${ref} matches ${found.length} keys; use the id` : `no key with prefix ${ref}`);
        process.exit(2);
      }
      id = found[0]!.id;
    }
    const row = await revokeKey(db, org.id, id, "cli");
    if (!row) {
      console.error(`no key ${ref} in ${o.org}`);
      process.exit(2);
    }
    console.error(`revoked ${row.prefix}… (${row.name})`);
  });

/** One line about a candidate that never repeats it beyond its visible prefix, and whether it is a valid key. */
function describeCandidate(candidate: string): { ok: boolean; line: string } {
  const current = KEY_PATTERN.exec(candidate);
  const legacy = current ? null : LEGACY_PATTERN.exec(candidate);
  const shape = current ?? legacy;
  if (!shape) return { ok: false, line: "not a Paritas key (wrong shape)" };
  const ok = isWellFormedKey(candidate);
  const format = current ? "prt1" : "legacy prt_";
  return { ok, line: `${visiblePrefix(candidate)}… ${shape[1]} key, format ${format}, checksum ${ok ? "matches" : "does not match"}` };
}

async function readLines(): Promise<string[]> {
  let text = "";
  for await (const chunk of process.stdin) text += String(chunk);
  return text.split(/\r?\n/).map((l) => l.trim()).filter(Boolean);
}

program
  .command("check")
  .description("tell offline whether a string is a well-formed Paritas key (mode, format, checksum); exit 0 if it is, 1 if not")
  .argument("<key>", 'the candidate, or "-" to read candidates from stdin, one per line (exit 0 only if all are keys)')
  .action(async (arg: string) => {
    const candidates = arg === "-" ? await readLines() : [arg.trim()];
    let allOk = candidates.length > 0;
    candidates.forEach((c, i) => {
      const { ok, line } = describeCandidate(c);
      allOk &&= ok;
      process.stdout.write((arg === "-" ? `line ${i + 1}: ` : "") + line + "\n");
    });
    if (!candidates.length) console.error("no candidates on stdin");
    process.exitCode = allOk ? 0 : 1;
  });

await program.parseAsync(process.argv);
await closeDb();
