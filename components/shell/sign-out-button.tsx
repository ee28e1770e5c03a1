"use client";

export function SignOutButton() {
  async function signOut() {
    await fetch("/api/session", { method: "DELETE" });
    window.location.assign("/sign-in");
  }
  return (
    <button type="button" onClick={signOut} className="rounded px-2 py-1 text-xs text-soot-300 hover:bg-soot-800 hover:text-soot-50">
      Sign out
    </button>
  );
}
