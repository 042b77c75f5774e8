import { routes } from "@/lib/api/methods";
import { testPlan } from "@/lib/api/endpoints/test-plan";

export const { GET, HEAD, POST, PUT, PATCH, DELETE, OPTIONS } = routes(testPlan);
