"use client";

import { ScrollRegion } from "@/components/ui/scroll-region";
import { useMemo, useState } from "react";
import { useFieldArray, useForm, useWatch } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";
import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { createProfileSchema, type ProfileFormInput, type ProfileInput } from "@/lib/batches/schemas";
import type { BoardProfile } from "@/lib/batches/types";
import { profileCurve } from "@/lib/process/furnace-profile";
import { ApiError, getJson, sendJson } from "@/components/batches/client";
import { duration } from "@/components/batches/format";
import { BatchesQueryProvider } from "@/components/batches/query-provider";
import { ProfileChart } from "./profile-chart";

type ProfileItem = BoardProfile & {
  version: number;
  notes: string;
  retired: boolean;
  supersedes_id: string | null;
  superseded_by: string | null;
  furnace_ids: string[];
  cycle_minutes: number;
  booked_runs: number;
  draft_runs: number;
};
type ListResponse = {
  profiles: ProfileItem[];
  materials: { id: string; code: string; name: string; default_profile_id: string | null }[];
  furnaces: { id: string; name: string; max_cool_rate_c_per_min: number; active: boolean }[];
};

export function ProfileEditor({ canEdit }: { canEdit: boolean }) {
  return (
    <BatchesQueryProvider>
      <ProfileEditorInner canEdit={canEdit} />
    </BatchesQueryProvider>
  );
}

const input = "mt-0.5 block w-full rounded border border-soot-200 bg-white px-2 py-1 text-sm focus:border-clay-500 focus:outline-none";

function ProfileEditorInner({ canEdit }: { canEdit: boolean }) {
  const q = useQuery({ queryKey: ["sinter-profiles"], queryFn: () => getJson<ListResponse>("/api/sinter-profiles") });
  const [selected, setSelected] = useState<string | "new" | null>(null);
  const [showRetired, setShowRetired] = useState(false);
  if (q.isError) return <p role="alert" className="text-sm text-oxide-700">{(q.error as Error).message}</p>;
  if (!q.data) return <p className="text-sm text-soot-500">Loading profiles…</p>;
  const { profiles, materials, furnaces } = q.data;
  const shown = profiles.filter((p) => showRetired || !p.retired);
  const current = selected && selected !== "new" ? profiles.find((p) => p.id === selected) : undefined;
  return (
    <div className="grid grid-cols-1 gap-5 xl:grid-cols-[minmax(22rem,30rem)_1fr]">
      <section aria-label="Sinter profiles" className="rounded-card border border-soot-200 bg-white p-3 shadow-card">
        <div className="mb-2 flex items-center justify-between gap-2">
          <label className="flex items-center gap-1.5 text-xs text-soot-600">
            <input type="checkbox" checked={showRetired} onChange={(e) => setShowRetired(e.target.checked)} /> Show replaced revisions
          </label>
          {canEdit ? (
            <button type="button" onClick={() => setSelected("new")} className="rounded-md bg-clay-600 px-3 py-1 text-xs font-semibold text-white hover:bg-clay-700">
              New profile
            </button>
          ) : null}
        </div>
        <ScrollRegion label="Sinter profiles"><table className="w-full text-left text-xs" data-testid="profile-list">
          <thead className="text-2xs text-soot-500">
            <tr>
              <th className="py-1 font-medium">Profile</th>
              <th className="py-1 font-medium">Cycle</th>
              <th className="py-1 font-medium">Materials</th>
              <th className="py-1 font-medium">Runs</th>
            </tr>
          </thead>
          <tbody>
            {shown.map((p) => (
              <tr key={p.id} className={`cursor-pointer border-t border-soot-100 hover:bg-soot-50 ${selected === p.id ? "bg-clay-50" : ""}`} onClick={() => setSelected(p.id)}>
                <td className="py-1.5">
                  <button type="button" className="text-left font-semibold text-soot-900 hover:text-clay-700" onClick={() => setSelected(p.id)}>
                    {p.label}
                  </button>
                  <div className="text-2xs text-soot-500">
                    {p.name}
                    {p.retired ? " · replaced" : ""}
                  </div>
                </td>
                <td className="tabular py-1.5">{duration(p.cycle_minutes)}</td>
                <td className="py-1.5">{p.material_ids.map((id) => materials.find((m) => m.id === id)?.code).filter(Boolean).join(", ") || "—"}</td>
                <td className="tabular py-1.5" title="booked, running or finished runs that hold this revision">
                  {p.booked_runs}
                  {p.draft_runs ? ` + ${p.draft_runs} draft` : ""}
                </td>
              </tr>
            ))}
          </tbody>
        </table></ScrollRegion>
      </section>
      {selected === "new" ? (
        <ProfileForm key="new" materials={materials} furnaces={furnaces} canEdit={canEdit} onSaved={(id) => setSelected(id)} />
      ) : current ? (
        <ProfileForm key={`${current.id}:${current.version}`} profile={current} materials={materials} furnaces={furnaces} canEdit={canEdit && !current.retired} onSaved={(id) => setSelected(id)} />
      ) : (
        <p className="text-sm text-soot-500">Choose a profile to see its curve{canEdit ? " and edit it" : ""}.</p>
      )}
    </div>
  );
}

function defaultsOf(p?: ProfileItem): ProfileFormInput {
  if (!p) {
    return {
      code: "", name: "", atmosphere: "", start_temp_c: 20, cool_rate_c_per_min: 10, cool_to_c: 100, notes: "",
      segments: [{ rate_c_per_min: 5, setpoint_c: 600, hold_min: 60 }, { rate_c_per_min: 5, setpoint_c: 1350, hold_min: 120 }],
      material_ids: [], furnace_ids: [],
    };
  }
  return {
    code: p.code, name: p.name, atmosphere: p.atmosphere, start_temp_c: p.start_temp_c, cool_rate_c_per_min: p.cool_rate_c_per_min, cool_to_c: p.cool_to_c, notes: p.notes,
    segments: p.segments.map((s) => ({ rate_c_per_min: s.rate_c_per_min, setpoint_c: s.setpoint_c, hold_min: s.hold_min })),
    material_ids: p.material_ids, furnace_ids: p.furnace_ids,
  };
}

function ProfileForm({ profile, materials, furnaces, canEdit, onSaved }: { profile?: ProfileItem; materials: ListResponse["materials"]; furnaces: ListResponse["furnaces"]; canEdit: boolean; onSaved: (id: string) => void }) {
  const qc = useQueryClient();
  const [message, setMessage] = useState<{ tone: "danger" | "success"; text: string } | null>(null);
  const form = useForm<ProfileFormInput, unknown, ProfileInput>({ resolver: zodResolver(createProfileSchema), defaultValues: defaultsOf(profile), mode: "onChange" });
  const { register, control, handleSubmit, formState, setError } = form;
  const segments = useFieldArray({ control, name: "segments" });
  const watched = useWatch({ control });
  const [furnaceForPreview, setFurnaceForPreview] = useState<string>("");

  const preview = useMemo(() => {
    try {
      const limit = furnaces.find((f) => f.id === furnaceForPreview)?.max_cool_rate_c_per_min;
      const curve = profileCurve(
        {
          startTempC: Number(watched.start_temp_c),
          segments: (watched.segments ?? []).map((s) => ({ rateCPerMin: Number(s?.rate_c_per_min), setpointC: Number(s?.setpoint_c), holdMin: Number(s?.hold_min ?? 0) })),
          coolRateCPerMin: Number(watched.cool_rate_c_per_min),
          coolToC: Number(watched.cool_to_c),
        },
        limit ? { maxCoolRateCPerMin: limit } : undefined,
        5,
      );
      return { ok: true as const, curve: curve.map((p) => ({ minute: p.minute, temp_c: p.tempC, phase: p.phase })) };
    } catch (err) {
      return { ok: false as const, reason: (err as Error).message };
    }
  }, [watched, furnaces, furnaceForPreview]);

  const save = useMutation({
    mutationFn: (values: ProfileInput) =>
      profile
        ? sendJson<ProfileItem & { revised: boolean }>(`/api/sinter-profiles/${profile.id}`, "PUT", { ...values, version: profile.version })
        : sendJson<ProfileItem>("/api/sinter-profiles", "POST", values),
    onSuccess: (saved) => {
      const revised = "revised" in saved && saved.revised;
      setMessage({ tone: "success", text: revised ? `Saved as ${saved.label}: booked runs keep revision ${profile?.revision}.` : `Saved ${saved.label}.` });
      void qc.invalidateQueries({ queryKey: ["sinter-profiles"] });
      onSaved(saved.id);
    },
    onError: (err) => {
      if (err instanceof ApiError && err.fieldErrors) {
        for (const [field, msgs] of Object.entries(err.fieldErrors)) setError(field as keyof ProfileFormInput, { message: msgs[0] });
      }
      setMessage({ tone: "danger", text: err instanceof ApiError ? err.message : "The server could not be reached; nothing was saved." });
    },
  });

  const errors = formState.errors;
  const inUse = profile && profile.booked_runs > 0;
  const total = preview.ok ? preview.curve[preview.curve.length - 1].minute : null;
  return (
    <form onSubmit={handleSubmit((v) => save.mutate(v))} className="space-y-4 rounded-card border border-soot-200 bg-white p-4 shadow-card" aria-label="Sinter profile" data-testid="profile-form" noValidate>
      <div className="flex flex-wrap items-start justify-between gap-2">
        <h2 className="font-display text-lg font-semibold text-soot-900">{profile ? profile.label : "New sinter profile"}</h2>
        {profile?.retired ? <span className="rounded bg-soot-100 px-2 py-0.5 text-xs text-soot-600">Replaced by a newer revision: read only</span> : null}
      </div>
      {inUse && canEdit ? (
        <p className="rounded border border-brass-400/50 bg-brass-100 px-3 py-2 text-xs text-brass-600" data-testid="revision-note">
          {profile.booked_runs} booked, running or finished run{profile.booked_runs === 1 ? "" : "s"} hold{profile.booked_runs === 1 ? "s" : ""} revision {profile.revision}. Saving changes
          creates revision {profile.revision + 1}; those runs keep their program, and materials and draft runs move to the new revision.
        </p>
      ) : null}
      {message ? (
        <p role={message.tone === "danger" ? "alert" : "status"} className={`rounded px-3 py-2 text-sm ${message.tone === "danger" ? "bg-oxide-100 text-oxide-700" : "bg-verdigris-100 text-verdigris-700"}`} data-testid="profile-message">
          {message.text}
        </p>
      ) : null}
      <fieldset disabled={!canEdit} className="grid grid-cols-1 gap-3 sm:grid-cols-3">
        <Field label="Code" error={errors.code?.message}>
          <input {...register("code")} className={input} />
        </Field>
        <Field label="Name" error={errors.name?.message}>
          <input {...register("name")} className={input} />
        </Field>
        <Field label="Atmosphere" error={errors.atmosphere?.message}>
          <input {...register("atmosphere")} className={input} placeholder="e.g. H₂ flowing, vacuum with Ar backfill" />
        </Field>
        <Field label="Start temperature (°C)" error={errors.start_temp_c?.message}>
          <input type="number" step="any" {...register("start_temp_c")} className={input} />
        </Field>
        <Field label="Cool-down rate (°C/min)" error={errors.cool_rate_c_per_min?.message}>
          <input type="number" step="any" {...register("cool_rate_c_per_min")} className={input} />
        </Field>
        <Field label="Cool down to (°C)" error={errors.cool_to_c?.message}>
          <input type="number" step="any" {...register("cool_to_c")} className={input} />
        </Field>
      </fieldset>
      <fieldset disabled={!canEdit}>
        <legend className="text-sm font-semibold text-soot-800">Segments</legend>
        <p className="text-2xs text-soot-500">Each segment ramps at its rate to its set-point, then holds. Ramp time is |ΔT| / rate.</p>
        {errors.segments?.message || errors.segments?.root?.message ? <p className="text-xs text-oxide-700">{errors.segments?.message ?? errors.segments?.root?.message}</p> : null}
        <table className="mt-1 w-full text-left text-xs">
          <thead className="text-2xs text-soot-500">
            <tr>
              <th className="py-1 font-medium">#</th>
              <th className="py-1 font-medium">Ramp (°C/min)</th>
              <th className="py-1 font-medium">Set-point (°C)</th>
              <th className="py-1 font-medium">Hold (min)</th>
              <th />
            </tr>
          </thead>
          <tbody>
            {segments.fields.map((f, i) => (
              <tr key={f.id} className="border-t border-soot-100 align-top" data-testid="segment-row">
                <td className="py-1 pr-2 text-soot-500">{i + 1}</td>
                <td className="py-1 pr-2">
                  <input type="number" step="any" aria-label={`Ramp rate of segment ${i + 1}`} {...register(`segments.${i}.rate_c_per_min`)} className={input} />
                  <Err text={errors.segments?.[i]?.rate_c_per_min?.message} />
                </td>
                <td className="py-1 pr-2">
                  <input type="number" step="any" aria-label={`Set-point of segment ${i + 1}`} {...register(`segments.${i}.setpoint_c`)} className={input} />
                  <Err text={errors.segments?.[i]?.setpoint_c?.message} />
                </td>
                <td className="py-1 pr-2">
                  <input type="number" step="any" aria-label={`Hold of segment ${i + 1}`} {...register(`segments.${i}.hold_min`)} className={input} />
                  <Err text={errors.segments?.[i]?.hold_min?.message} />
                </td>
                <td className="whitespace-nowrap py-1">
                  <button type="button" onClick={() => i > 0 && segments.move(i, i - 1)} className="px-1 text-soot-500 hover:text-soot-900" aria-label={`Move segment ${i + 1} up`}>
                    ↑
                  </button>
                  <button type="button" onClick={() => segments.remove(i)} disabled={segments.fields.length === 1} className="px-1 text-soot-500 hover:text-oxide-700" aria-label={`Remove segment ${i + 1}`}>
                    ×
                  </button>
                </td>
              </tr>
            ))}
          </tbody>
        </table>
        <button type="button" onClick={() => segments.append({ rate_c_per_min: 5, setpoint_c: 1000, hold_min: 0 })} className="mt-1 rounded border border-soot-200 px-2 py-0.5 text-xs text-soot-700 hover:bg-soot-50">
          Add segment
        </button>
      </fieldset>
      <section aria-label="Preview">
        <div className="flex flex-wrap items-center justify-between gap-2">
          <h3 className="text-sm font-semibold text-soot-800">Preview {total !== null ? <span className="font-normal text-soot-500">· cycle {duration(total)}</span> : null}</h3>
          <label className="text-2xs text-soot-600">
            Cool-down limited by{" "}
            <select value={furnaceForPreview} onChange={(e) => setFurnaceForPreview(e.target.value)} className="rounded border border-soot-200 px-1 py-0.5 text-xs" aria-label="Furnace for the preview">
              <option value="">no furnace</option>
              {furnaces.map((f) => (
                <option key={f.id} value={f.id}>
                  {f.name} (≤ {f.max_cool_rate_c_per_min} °C/min)
                </option>
              ))}
            </select>
          </label>
        </div>
        {preview.ok ? <ProfileChart curve={preview.curve} height={220} /> : <p className="rounded bg-soot-50 px-3 py-6 text-center text-sm text-oxide-700" data-testid="preview-error">{preview.reason}</p>}
      </section>
      <fieldset disabled={!canEdit} className="grid grid-cols-1 gap-4 sm:grid-cols-2">
        <div>
          <legend className="text-sm font-semibold text-soot-800">Compatible materials</legend>
          <div className="mt-1 grid gap-1">
            {materials.map((m) => (
              <label key={m.id} className="flex items-center gap-2 text-sm text-soot-800">
                <input type="checkbox" value={m.id} {...register("material_ids")} /> {m.code} <span className="text-2xs text-soot-500">{m.name}</span>
              </label>
            ))}
          </div>
        </div>
        <div>
          <legend className="text-sm font-semibold text-soot-800">Furnaces that run it</legend>
          <div className="mt-1 grid gap-1">
            {furnaces.map((f) => (
              <label key={f.id} className="flex items-center gap-2 text-sm text-soot-800">
                <input type="checkbox" value={f.id} {...register("furnace_ids")} /> {f.name}
                {f.active ? null : <span className="text-2xs text-soot-500">(out of use)</span>}
              </label>
            ))}
          </div>
        </div>
      </fieldset>
      <Field label="Notes" error={errors.notes?.message}>
        <textarea {...register("notes")} rows={2} className={input} disabled={!canEdit} />
      </Field>
      {canEdit ? (
        <button type="submit" disabled={save.isPending} className="rounded-md bg-clay-600 px-4 py-1.5 text-sm font-semibold text-white hover:bg-clay-700 disabled:opacity-50">
          {save.isPending ? "Saving…" : inUse ? `Save as revision ${profile!.revision + 1}` : "Save profile"}
        </button>
      ) : null}
    </form>
  );
}

function Field({ label, error, children }: { label: string; error?: string; children: React.ReactNode }) {
  return (
    <label className="block text-xs text-soot-600">
      {label}
      {children}
      <Err text={error} />
    </label>
  );
}

function Err({ text }: { text?: string }) {
  return text ? <span className="mt-0.5 block text-2xs text-oxide-700">{text}</span> : null;
}
