import { BrandMark } from "@/components/shell/brand-mark";

export default function AuthLayout({ children }: { children: React.ReactNode }) {
  return (
    <div className="flex min-h-screen items-center justify-center bg-soot-900 px-4 py-12">
      <div className="w-full max-w-md">
        <div className="mb-6 flex items-center justify-center gap-2.5 text-clay-300">
          <BrandMark className="h-9 w-9" />
          <span className="font-display text-3xl font-semibold tracking-tight text-soot-50">Hearth</span>
        </div>
        <div className="rounded-card bg-white p-7 shadow-card">{children}</div>
      </div>
    </div>
  );
}
