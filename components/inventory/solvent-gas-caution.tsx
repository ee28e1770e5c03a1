export function SolventGasCaution() {
  return (
    <aside className="rounded-card border border-brass-600 bg-brass-100 p-4 text-sm text-soot-900" aria-label="Safety cautions">
      <p className="font-semibold">Solvents and process gases</p>
      <ul className="mt-1 list-disc space-y-1 pl-5">
        <li>Wash solvents give off flammable, harmful vapour: change baths with ventilation running, no ignition sources, gloves and eye protection; store and dispose of spent solvent as its safety data sheet and local codes require.</li>
        <li>Hydrogen-bearing gases are flammable and argon and nitrogen displace oxygen: keep cylinders secured, check for leaks, ventilate and monitor oxygen where gas can collect, and purge as the furnace maker instructs (NFPA 86).</li>
        <li>Feedstock dust and metal powder can be combustible (NFPA 484). Hearth estimates quantities only; follow the equipment maker, local codes and licensed practice.</li>
      </ul>
    </aside>
  );
}
