import { authMatrix } from "../helpers/security";

// Missing, malformed, forged, revoked and expired keys; wrong scope (e.g. a usage:read-only key).
authMatrix({ method: "POST", path: "/api/v1/tests/plan", input: { targetBer: 1e-9, confidence: 0.95 }, scope: "compute" });
