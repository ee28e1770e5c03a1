import Link from "next/link";

export const metadata = { title: "Not for your role" };

export default async function ForbiddenPage({ searchParams }: { searchParams: Promise<{ need?: string }> }) {
  const { need } = await searchParams;
  return (
    <>
      <h1 className="font-display text-xl font-semibold">Not for your role</h1>
      <p className="mt-2 text-sm text-soot-600">
        This page needs a permission your role does not have{need ? ` (${need.slice(0, 40)})` : ""}. Ask an admin if you need it.
      </p>
      <Link href="/" className="tap-target mt-5 inline-flex items-center text-sm font-semibold text-clay-700 hover:underline">
        Back to my work
      </Link>
    </>
  );
}
