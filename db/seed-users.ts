import type { Role } from "@/lib/auth/permissions";

/** The demo shop's people, one per role; the sign-in page lists them in the demo. */
export const DEMO_PASSWORD = "hearth-demo";

export const DEMO_USERS: { email: string; name: string; role: Role }[] = [
  { email: "admin@demo.hearth.test", name: "Ines Okafor", role: "admin" },
  { email: "manager@demo.hearth.test", name: "Tomasz Brandt", role: "manager" },
  { email: "technician@demo.hearth.test", name: "Priya Raman", role: "technician" },
  { email: "furnace@demo.hearth.test", name: "Joel Lindqvist", role: "furnace_operator" },
  { email: "machinist@demo.hearth.test", name: "Marta Quiroga", role: "machinist" },
];
