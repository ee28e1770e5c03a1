import { z } from "zod";
import { singleLine } from "@/lib/input-fields";

// The security audit page's kinds of event (the user events db/auth/commands.ts records) and
// its filter, from the page's query string.

export const SECURITY_EVENT_LABELS: Record<string, string> = {
  sign_in: "Signed in",
  sign_in_failed: "Sign-in failed",
  sign_out: "Signed out",
  sessions_revoked: "Sessions ended",
  role_change: "Role changed",
  password_reset_requested: "Reset link asked for",
  password_reset: "Password reset",
  password_changed: "Password changed",
  password_set: "Password set (invitation)",
  invited: "Invited",
  deactivated: "Deactivated",
  reactivated: "Reactivated",
  profile_change: "Profile changed",
  export: "Data exported",
};

const localDay = z
  .string()
  .regex(/^\d{4}-\d{2}-\d{2}$/, "a date as YYYY-MM-DD")
  .refine((d) => {
    const y = Number(d.slice(0, 4));
    return y >= 1900 && y <= 2200 && !Number.isNaN(Date.parse(`${d}T00:00:00Z`));
  }, "a date between 1900 and 2200");

export const securityEventFilterSchema = z.object({
  kind: z.enum(Object.keys(SECURITY_EVENT_LABELS) as [string, ...string[]]).optional().catch(undefined),
  user: singleLine().trim().max(120).optional().catch(undefined),
  from: localDay.optional().catch(undefined),
  to: localDay.optional().catch(undefined),
});
export type SecurityEventFilterInput = z.output<typeof securityEventFilterSchema>;
