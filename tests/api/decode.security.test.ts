import { authMatrix } from "../helpers/security";

// Missing, malformed, forged, revoked and expired keys → 401; a key without `compute` (e.g. usage:read only) → 403.
authMatrix({ method: "POST", path: "/api/v1/decode", input: { code: { family: "hamming", r: 3 }, words: ["1011 110", "1001 010"] }, scope: "compute" });
