export type PlateDrawingProps = {
  layout: {
    plate_x_mm: number;
    plate_y_mm: number;
    clearance_mm: number;
    fill: number;
    placements: { id: string; label?: string; x_mm: number; y_mm: number; w_mm: number; h_mm: number; rotated: boolean; z_mm: number }[];
    unplaced: { id: string; reason: string }[];
  };
  printerName: string | null;
};

/** Top view of the build plate: each green footprint where the packer put it, to scale. */
export function PlateDrawing({ layout, printerName }: PlateDrawingProps) {
  const W = 560;
  const scale = W / layout.plate_x_mm;
  const H = layout.plate_y_mm * scale;
  const tallest = Math.max(1, ...layout.placements.map((p) => p.z_mm));
  return (
    <figure data-testid="plate-drawing">
      <svg viewBox={`-1 -1 ${W + 2} ${H + 2}`} className="h-auto w-full max-w-[560px]" role="img" aria-label={`Plate layout: ${layout.placements.length} parts on a ${layout.plate_x_mm} by ${layout.plate_y_mm} mm plate`}>
        <defs>
          <pattern id="plate-hatch" width="8" height="8" patternUnits="userSpaceOnUse" patternTransform="rotate(45)">
            <line x1="0" y1="0" x2="0" y2="8" stroke="#e9e6e1" strokeWidth="3" />
          </pattern>
        </defs>
        <rect x={0} y={0} width={W} height={H} fill="url(#plate-hatch)" stroke="#8d8273" strokeWidth={1.5} rx={3} />
        <rect x={layout.clearance_mm * scale} y={layout.clearance_mm * scale} width={(layout.plate_x_mm - 2 * layout.clearance_mm) * scale} height={(layout.plate_y_mm - 2 * layout.clearance_mm) * scale} fill="#fbf4ef" stroke="#d3cdc4" strokeDasharray="4 3" />
        {layout.placements.map((p) => {
          // y grows upwards on the plate, downwards in SVG
          const x = p.x_mm * scale;
          const y = H - (p.y_mm + p.h_mm) * scale;
          const shade = 0.35 + 0.65 * (p.z_mm / tallest);
          return (
            <g key={p.id}>
              <rect x={x} y={y} width={p.w_mm * scale} height={p.h_mm * scale} fill={`rgba(196,101,53,${shade.toFixed(2)})`} stroke="#873d25" strokeWidth={1} rx={2}>
                <title>{`${p.label ?? p.id}: ${p.w_mm.toFixed(1)} × ${p.h_mm.toFixed(1)} mm, ${p.z_mm.toFixed(1)} mm tall${p.rotated ? ", turned 90°" : ""}`}</title>
              </rect>
              {p.w_mm * scale > 40 ? (
                <text x={x + 4} y={y + 13} fontSize={10} fill="#1b1916" fontFamily="var(--font-jetbrains), monospace">
                  {(p.label ?? "").slice(-8)}
                </text>
              ) : null}
            </g>
          );
        })}
      </svg>
      <figcaption className="mt-1 text-xs text-soot-500">
        {printerName ? `${printerName}: ` : ""}
        {layout.plate_x_mm} × {layout.plate_y_mm} mm plate, {layout.clearance_mm} mm clearance, {Math.round(layout.fill * 100)} % covered. Darker = taller.
        {layout.unplaced.length ? <span className="block font-semibold text-oxide-700">{layout.unplaced.length} unit(s) do not fit: {layout.unplaced[0].reason}</span> : null}
      </figcaption>
    </figure>
  );
}
