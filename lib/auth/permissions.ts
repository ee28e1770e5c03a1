// The single source of who may do what. Route handlers, server actions, pages and the
// navigation all ask this module; nothing else decides.

export const ROLES = ["admin", "manager", "technician", "furnace_operator", "machinist"] as const;
export type Role = (typeof ROLES)[number];

export const ROLE_LABELS: Record<Role, string> = {
  admin: "Admin",
  manager: "Manager",
  technician: "Technician",
  furnace_operator: "Furnace operator",
  machinist: "Machinist",
};

const everyone: readonly Role[] = ROLES;

/** Actions a person can take. Reading shop data is open to every signed-in role. */
export const PERMISSIONS = {
  "shop:read": everyone,
  "orders:write": ["admin", "manager", "technician"],
  "orders:prioritize": ["admin", "manager"],
  "parts:write": ["admin", "technician"],
  "geometry:upload": ["admin", "technician"],
  "builds:write": ["admin", "technician"],
  "builds:schedule": ["admin", "technician"],
  "plan:propose": ["admin", "manager", "technician"],
  "plan:apply": ["admin", "technician"],
  "wash:write": ["admin", "technician", "furnace_operator"],
  "wash:record": ["admin", "technician", "furnace_operator"],
  "furnace:write": ["admin", "furnace_operator"],
  "furnace:operate": ["admin", "furnace_operator"],
  "finishing:write": ["admin", "machinist"],
  "inspections:write": ["admin", "machinist"],
  "capacity:read": ["admin", "manager"],
  "activity:read": ["admin", "manager"],
  "quotes:read": ["admin", "manager", "technician"],
  "quotes:write": ["admin", "manager"],
  "calibration:apply": ["admin"],
  "setup:write": ["admin"],
  "users:admin": ["admin"],
  "mail:read": ["admin"],
  "jobs:read": ["admin"],
  "inventory:write": ["admin", "manager", "technician"],
  "inventory:recall": ["admin", "manager"],
  "consumables:write": ["admin", "technician", "furnace_operator"],
  "self:write": everyone,
  /** The scan page: the roles that work at the machines with a phone or tablet. */
  "floor:scan": ["admin", "technician", "furnace_operator", "machinist"],
} as const satisfies Record<string, readonly Role[]>;

export type Permission = keyof typeof PERMISSIONS;

export function can(role: Role | null | undefined, permission: Permission): boolean {
  if (!role) return false;
  return (PERMISSIONS[permission] as readonly Role[]).includes(role);
}

// Field-level rules ------------------------------------------------------------------------------
// A permission that guards one field rather than a whole action. Each applies on every door that
// sets the field: creating, updating and importing alike.

/** The priority an order gets when nobody with "orders:prioritize" chooses one. */
export const DEFAULT_ORDER_PRIORITY = 3;

/**
 * Why this role may not give an order this priority, or null. `before` is the order's current
 * priority on an update and undefined on a create (a new order may only take the default).
 */
export function orderPriorityRefusal(role: Role, after: number | undefined, before?: number): string | null {
  if (after === undefined || can(role, "orders:prioritize")) return null;
  const allowed = before ?? DEFAULT_ORDER_PRIORITY;
  if (after === allowed) return null;
  return before === undefined
    ? `Only a manager or an admin sets an order's priority; a new order starts at ${DEFAULT_ORDER_PRIORITY}.`
    : "Only a manager or an admin changes an order's priority.";
}

export type NavItem = { href: string; label: string; permission: Permission; hint: string };

/** The pages of the product, in the order the work flows. */
export const NAV: NavItem[] = [
  { href: "/floor", label: "Floor", permission: "shop:read", hint: "Printers, wash stations and furnaces on one timeline" },
  { href: "/parts", label: "Orders & parts", permission: "shop:read", hint: "Orders, parts, units and geometry" },
  { href: "/batches", label: "Batches", permission: "shop:read", hint: "Fill wash batches and furnace runs" },
  { href: "/scan", label: "Scan", permission: "floor:scan", hint: "Scan a traveler's QR code or type its code" },
  { href: "/finishing", label: "Finishing", permission: "shop:read", hint: "Arriving and ready parts, inspection" },
  { href: "/inventory", label: "Feedstock", permission: "shop:read", hint: "Lots on hand, projection, genealogy, solvent and gas" },
  { href: "/capacity", label: "Capacity", permission: "capacity:read", hint: "Utilization, work in progress, late orders" },
  { href: "/activity", label: "Activity", permission: "activity:read", hint: "Who changed what, when, on which record" },
  { href: "/quotes", label: "Quotes", permission: "quotes:read", hint: "Prices and promise dates for customers" },
  { href: "/setup", label: "Set-up", permission: "setup:write", hint: "Users, equipment, materials, profiles" },
  { href: "/mail", label: "Mail", permission: "mail:read", hint: "Messages captured by the local mail server" },
];

/** Pages each role sees first after signing in. */
export const HOME: Record<Role, string> = {
  admin: "/setup",
  manager: "/capacity",
  technician: "/floor",
  furnace_operator: "/batches",
  machinist: "/finishing",
};

export function navFor(role: Role): NavItem[] {
  return NAV.filter((item) => can(role, item.permission));
}
