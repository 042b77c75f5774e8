import { methods } from "@/lib/api/methods";
import { billingWebhook } from "@/lib/billing/webhook-route";

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = methods({ POST: billingWebhook });
