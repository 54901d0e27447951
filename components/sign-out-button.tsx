"use client";

import { signOut } from "next-auth/react";

export function SignOutButton() {
  return (
    <button
      type="button"
      onClick={() => signOut({ callbackUrl: "/login" })}
      className="rounded border border-line bg-raised px-2 py-1 text-sm hover:bg-panel"
    >
      Sign out
    </button>
  );
}
