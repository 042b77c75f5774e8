import { describe, expect, it, vi } from "vitest";
import * as route from "@/app/api/auth/[...nextauth]/route";
import { authOptions } from "@/lib/auth/options";
import { authSecret } from "@/lib/auth/session";

// The handler itself runs end to end in nextauth-flow.test.ts (with next/headers answered from the request).
describe("app/api/auth/[...nextauth]/route.ts", () => {
  it("exports GET and POST handlers", () => {
    expect(typeof route.GET).toBe("function");
    expect(typeof route.POST).toBe("function");
  });
});

describe("authOptions", () => {
  it("JWT sessions signed with the Paritas secret, our own pages, e-mail and password providers", () => {
    const o = authOptions();
    expect(o.session?.strategy).toBe("jwt");
    expect(o.secret).toBe(authSecret());
    expect(o.pages).toEqual({ signIn: "/signin", verifyRequest: "/signin/check-mail", error: "/signin" });
    expect(o.providers.map((p) => p.id)).toEqual(["email", "credentials"]);
    for (const m of ["createUser", "getUser", "getUserByEmail", "getUserByAccount", "updateUser", "createVerificationToken", "useVerificationToken"] as const) {
      expect(typeof o.adapter?.[m]).toBe("function");
    }
  });

  it("reads the secret when built, so a production build without one does not fail at import", () => {
    vi.stubEnv("NODE_ENV", "production");
    vi.stubEnv("PARITAS_AUTH_SECRET", "");
    vi.stubEnv("NEXTAUTH_SECRET", "");
    try {
      expect(() => authOptions()).toThrow(/PARITAS_AUTH_SECRET/);
      vi.stubEnv("PARITAS_AUTH_SECRET", "set-by-the-operator");
      expect(authOptions().secret).toBe("set-by-the-operator");
    } finally {
      vi.unstubAllEnvs();
    }
  });
});
