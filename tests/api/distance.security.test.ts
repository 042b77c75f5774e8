import { authMatrix } from "../helpers/security";

// Missing, malformed, forged, revoked and expired keys; wrong scope (e.g. a usage:read-only key).
authMatrix({ method: "POST", path: "/api/v1/distance", input: { a: "1011 0010", b: "1001 0110" }, scope: "compute" });
