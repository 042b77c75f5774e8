import NextAuth from "next-auth";
import type { NextRequest } from "next/server";
import { authOptions } from "@/lib/auth/options";

type Context = { params: Promise<{ nextauth: string[] }> };

// next-auth's App Router handler, with the options built per request (see authOptions).
async function handler(req: NextRequest, ctx: Context): Promise<Response> {
  return NextAuth(req, ctx, authOptions());
}

export { handler as GET, handler as POST };
