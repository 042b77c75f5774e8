import { authMatrix } from "../helpers/security";

// Missing, malformed, forged, revoked and expired keys; wrong scope (e.g. a usage:read-only key).
authMatrix({ method: "POST", path: "/api/v1/links/ber", input: { modulation: "bpsk", ebN0Db: 9.6 }, scope: "compute" });
