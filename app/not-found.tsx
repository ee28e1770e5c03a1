import Link from "next/link";

export default function NotFound() {
  return (
    <div className="mx-auto max-w-lg px-6 py-24 text-center">
      <h1 className="font-display text-2xl font-semibold">Nothing here</h1>
      <p className="mt-2 text-sm text-soot-500">This page does not exist, or what it showed has been removed.</p>
      <Link href="/" className="tap-target mt-6 inline-flex items-center text-sm font-semibold text-clay-700 hover:underline">
        Back to my work
      </Link>
    </div>
  );
}
