import { authMatrix } from "../helpers/security";

// Missing, malformed, forged, revoked and expired keys → 401; a key without `compute` (e.g. usage:read only) → 403.
authMatrix({ method: "POST", path: "/api/v1/encode", input: { code: { family: "hamming", r: 3 }, messages: ["1011", "0110"] }, scope: "compute" });
