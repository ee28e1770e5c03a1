import type { Role } from "@/lib/auth/permissions";

// The e-mails the worker sends, and who receives each. A user may turn any of these off
// (users.muted_mail); account mail (invite, password reset) cannot be turned off.

export const NOTIFICATION_KINDS = ["furnace_run_finished", "ready_for_finishing", "wash_done", "build_finished", "build_failed", "feedstock_reorder", "bath_change_due"] as const;
export type NotificationKind = (typeof NOTIFICATION_KINDS)[number];

export const NOTIFICATION_RECIPIENTS: Record<NotificationKind, readonly Role[]> = {
  furnace_run_finished: ["furnace_operator", "manager"],
  ready_for_finishing: ["machinist"],
  wash_done: ["furnace_operator"],
  build_finished: ["technician"],
  build_failed: ["technician"],
  feedstock_reorder: ["manager"],
  bath_change_due: ["furnace_operator", "technician"],
};

export const NOTIFICATION_LABELS: Record<NotificationKind, string> = {
  furnace_run_finished: "Furnace run finished",
  ready_for_finishing: "Parts ready for finishing",
  wash_done: "Wash batch done",
  build_finished: "Build finished",
  build_failed: "Build failed",
  feedstock_reorder: "Feedstock to reorder",
  bath_change_due: "Solvent bath change due",
};

/** The outbox key of a message: one message per kind, subject and recipient. */
export const subjectKey = (entity: "build" | "wash_batch" | "furnace_run", id: string) => `${entity}:${id}`;
