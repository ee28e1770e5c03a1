import type { TrayRun } from "@/lib/packing/types";

export type TrayDrawingProps = {
  layout: TrayRun | null;
  tray_x_mm: number;
  tray_y_mm: number;
  tray_count: number;
  clearance_mm: number;
  /** unit id → what to print on it */
  labels: Record<string, string>;
  /** Placements to mark as new (a drop being previewed or just made). */
  highlight?: readonly string[];
  /** Width of one tray in CSS px. */
  width?: number;
  title?: string;
};

/** Top view of each tray: footprints where the packer put them, the edge clearance dashed. */
export function TrayDrawing({ layout, tray_x_mm, tray_y_mm, tray_count, clearance_mm, labels, highlight = [], width = 150, title }: TrayDrawingProps) {
  const trays = Array.from({ length: tray_count }, (_, i) => layout?.trays.find((t) => t.index === i)?.placements ?? []);
  const stroke = Math.max(tray_x_mm, tray_y_mm) / 150;
  const font = Math.min(tray_x_mm, tray_y_mm) / 11;
  return (
    <div className="flex flex-wrap gap-2" data-testid="tray-drawing" aria-label={title ?? "Tray layout"} role="group">
      {trays.map((placements, i) => (
        <figure key={i} className="m-0">
          <svg
            viewBox={`${-stroke} ${-stroke} ${tray_x_mm + 2 * stroke} ${tray_y_mm + 2 * stroke}`}
            width={width}
            height={(width * tray_y_mm) / tray_x_mm}
            role="img"
            aria-label={`Tray ${i + 1}: ${placements.length} part${placements.length === 1 ? "" : "s"}`}
            data-tray={i}
            data-placements={placements.length}
          >
            <rect x={0} y={0} width={tray_x_mm} height={tray_y_mm} rx={stroke * 2} className="fill-soot-100 stroke-soot-400" strokeWidth={stroke} />
            {clearance_mm > 0 ? (
              <rect
                x={clearance_mm}
                y={clearance_mm}
                width={Math.max(0, tray_x_mm - 2 * clearance_mm)}
                height={Math.max(0, tray_y_mm - 2 * clearance_mm)}
                fill="none"
                className="stroke-soot-300"
                strokeWidth={stroke * 0.7}
                strokeDasharray={`${stroke * 3} ${stroke * 2}`}
              />
            ) : null}
            {placements.map((p) => {
              const isNew = highlight.includes(p.unit);
              const full = labels[p.unit] ?? "";
              const label = full.length > 7 ? full.slice(-7) : full;
              // Monospace glyphs are about 0.6 em wide: shrink the label to its rectangle.
              const size = Math.min(font, (p.w * 0.9) / Math.max(1, label.length * 0.62), p.d * 0.6);
              return (
                <g key={p.unit} data-unit={p.unit} data-new={isNew ? "true" : undefined}>
                  <title>{`${full} · ${p.w.toFixed(1)} × ${p.d.toFixed(1)} mm${p.rotated ? " (turned 90°)" : ""}`}</title>
                  <rect
                    x={p.x}
                    y={p.y}
                    width={p.w}
                    height={p.d}
                    rx={stroke}
                    className={isNew ? "fill-ember-400/70 stroke-ember-600" : "fill-clay-200 stroke-clay-600"}
                    strokeWidth={stroke}
                  />
                  {size >= font * 0.45 ? (
                    <text x={p.x + p.w / 2} y={p.y + p.d / 2} fontSize={size} textAnchor="middle" dominantBaseline="central" className="fill-soot-800 font-mono">
                      {label}
                    </text>
                  ) : null}
                </g>
              );
            })}
          </svg>
          <figcaption className="text-center text-2xs text-soot-500">
            Tray {i + 1} · {placements.length}
          </figcaption>
        </figure>
      ))}
    </div>
  );
}
