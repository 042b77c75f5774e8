import { authMatrix } from "../helpers/security";

// Missing, malformed, forged, revoked and expired keys; wrong scope (e.g. a usage:read-only key).
authMatrix({ method: "POST", path: "/api/v1/channels/bsc", input: { n: 7, p: 0.001, t: 1 }, scope: "compute" });
