import { z } from "zod";
import { rowVersion, singleLine } from "@/lib/input-fields";
import { ROLES } from "./permissions";
import { NOTIFICATION_KINDS } from "@/lib/notifications/kinds";

const email = singleLine().trim().min(1, "Enter an e-mail address").max(254).email("That is not an e-mail address");
const name = singleLine().trim().min(1, "Enter a name").max(120, "Keep the name under 120 characters");

/** Long enough to resist guessing; no composition rules (NIST SP 800-63B §5.1.1). */
export const PASSWORD_MIN = 10;
const newPassword = z
  .string()
  .min(PASSWORD_MIN, `Use at least ${PASSWORD_MIN} characters`)
  .max(200, "Keep the password under 200 characters");

export const signInSchema = z.object({
  email,
  password: singleLine().min(1, "Enter your password").max(200),
});
export type SignInInput = z.infer<typeof signInSchema>;

export const roleSchema = z.enum(ROLES, { message: "Choose one of the roles" });

export const createUserSchema = z.object({
  email,
  name,
  role: roleSchema,
  unit_pref: z.enum(["mm", "in"]).default("mm"),
});
export type CreateUserInput = z.infer<typeof createUserSchema>;

/** An admin's change to someone's account; `version` guards against two admins at once. */
export const updateUserSchema = z
  .object({
    version: rowVersion(),
    name: name.optional(),
    role: roleSchema.optional(),
    active: z.boolean().optional(),
  })
  .refine((v) => v.name !== undefined || v.role !== undefined || v.active !== undefined, { message: "Nothing to change", path: ["_"] });
export type UpdateUserInput = z.infer<typeof updateUserSchema>;

export const forgotPasswordSchema = z.object({ email });

export const setPasswordSchema = z
  .object({
    token: singleLine().trim().min(1, "The link has no token").max(100),
    password: newPassword,
    confirm: singleLine(),
  })
  .refine((v) => v.password === v.confirm, { message: "The two passwords differ", path: ["confirm"] });

/** The e-mails a person may turn off for themselves; account mail (invites, resets) always goes. */
export const MAIL_KINDS = NOTIFICATION_KINDS;
export type MailKind = (typeof MAIL_KINDS)[number];
export const MAIL_KIND_LABELS: Record<MailKind, string> = {
  furnace_run_finished: "A furnace run has finished",
  ready_for_finishing: "Parts are ready for finishing",
  wash_done: "A wash batch is done",
  build_finished: "A build has finished printing",
  build_failed: "A build has failed",
  feedstock_reorder: "A material's feedstock falls below its reorder point",
  bath_change_due: "A solvent bath is due for a change",
};

export const updateProfileSchema = z
  .object({
    name: name.optional(),
    unit_pref: z.enum(["mm", "in"], { message: "Choose mm or in" }).optional(),
    muted_mail: z.array(z.enum(MAIL_KINDS)).max(MAIL_KINDS.length).optional(),
  })
  .refine((v) => v.name !== undefined || v.unit_pref !== undefined || v.muted_mail !== undefined, { message: "Nothing to change", path: ["_"] });
export type UpdateProfileInput = z.infer<typeof updateProfileSchema>;

export const changePasswordSchema = z
  .object({
    current_password: singleLine().min(1, "Enter your current password").max(200),
    new_password: newPassword,
    confirm: singleLine(),
  })
  .refine((v) => v.new_password === v.confirm, { message: "The two passwords differ", path: ["confirm"] })
  .refine((v) => v.new_password !== v.current_password, { message: "Choose a password other than the current one", path: ["new_password"] });
