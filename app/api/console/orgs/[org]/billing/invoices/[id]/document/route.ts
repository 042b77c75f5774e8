import { z } from "zod";
import { methods } from "@/lib/api/methods";
import { BILLING_ROLES, consoleRoute, readQuery, withOrgRole, withSession } from "@/lib/auth/guard";
import { invoiceCsv, invoicePdf } from "@/lib/billing/invoice-documents";
import { orgInvoice } from "@/lib/console/billing";

const query = z.strictObject({ format: z.enum(["pdf", "csv"]).default("pdf") });

const document = consoleRoute(
  withSession(
    withOrgRole(BILLING_ROLES, async (req, { db, org, params }) => {
      const { format } = readQuery(req, query);
      const inv = await orgInvoice(db, org, params.id ?? "");
      const name = `paritas-invoice-${org.slug}-${inv.number ?? inv.id}.${format}`.replace(/[^\w.-]/g, "-");
      const body = format === "pdf" ? new Uint8Array(await invoicePdf(inv)) : invoiceCsv(inv);
      return new Response(body, {
        headers: { "content-type": format === "pdf" ? "application/pdf" : "text/csv; charset=utf-8", "content-disposition": `attachment; filename="${name}"` },
      });
    }),
  ),
);

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = methods({ GET: document });
