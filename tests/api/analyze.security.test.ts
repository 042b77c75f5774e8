import { authMatrix } from "../helpers/security";

// Missing, malformed, forged, revoked and expired keys → 401; a key without `compute` (e.g. usage:read only) → 403.
authMatrix({ method: "POST", path: "/api/v1/codes/analyze", input: { code: { family: "hamming", r: 3 }, p: 0.001 }, scope: "compute" });
