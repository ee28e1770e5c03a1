import { redirect } from "next/navigation";
import { HOME } from "@/lib/auth/permissions";
import { requirePageUser } from "@/app/_server/session";

export default async function Home() {
  const user = await requirePageUser();
  redirect(HOME[user.role]);
}
