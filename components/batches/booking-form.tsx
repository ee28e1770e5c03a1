"use client";

import { useState } from "react";
import { fromLocalInput, toLocalInput } from "./format";

export type BookingFormProps = {
  label: string;
  timeZone: string;
  /** Current start, or a proposal for one. */
  initial: string;
  /** Resources to choose from (wash stations or furnaces); the current one first. */
  resources: { id: string; name: string }[];
  resourceId: string;
  busy?: boolean;
  onSubmit: (startsAt: string, resourceId: string) => void;
  onCancel: () => void;
};

/** Start time (typed in the shop's time zone) and lane for a wash batch or furnace run. */
export function BookingForm({ label, timeZone, initial, resources, resourceId, busy, onSubmit, onCancel }: BookingFormProps) {
  const [value, setValue] = useState(() => toLocalInput(initial, timeZone));
  const [resource, setResource] = useState(resourceId);
  const iso = fromLocalInput(value, timeZone);
  return (
    <form
      className="mt-2 flex flex-wrap items-end gap-2 rounded-md border border-soot-200 bg-soot-50 p-2"
      onSubmit={(e) => {
        e.preventDefault();
        if (iso) onSubmit(iso, resource);
      }}
    >
      <label className="text-2xs text-soot-600">
        {label} ({timeZone})
        <input
          type="datetime-local"
          aria-label={`${label} (shop time)`}
          value={value}
          onChange={(e) => setValue(e.target.value)}
          className="mt-0.5 block rounded border border-soot-200 bg-white px-1.5 py-1 text-xs"
          required
        />
      </label>
      <label className="text-2xs text-soot-600">
        Lane
        <select aria-label="Lane" value={resource} onChange={(e) => setResource(e.target.value)} className="mt-0.5 block rounded border border-soot-200 bg-white px-1.5 py-1 text-xs">
          {resources.map((r) => (
            <option key={r.id} value={r.id}>
              {r.name}
            </option>
          ))}
        </select>
      </label>
      <button type="submit" disabled={!iso || busy} className="rounded bg-clay-600 px-2.5 py-1 text-xs font-semibold text-white hover:bg-clay-700 disabled:opacity-50">
        {busy ? "Booking…" : "Book"}
      </button>
      <button type="button" onClick={onCancel} className="rounded border border-soot-200 bg-white px-2.5 py-1 text-xs text-soot-700 hover:bg-soot-100">
        Close
      </button>
    </form>
  );
}
