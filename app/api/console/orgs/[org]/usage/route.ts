import { methods } from "@/lib/api/methods";
import { ANY_ROLE, consoleRoute, json, readQuery, withOrgRole, withSession } from "@/lib/auth/guard";
import { loadUsage, resolvePeriod, summarise, usageCsv, usageQuery } from "@/lib/console/usage";

const readUsage = consoleRoute(
  withSession(
    withOrgRole(ANY_ROLE, async (req, { db, org }) => {
      const q = readQuery(req, usageQuery);
      const period = resolvePeriod(q);
      const cells = await loadUsage(db, org.id, period);
      if (q.format === "json") return json(summarise(period, cells));
      return new Response(usageCsv(cells), {
        headers: {
          "content-type": "text/csv; charset=utf-8",
          "content-disposition": `attachment; filename="paritas-usage-${org.slug}-${period.from}-to-${period.to}.csv"`,
        },
      });
    }),
  ),
);

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = methods({ GET: readUsage });
