// Finishing sintered parts makes fine metal dust: the caution every finishing page carries.

export function DustCaution() {
  return (
    <aside className="rounded-card border border-oxide-500/30 bg-white px-4 py-3 text-sm text-soot-700" aria-label="Safety" data-testid="dust-caution">
      <span className="font-semibold text-oxide-700">Combustible metal dust. </span>
      Grinding, machining and polishing sintered parts makes fine metal dust that can burn or explode. Collect it with equipment rated for
      combustible metal dust, keep surfaces and ducts clean, keep ignition sources and water-reactive hazards away, and wear the eye, hand and
      respiratory protection your assessment calls for. See NFPA 484 (Combustible Metals; being consolidated into NFPA 660) and follow the
      machine and dust-collector makers&rsquo; instructions, local codes and licensed practice. Hearth plans work; it controls no equipment.
    </aside>
  );
}
