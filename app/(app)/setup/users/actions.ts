"use server";

import { revalidatePath } from "next/cache";
import { getDb } from "@/db/client";
import { findUserById } from "@/db/users/reads";
import { createUserAndInvite, revokeAllSessions, sendAccountLink, updateUserByAdmin } from "@/db/auth/accounts";
import { actionFailure, actionSuccess, type ActionState } from "@/lib/auth/action-state";
import { ROLE_LABELS } from "@/lib/auth/permissions";
import { createUserSchema, roleSchema, updateUserSchema } from "@/lib/auth/schemas";
import { requireUser } from "@/app/_server/session";
import { AppError } from "@/lib/errors";
import { z } from "zod";

// Server actions behind the users page. Each is a public POST endpoint, so each checks the
// role first, exactly as the /api/users handlers do, and calls the same lib/auth functions.

const idField = z.string().uuid("Pick a user");
const field = (form: FormData | undefined, name: string) => {
  const v = form?.get(name);
  return typeof v === "string" ? v : undefined;
};

function mailNote(mail: { status: "sent" | "queued"; error?: string }) {
  return mail.status === "sent" ? "The e-mail has been sent." : "The mail server did not answer; the e-mail is queued and will be retried.";
}

async function loadTarget(id: string) {
  const user = await findUserById(getDb(), idField.parse(id));
  if (!user) throw new AppError("not_found", "No such user.");
  return user;
}

export async function createUser(_prev: ActionState, form: FormData): Promise<ActionState> {
  try {
    const actor = await requireUser("users:admin");
    const input = createUserSchema.parse({ email: field(form, "email"), name: field(form, "name"), role: field(form, "role"), unit_pref: field(form, "unit_pref") || undefined });
    const { user, mail } = await createUserAndInvite(getDb(), actor, input);
    revalidatePath("/setup/users");
    return actionSuccess(`${user.name} has an account as ${ROLE_LABELS[user.role]}. ${mailNote(mail)}`);
  } catch (err) {
    return actionFailure(err);
  }
}

export async function changeRole(_prev: ActionState, form: FormData): Promise<ActionState> {
  try {
    const actor = await requireUser("users:admin");
    const target = await loadTarget(field(form, "id") ?? "");
    const role = roleSchema.parse(field(form, "role"));
    const input = updateUserSchema.parse({ version: field(form, "version"), role });
    const user = await updateUserByAdmin(getDb(), actor, target.id, input);
    revalidatePath("/setup/users");
    return actionSuccess(`${user.name} is now ${ROLE_LABELS[user.role]}.`);
  } catch (err) {
    return actionFailure(err);
  }
}

export async function setActive(_prev: ActionState, form: FormData): Promise<ActionState> {
  try {
    const actor = await requireUser("users:admin");
    const target = await loadTarget(field(form, "id") ?? "");
    const active = z.enum(["true", "false"], { message: "Say whether the account is active" }).parse(field(form, "active")) === "true";
    const input = updateUserSchema.parse({ version: field(form, "version"), active });
    const user = await updateUserByAdmin(getDb(), actor, target.id, input);
    revalidatePath("/setup/users");
    return actionSuccess(user.active ? `${user.name} can sign in again.` : `${user.name} is deactivated; their sessions have ended.`);
  } catch (err) {
    return actionFailure(err);
  }
}

export async function sendLink(_prev: ActionState, form: FormData): Promise<ActionState> {
  try {
    const actor = await requireUser("users:admin");
    const target = await loadTarget(field(form, "id") ?? "");
    const { kind, mail } = await sendAccountLink(getDb(), actor, target.id);
    const what = kind === "reset" ? "A reset link" : "A new invitation";
    return actionSuccess(`${what} for ${target.name} (${target.email}). ${mailNote(mail)}`);
  } catch (err) {
    return actionFailure(err);
  }
}

export async function signOutEverywhere(_prev: ActionState, form: FormData): Promise<ActionState> {
  try {
    const actor = await requireUser("users:admin");
    const target = await loadTarget(field(form, "id") ?? "");
    const ended = await revokeAllSessions(getDb(), actor, target.id);
    revalidatePath("/setup/users");
    return actionSuccess(`${target.name} is signed out everywhere (${ended} session${ended === 1 ? "" : "s"} ended).`);
  } catch (err) {
    return actionFailure(err);
  }
}
