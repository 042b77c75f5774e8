import type { Migration } from "kysely";
import * as m0001 from "./0001_initial";

/** Static list: Kysely's file-system provider cannot find migrations inside a Next.js build. */
export const migrations: Record<string, Migration> = {
  "0001_initial": m0001,
};
