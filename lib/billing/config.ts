import { z } from "zod";

/**
 * Where the billing provider is, read once from the environment by one schema. The local stand-in
 * (fakes/billing.ts) and the hosted service differ only in these values:
 *   PARITAS_BILLING_SECRET_KEY      the provider's secret API key (unset: billing is off; plans and quotas still apply)
 *   PARITAS_BILLING_HOST            host name (default: the provider's own API host, the SDK's default)
 *   PARITAS_BILLING_PORT            port (default 443)
 *   PARITAS_BILLING_PROTOCOL        http or https (default https)
 *   PARITAS_BILLING_WEBHOOK_SECRET  the signing secret of the webhook endpoint
 */
const schema = z.object({
  PARITAS_BILLING_SECRET_KEY: z.string().min(1).optional(),
  PARITAS_BILLING_HOST: z.string().min(1).optional(),
  PARITAS_BILLING_PORT: z.coerce.number().int().min(1).max(65535).optional(),
  PARITAS_BILLING_PROTOCOL: z.enum(["http", "https"]).optional(),
  PARITAS_BILLING_WEBHOOK_SECRET: z.string().min(1).optional(),
});

export interface BillingConfig {
  secretKey: string;
  host?: string;
  port?: number;
  protocol?: "http" | "https";
  webhookSecret?: string;
}

let cached: { key: string; config: BillingConfig | null } | undefined;

/** The provider's settings, or null when billing is not configured (read again only when the variables change, as tests do). */
export function billingConfig(env: NodeJS.ProcessEnv = process.env): BillingConfig | null {
  const key = Object.keys(schema.shape).map((k) => env[k] ?? "").join("\n");
  if (cached?.key === key) return cached.config;
  const parsed = schema.safeParse(env);
  if (!parsed.success) throw new Error(`billing settings are invalid: ${parsed.error.issues.map((i) => `${i.path.join(".")}: ${i.message}`).join("; ")}`);
  const e = parsed.data;
  const config = e.PARITAS_BILLING_SECRET_KEY
    ? { secretKey: e.PARITAS_BILLING_SECRET_KEY, host: e.PARITAS_BILLING_HOST, port: e.PARITAS_BILLING_PORT, protocol: e.PARITAS_BILLING_PROTOCOL, webhookSecret: e.PARITAS_BILLING_WEBHOOK_SECRET }
    : null;
  cached = { key, config };
  return config;
}
