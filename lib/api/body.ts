import { ApiError } from "./errors";

/** Largest request body accepted, in bytes (4 MiB): enough for two 1,048,576-bit words written as 0/1 text. */
export const MAX_BODY_BYTES = 4 * 1024 * 1024;

/** Read the body as text, refusing more than MAX_BODY_BYTES without buffering the excess. */
export async function readBodyText(req: Request): Promise<string> {
  const declared = Number(req.headers.get("content-length") ?? NaN);
  if (declared > MAX_BODY_BYTES) throw tooLarge();
  if (!req.body) return "";
  const reader = req.body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.byteLength;
    if (total > MAX_BODY_BYTES) {
      await reader.cancel();
      throw tooLarge();
    }
    chunks.push(value);
  }
  return Buffer.concat(chunks).toString("utf8");
}

const tooLarge = () => new ApiError("payload-too-large", `The body exceeds ${MAX_BODY_BYTES} bytes (4 MiB).`);

/** Parse a JSON request body; 415 for another media type, 400 for empty or malformed JSON. */
export function parseJsonBody(req: Request, text: string): unknown {
  const type = req.headers.get("content-type") ?? "";
  if (!/^application\/([\w.+-]+\+)?json\b/i.test(type)) {
    throw new ApiError("unsupported-media-type", `Content-Type is ${type ? `\`${type}\`` : "missing"}; send \`application/json\`.`);
  }
  if (text.trim() === "") throw new ApiError("bad-request", "The request body is empty; send a JSON object.");
  try {
    return JSON.parse(text);
  } catch (e) {
    throw new ApiError("bad-request", `The body is not valid JSON: ${(e as Error).message}.`);
  }
}
