/** Runs once when the server starts: the /api front door before the first request, and migrations. */
export async function register(): Promise<void> {
  if (process.env.NEXT_RUNTIME === "nodejs") {
    const { installFrontDoor } = await import("@/lib/api/front-door");
    installFrontDoor();
    const { getDb } = await import("@/db");
    await getDb();
  }
}
