import { closeDb, getDb } from "@/db";
import { seedDemo } from "@/db/seed/demo";

await seedDemo(await getDb());
await closeDb();
console.error("demo data is in place");
