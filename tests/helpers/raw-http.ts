import { connect } from "node:net";

export interface RawResponse {
  status: number;
  /** Header names in lower case; repeated fields joined with ", ". */
  headers: Record<string, string>;
  body: string;
}

/** A chunked body decoded (RFC 9112 §7.1); trailers ignored. */
function dechunk(data: Buffer): Buffer {
  const parts: Buffer[] = [];
  let at = 0;
  for (;;) {
    const eol = data.indexOf("\r\n", at);
    if (eol < 0) break;
    const size = parseInt(data.subarray(at, eol).toString("latin1").split(";")[0]!, 16);
    if (!(size > 0)) break;
    parts.push(data.subarray(eol + 2, eol + 2 + size));
    at = eol + 2 + size + 2;
  }
  return Buffer.concat(parts);
}

/**
 * One request sent byte for byte as given — any method token, any request-target, no normalisation — on a
 * connection of its own (`Connection: close`); resolves with the response once the server closes it.
 */
export function rawRequest(port: number, method: string, target: string, opts: { headers?: Record<string, string>; body?: string } = {}): Promise<RawResponse> {
  const body = opts.body === undefined ? undefined : Buffer.from(opts.body);
  const headers = { host: `127.0.0.1:${port}`, connection: "close", ...(body ? { "content-length": String(body.length) } : {}), ...opts.headers };
  const head = `${method} ${target} HTTP/1.1\r\n${Object.entries(headers).map(([k, v]) => `${k}: ${v}\r\n`).join("")}\r\n`;
  return new Promise((resolve, reject) => {
    const chunks: Buffer[] = [];
    const socket = connect(port, "127.0.0.1", () => socket.write(body ? Buffer.concat([Buffer.from(head, "latin1"), body]) : Buffer.from(head, "latin1")));
    socket.on("data", (c: Buffer) => chunks.push(c));
    socket.on("error", reject);
    socket.on("close", () => {
      const all = Buffer.concat(chunks);
      const split = all.indexOf("\r\n\r\n");
      if (split < 0) return reject(new Error(`no complete response to ${method} ${target}: ${JSON.stringify(all.toString("latin1"))}`));
      const [statusLine, ...lines] = all.subarray(0, split).toString("latin1").split("\r\n");
      const fields: Record<string, string> = {};
      for (const line of lines) {
        const i = line.indexOf(":");
        const name = line.slice(0, i).trim().toLowerCase();
        const value = line.slice(i + 1).trim();
        fields[name] = name in fields ? `${fields[name]}, ${value}` : value;
      }
      const rest = all.subarray(split + 4);
      const payload = fields["transfer-encoding"]?.includes("chunked") ? dechunk(rest) : rest;
      resolve({ status: Number(statusLine!.split(" ")[1]), headers: fields, body: payload.toString("utf8") });
    });
  });
}
