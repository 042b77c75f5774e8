import { unknownRoute } from "@/lib/api/http";

export { unknownRoute as GET, unknownRoute as POST, unknownRoute as PUT, unknownRoute as PATCH, unknownRoute as DELETE };
