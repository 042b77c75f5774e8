import { authMatrix } from "../helpers/security";

// Missing, malformed, forged, revoked and expired keys; wrong scope (e.g. a usage:read-only key).
authMatrix({ method: "POST", path: "/api/v1/capacity", input: { channel: "bsc", p: 0.11 }, scope: "compute" });
