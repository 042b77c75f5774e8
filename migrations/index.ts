import type { Migration } from "kysely";
import * as m0001 from "./0001_initial";
import * as m0002 from "./0002_console";
import * as m0003 from "./0003_idempotency_lease";
import * as m0004 from "./0004_bench_credentials";
import * as m0005 from "./0005_jobs";
import * as m0006 from "./0006_claims";
import * as m0007 from "./0007_billing";
import * as m0008 from "./0008_session_epoch";

/** Static list: Kysely's file-system provider cannot find migrations inside a Next.js build. */
export const migrations: Record<string, Migration> = {
  "0001_initial": m0001,
  "0002_console": m0002,
  "0003_idempotency_lease": m0003,
  "0004_bench_credentials": m0004,
  "0005_jobs": m0005,
  "0006_claims": m0006,
  "0007_billing": m0007,
  "0008_session_epoch": m0008,
};
