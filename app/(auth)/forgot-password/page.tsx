import Link from "next/link";
import { ForgotPasswordForm } from "@/components/auth/forgot-password-form";

export const metadata = { title: "Forgot password" };

export default function ForgotPasswordPage() {
  return (
    <>
      <h1 className="font-display text-xl font-semibold">Set a new password</h1>
      <p className="mt-1 text-sm text-soot-500">Type the e-mail address you sign in with. We send a link that works once, for 1 hour.</p>
      <ForgotPasswordForm />
      <Link href="/sign-in" className="tap-target mt-5 inline-flex items-center text-sm font-semibold text-clay-700 hover:underline">
        Back to sign-in
      </Link>
    </>
  );
}
