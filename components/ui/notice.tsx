export type NoticeProps = { tone?: "info" | "warning" | "danger" | "success"; title?: string; children: React.ReactNode };

const TONES = {
  info: "border-slate2-400/40 bg-slate2-100 text-slate2-600",
  warning: "border-brass-400/50 bg-brass-100 text-brass-600",
  danger: "border-oxide-500/40 bg-oxide-100 text-oxide-700",
  success: "border-verdigris-400/40 bg-verdigris-100 text-verdigris-700",
};

export function Notice({ tone = "info", title, children }: NoticeProps) {
  return (
    <div role={tone === "danger" ? "alert" : "status"} className={`rounded-card border px-4 py-3 text-sm ${TONES[tone]}`}>
      {title ? <div className="mb-0.5 font-semibold">{title}</div> : null}
      <div>{children}</div>
    </div>
  );
}
