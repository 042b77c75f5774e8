import type { ColumnType, Generated, Insertable, Selectable, Updateable } from "kysely";

/** Times are ISO-8601 UTC strings: portable between SQLite and Postgres and sortable as text. */
type Timestamp = string;

export interface OrgTable {
  id: Generated<number>;
  slug: string;
  name: string;
  plan: string;
  created_at: Timestamp;
}

export interface UserTable {
  id: Generated<number>;
  email: string;
  name: string | null;
  created_at: Timestamp;
  /** bcrypt hash, null for users who only sign in by e-mail link. */
  password_hash: ColumnType<string | null, string | null | undefined, string | null>;
  email_verified: ColumnType<Timestamp | null, Timestamp | null | undefined, Timestamp | null>;
  /** Written into each session token at sign-in; raising it ends every session issued before. */
  session_epoch: ColumnType<number, number | undefined, number>;
}

export interface VerificationTokenTable {
  identifier: string;
  /** SHA-256 of the token sent by e-mail; the token itself is never stored. */
  token_hash: string;
  purpose: "sign-in" | "password-reset";
  expires_at: Timestamp;
}

export interface InvitationTable {
  id: Generated<number>;
  org_id: number;
  email: string;
  role: Role;
  token_hash: string;
  invited_by_user_id: number | null;
  created_at: Timestamp;
  expires_at: Timestamp;
  accepted_at: Timestamp | null;
  revoked_at: Timestamp | null;
}

export type Role = "owner" | "developer" | "billing";

export interface MembershipTable {
  id: Generated<number>;
  org_id: number;
  user_id: number;
  role: Role;
  created_at: Timestamp;
}

export type KeyMode = "live" | "test";

export type KeyPurpose = "api" | "bench";

export interface ApiKeyTable {
  id: Generated<number>;
  org_id: number;
  name: string;
  mode: KeyMode;
  /** The first characters of the key, shown in lists so a person can tell keys apart. */
  prefix: string;
  /** SHA-256 of the whole key, hex. The key itself is never stored. */
  key_hash: string;
  /** Space-separated scope names. */
  scopes: string;
  created_by_user_id: number | null;
  created_at: Timestamp;
  expires_at: Timestamp | null;
  revoked_at: Timestamp | null;
  last_used_at: Timestamp | null;
  /** Set on a key made by rotating another: the old key keeps working until its expires_at. */
  rotated_from_key_id: ColumnType<number | null, number | null | undefined, number | null>;
  /** "api": a key people list, rotate and revoke; "bench": a person's one credential for the console's bench, renewed in place. */
  purpose: ColumnType<KeyPurpose, KeyPurpose | undefined, KeyPurpose>;
}

export type JobStatus = "queued" | "running" | "done" | "cancelled" | "failed";

export interface JobTable {
  /** Public id, e.g. "sim-4k2m…" (lib/jobs/ids.ts). */
  id: string;
  org_id: number;
  api_key_id: number | null;
  /** Which runner code handles it (lib/jobs/kinds.ts). */
  kind: string;
  /** The validated request, JSON. */
  input: string;
  status: JobStatus;
  /** Why it failed or was cancelled, in words for the caller. */
  reason: string | null;
  /** JSON written by the runner at least every second while it runs. */
  progress: string | null;
  result: string | null;
  /** Compute units charged so far (for the chunks run). */
  units: ColumnType<number, number | undefined, number>;
  /** Compute units reserved from the org's quota when it was queued, settled when it ends. */
  reserved_units: ColumnType<number, number | undefined, number>;
  /** How many times a runner has claimed it (a crash and resume adds one). */
  attempts: ColumnType<number, number | undefined, number>;
  lease_holder: string | null;
  /** A running job whose lease has passed goes back to any runner (its runner stopped). */
  lease_expires_at: Timestamp | null;
  cancel_requested_at: Timestamp | null;
  created_at: Timestamp;
  started_at: Timestamp | null;
  updated_at: Timestamp;
  finished_at: Timestamp | null;
}

export type ClaimVerdict = "pending" | "supported" | "refuted" | "inconclusive";

export interface ClaimTable {
  /** Public id, e.g. "clm-…" (lib/jobs/ids.ts). */
  id: string;
  org_id: number;
  api_key_id: number | null;
  /** The firmware version, branch or build the claim is about; a label's claims are its history. */
  label: string;
  mode: "analytic" | "measured" | "simulated";
  verdict: ClaimVerdict;
  /** The request as validated, JSON. */
  request: string;
  /** The decision and its reasoning (JSON), once decided. */
  outcome: string | null;
  /** The simulation job behind a simulated claim. */
  job_id: string | null;
  created_at: Timestamp;
  decided_at: Timestamp | null;
}

export interface JobChunkTable {
  job_id: string;
  point: number;
  chunk: number;
  counts: string;
}

export interface UsageEventTable {
  id: Generated<number>;
  org_id: number;
  api_key_id: number | null;
  /** Operation id of the endpoint definition, e.g. "distance". */
  endpoint: string;
  method: string;
  status: number;
  units: number;
  duration_ms: number;
  request_id: string;
  created_at: Timestamp;
  /** Set once the event has been sent to the billing provider (outbox). */
  reported_at: Timestamp | null;
  /** The mode of the key it was made with: only live usage is billed and reported to the provider. */
  mode: ColumnType<KeyMode, KeyMode | undefined, KeyMode>;
}

/** Compute units used (and reserved by running work) per org, key mode and calendar month; kept equal to the ledger plus reservations. */
export interface QuotaCounterTable {
  org_id: number;
  mode: KeyMode;
  /** The month, "YYYY-MM". */
  period: string;
  used: number;
}

/** Allowance e-mails sent: one per org, month and threshold (percent). */
export interface QuotaNoticeTable {
  org_id: number;
  period: string;
  threshold: number;
  sent_at: Timestamp;
}

/** An org's customer at the billing provider, its subscription and payment state as the provider's events last said. */
export interface BillingAccountTable {
  org_id: number;
  customer_id: string;
  subscription_id: string | null;
  subscription_status: string | null;
  card_brand: string | null;
  card_last4: string | null;
  card_exp_month: number | null;
  card_exp_year: number | null;
  payment_failed_at: Timestamp | null;
  /** While a payment has failed: when the org moves to the free plan unless it pays. */
  grace_until: Timestamp | null;
  updated_at: Timestamp;
}

/** Every provider event processed, so a repeated delivery is acknowledged and ignored. */
export interface BillingEventTable {
  event_id: string;
  type: string;
  received_at: Timestamp;
  /** What processing did, in words (for the operator). */
  outcome: string;
}

export interface IdempotencyRecordTable {
  id: Generated<number>;
  org_id: number;
  idem_key: string;
  endpoint: string;
  request_hash: string;
  state: "running" | "done";
  response_status: number | null;
  response_headers: string | null;
  response_body: string | null;
  created_at: Timestamp;
  expires_at: Timestamp;
  /** Random token of the request that holds a running record; only it may complete or release the record. */
  holder: string | null;
  /** When a running record counts as abandoned (its server stopped) and a retry may take it over. */
  lease_expires_at: Timestamp | null;
}

export interface AuditLogTable {
  id: Generated<number>;
  org_id: number;
  actor: string;
  action: string;
  target_type: string;
  target_id: string;
  details: ColumnType<string, string | undefined, string>;
  created_at: Timestamp;
}

export interface Database {
  orgs: OrgTable;
  users: UserTable;
  memberships: MembershipTable;
  api_keys: ApiKeyTable;
  jobs: JobTable;
  claims: ClaimTable;
  job_chunks: JobChunkTable;
  usage_events: UsageEventTable;
  quota_counters: QuotaCounterTable;
  quota_notices: QuotaNoticeTable;
  billing_accounts: BillingAccountTable;
  billing_events: BillingEventTable;
  idempotency_records: IdempotencyRecordTable;
  audit_log: AuditLogTable;
  verification_tokens: VerificationTokenTable;
  invitations: InvitationTable;
}

export type Org = Selectable<OrgTable>;
export type NewOrg = Insertable<OrgTable>;
export type User = Selectable<UserTable>;
export type NewUser = Insertable<UserTable>;
export type Membership = Selectable<MembershipTable>;
export type ApiKey = Selectable<ApiKeyTable>;
export type NewApiKey = Insertable<ApiKeyTable>;
export type ApiKeyUpdate = Updateable<ApiKeyTable>;
export type UsageEvent = Selectable<UsageEventTable>;
export type NewUsageEvent = Insertable<UsageEventTable>;
export type IdempotencyRecord = Selectable<IdempotencyRecordTable>;
export type AuditEntry = Selectable<AuditLogTable>;
export type NewAuditEntry = Insertable<AuditLogTable>;
export type Invitation = Selectable<InvitationTable>;

export type BillingAccount = Selectable<BillingAccountTable>;
export type Job = Selectable<JobTable>;
export type NewJob = Insertable<JobTable>;
export type Claim = Selectable<ClaimTable>;
