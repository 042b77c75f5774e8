"use client";

import { useEffect } from "react";
import { signInUrl } from "@/lib/console-client/fetcher";

/**
 * Sends a visitor without a session to /signin with a callbackUrl back to the exact page they
 * asked for (path and query: an invitation link must survive the detour). The server layout
 * cannot see the path, so the last hop happens here; without script the link does the same.
 */
export function SignInRedirect() {
  useEffect(() => {
    window.location.replace(signInUrl());
  }, []);
  return (
    <div className="mx-auto max-w-md px-5 py-16 text-center">
      <h1 className="text-xl font-semibold">Sign-in required</h1>
      <p className="mt-2 text-ink-2" role="status">
        The console needs you to sign in. Taking you to the sign-in page…
      </p>
      <p className="mt-4">
        <a
          href="/signin?callbackUrl=%2Fconsole"
          onClick={(e) => {
            e.preventDefault();
            window.location.assign(signInUrl());
          }}
        >
          Continue to sign-in
        </a>
      </p>
    </div>
  );
}
