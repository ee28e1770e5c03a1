export const kg = (g: number) => `${(g / 1000).toLocaleString("en-GB", { minimumFractionDigits: 1, maximumFractionDigits: 1 })} kg`;

export const STATE_LABEL: Record<string, string> = { quarantine: "In quarantine", released: "Released", consumed: "Used up", rejected: "Rejected" };

// Colour is never the only sign: every badge carries its word.
export const STATE_CLASS: Record<string, string> = {
  quarantine: "bg-brass-100 text-soot-900 ring-1 ring-brass-600",
  released: "bg-verdigris-100 text-verdigris-700",
  consumed: "bg-soot-100 text-soot-700",
  rejected: "bg-oxide-100 text-oxide-700",
};

export const field = "mt-1 block w-full rounded-md border border-soot-300 bg-white px-2 py-2 text-sm focus:border-clay-500 focus:outline-none focus:ring-2 focus:ring-clay-200";
export const primary = "min-h-11 rounded-md bg-clay-700 px-4 py-2 text-sm font-semibold text-white hover:bg-clay-800 disabled:opacity-50";
export const secondary = "min-h-11 rounded-md border border-clay-300 bg-white px-4 py-2 text-sm font-semibold text-clay-800 hover:bg-clay-50 disabled:opacity-50";
