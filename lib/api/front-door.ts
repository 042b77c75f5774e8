import { Server, STATUS_CODES, type IncomingMessage, type ServerResponse } from "node:http";
import type { Duplex } from "node:stream";
import { ApiError, problemResponse } from "./errors";
import { allowHeader, HANDLED_METHODS, matchApiRoute } from "./route-table";
import { requestIdFrom } from "./request-id";
import { withSecurityHeaders } from "./security-headers";

/**
 * The front door of /api: what must be answered before Next.js sees a request, because Next.js cannot:
 * - methods other than its seven (TRACE, PROPFIND, QUERY, …): a fetch Request cannot carry TRACE at all, and
 *   the others reach no route handler; and method tokens Node's HTTP parser does not know, which it refuses
 *   before any JavaScript runs (its `clientError`);
 * - path tricks under /api: an encoded slash or backslash, a dot segment (`..`, `%2e%2e`), an empty segment
 *   (`//`) or a malformed escape. Next.js would redirect or resolve them into another path; here they name no resource.
 * Everything else under /api (the seven methods on clean paths, unknown paths included) is left to the route
 * handlers, which answer 404 and 405 themselves (lib/api/methods.ts).
 */

export interface FrontDoorAnswer {
  code: "not-found" | "method-not-allowed";
  detail: string;
  allow?: string;
}

const HANDLED: ReadonlySet<string> = new Set(HANDLED_METHODS);
const UNRESERVED = /[A-Za-z0-9\-._~]/;
// Anything that could make a path a trick; a clean path with a handled method passes after this one test.
const SUSPECT = /[%\\]|\/\/|\/\.\.?(?:\/|$)/;
const SHOWN = 200;

const shown = (path: string) => (path.length > SHOWN ? `${path.slice(0, SHOWN)}…` : path);

/** Percent-escapes of unreserved characters decoded (RFC 3986 §6.2.2.2: `%2e` is `.`, `%61` is `a`), the others upper-cased. */
function normalizeEscapes(path: string): string {
  return path.replace(/%([0-9A-Fa-f]{2})/g, (_m, hex: string) => {
    const c = String.fromCharCode(parseInt(hex, 16));
    return UNRESERVED.test(c) ? c : `%${hex.toUpperCase()}`;
  });
}

/** A segment's text, or null when its escapes are not UTF-8. */
function decoded(segment: string): string | null {
  try {
    return decodeURIComponent(segment);
  } catch {
    return null;
  }
}

/** The path of a request-target: origin-form as is, absolute-form without its scheme and authority; asterisk-form has none. */
function pathOf(target: string): string | null {
  if (target.startsWith("/")) {
    const q = target.indexOf("?");
    const h = target.indexOf("#");
    const end = q < 0 ? h : h < 0 ? q : Math.min(q, h);
    return end < 0 ? target : target.slice(0, end);
  }
  return /^[A-Za-z][A-Za-z0-9+.-]*:\/\/[^/?#]*(\/[^?#]*)?/.exec(target)?.[1] ?? null;
}

/** What the front door answers for this method and request-target, or null to let Next.js route the request. */
export function frontDoor(method: string, target: string): FrontDoorAnswer | null {
  const raw = pathOf(target);
  if (raw === null) return null;
  const handled = HANDLED.has(method);
  if (handled && !SUSPECT.test(raw)) return null;
  const path = normalizeEscapes(raw);
  const slashes = path.replace(/\\|%5C|%2F/g, "/").replace(/\/{2,}/g, "/");
  if (slashes !== "/api" && !slashes.startsWith("/api/")) return null;

  const segments = path.split("/").slice(1);
  const names = segments.map(decoded);
  const trick =
    /\\|%5C|%2F/.test(path) ||
    segments.slice(0, -1).includes("") ||
    segments.some((s) => s === "." || s === "..") ||
    /%(?![0-9A-F]{2})/i.test(raw) ||
    names.includes(null);
  if (trick) {
    return {
      code: "not-found",
      detail: `No resource has the path \`${shown(raw)}\`: under /api an encoded slash or backslash, a dot segment, an empty segment or a malformed escape names nothing. The API reference is at /docs.`,
    };
  }
  if (handled) return null;
  const route = matchApiRoute(names.join("/"));
  if (!route) return { code: "not-found", detail: `There is no endpoint ${shown(raw)}. The API reference is at /docs.` };
  const allow = allowHeader(route.served);
  return { code: "method-not-allowed", detail: `${shown(method)} is not allowed on ${route.pattern}; allowed: ${allow}.`, allow };
}

function problemFor(answer: FrontDoorAnswer, requestId: string): Response {
  return withSecurityHeaders(problemResponse(new ApiError(answer.code, answer.detail, { headers: answer.allow ? { allow: answer.allow } : {} }), requestId));
}

async function answerRequest(req: IncomingMessage, res: ServerResponse, answer: FrontDoorAnswer): Promise<void> {
  const given = req.headers["x-request-id"];
  const problem = problemFor(answer, requestIdFrom(typeof given === "string" ? given : null));
  res.writeHead(problem.status, Object.fromEntries(problem.headers));
  res.end(await problem.text());
}

/** A parse error's request line: the line it stopped in (a pipelined request may follow others in the packet). */
function requestLineOf(err: { rawPacket?: Buffer; bytesParsed?: number }): { method: string; target: string } | null {
  const packet = err.rawPacket?.toString("latin1");
  if (!packet) return null;
  const start = packet.lastIndexOf("\n", Math.max(0, (err.bytesParsed ?? 0) - 1)) + 1;
  const m = /^(\S+) (\S+) HTTP\/\d\.\d\r?$/m.exec(packet.slice(start).split("\n", 1)[0]!);
  return m ? { method: m[1]!, target: m[2]! } : null;
}

/** Answer on the bare socket: the parser has failed, so the connection ends with the answer. */
async function answerSocket(socket: Duplex, answer: FrontDoorAnswer): Promise<void> {
  const problem = problemFor(answer, requestIdFrom(null));
  const body = Buffer.from(await problem.text());
  const head = [`HTTP/1.1 ${problem.status} ${STATUS_CODES[problem.status]}`, ...[...problem.headers].map(([k, v]) => `${k}: ${v}`), `content-length: ${body.length}`, "connection: close"];
  if (socket.writable) socket.end(Buffer.concat([Buffer.from(`${head.join("\r\n")}\r\n\r\n`, "latin1"), body]));
  else socket.destroy();
}

const INSTALLED = Symbol.for("paritas.frontDoor");
type Emit = (this: Server, event: string | symbol, ...args: unknown[]) => boolean;

/**
 * Put the front door before the `request` and `clientError` listeners of `target`: one server, or
 * http.Server.prototype for the server `next start` creates, which exposes no other hook (instrumentation.ts
 * installs it there). Installing twice is a no-op.
 */
export function installFrontDoor(target: { emit: Server["emit"] } = Server.prototype): void {
  const t = target as unknown as { emit: Emit; [INSTALLED]?: true };
  if (t[INSTALLED]) return;
  const emit = t.emit;
  t.emit = function (event, ...args) {
    if (event === "request") {
      const [req, res] = args as [IncomingMessage, ServerResponse];
      const answer = frontDoor(req.method ?? "", req.url ?? "");
      if (answer) {
        void answerRequest(req, res, answer).catch(() => res.destroy());
        return true;
      }
    } else if (event === "clientError") {
      const [err, socket] = args as [NodeJS.ErrnoException & { rawPacket?: Buffer; bytesParsed?: number }, Duplex];
      const line = err.code === "HPE_INVALID_METHOD" ? requestLineOf(err) : null;
      const answer = line && frontDoor(line.method, line.target);
      if (answer) {
        void answerSocket(socket, answer).catch(() => socket.destroy());
        return true;
      }
    }
    return emit.call(this, event, ...args);
  };
  t[INSTALLED] = true;
}
