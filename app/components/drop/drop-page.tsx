/**
 * Drop a log: drop one or several exports; each is uploaded at once and read in its own engine worker;
 * the engineer confirms its Channel map, fills the session details, and the browser reads the whole
 * file, then stores the session (the server re-checks it from the raw file).
 */
import { UppyContextProvider, useDropzone } from "@uppy/react";
import { memo, useCallback, useEffect, useMemo, useRef, useState } from "react";
import { useNavigate } from "react-router";
import { transfer } from "comlink";
import { MIN_PART_BYTES } from "~/engine/split";
import type { SessionSummary } from "~/engine/summary";
import type { CarInput, ChannelMap } from "~/engine/types";
import { engineVersionOf } from "~/lib/engine-version";
import { detailsFieldErrors, engineOptionsOf, sessionDetailsSchema, type SessionDetails } from "~/lib/sessions/details";
import type { DropChoices } from "~/routes/sessions/drop-page.server";
import { ChannelMapStep } from "./channel-map-step";
import { DetailsStep, detailsInput } from "./details-step";
import { FileCard } from "./file-card";
import { EMPTY_DETAILS, type DetailsDraft, type DropItem } from "./types";
import { ACCEPTED_TYPES, answerError, useDrop } from "./use-drop";

interface Read {
  summary: SessionSummary;
  details: SessionDetails;
  map: ChannelMap;
}

function today(): string {
  const d = new Date();
  return `${d.getFullYear()}-${String(d.getMonth() + 1).padStart(2, "0")}-${String(d.getDate()).padStart(2, "0")}`;
}

export function DropPage({ teamSlug, choices }: { teamSlug: string; choices: DropChoices }) {
  const drop = useDrop(teamSlug);
  const { items, update } = drop;
  const navigate = useNavigate();
  const [activeId, setActiveId] = useState<string | null>(null);
  const [draft, setDraft] = useState<DetailsDraft>(() => ({ ...EMPTY_DETAILS, carId: choices.cars.length === 1 ? choices.cars[0].id : "", setupId: choices.cars.length === 1 ? (choices.cars[0].setups[0]?.id ?? "") : "" }));
  const [flags, setFlags] = useState({ venueOther: false, driverOther: false });
  const [errors, setErrors] = useState<Record<string, string>>({});
  const reads = useRef(new Map<string, Read>());
  const base = `/t/${encodeURIComponent(teamSlug)}`;

  // The date defaults to today in the engineer's own time zone (set after hydration: the server's day may differ).
  useEffect(() => setDraft((d) => (d.date ? d : { ...d, date: today() })), []);

  const active = items.find((it) => it.id === activeId) ?? items.find((it) => it.store.state !== "stored" && !it.inspectError) ?? items[0];

  const store = useCallback(async (item: DropItem) => {
    const read = reads.current.get(item.id);
    const upload = item.upload.answer?.upload;
    if (!read || !upload) return;
    update(item.id, () => ({ store: { state: "storing" } }));
    const { traces, ...summary } = read.summary;
    let status = 0, text = "";
    try {
      const res = await fetch(`/api/t/${encodeURIComponent(teamSlug)}/sessions`, {
        method: "POST",
        headers: { "content-type": "application/json", accept: "application/json" },
        body: JSON.stringify({
          uploadId: upload.id,
          details: read.details,
          map: read.map,
          ...(item.profileName.trim() ? { profile: { name: item.profileName.trim() } } : {}),
          browser: { summary, traces, engineVersion: engineVersionOf(read.summary) },
        }),
      });
      status = res.status;
      text = await res.text();
    } catch {
      status = 0;
    }
    if (status === 201 || status === 200) {
      const answer = JSON.parse(text) as { id: string; url: string; duplicate?: boolean };
      update(item.id, () => ({ store: { state: "stored", session: answer } }));
      const others = items.filter((it) => it.id !== item.id && it.store.state !== "stored" && !it.inspectError);
      if (others.length === 0 && !answer.duplicate) navigate(answer.url);
      return;
    }
    const message = answerError(status, text);
    if (status === 422) {
      try {
        const body = JSON.parse(text) as { fields?: Record<string, string> };
        setErrors({ ...(body.fields ?? {}), form: message });
      } catch {
        setErrors({ form: message });
      }
      update(item.id, () => ({ step: "details", store: { state: "failed", error: message } }));
      return;
    }
    update(item.id, () => ({ store: { state: "failed", error: message } }));
  }, [items, navigate, teamSlug, update]);

  // A read file is stored as soon as its upload is complete (whichever finishes last).
  useEffect(() => {
    for (const it of items) if (it.store.state === "waiting" && it.upload.state === "done") void store(it);
  }, [items, store]);

  const submit = async (item: DropItem, map: ChannelMap) => {
    const parsed = sessionDetailsSchema.safeParse(detailsInput(draft, flags.venueOther, flags.driverOther));
    if (!parsed.success) {
      setErrors(detailsFieldErrors(parsed.error));
      return;
    }
    setErrors({});
    const details = parsed.data;
    const carAnswer = await fetch(`${`/api${base}`}/cars/${encodeURIComponent(details.carId)}/setups/${encodeURIComponent(details.setupId)}/car.json`).catch(() => null);
    if (!carAnswer?.ok) {
      setErrors({ form: `The car file for this setup could not be loaded: ${answerError(carAnswer?.status ?? 0, carAnswer ? await carAnswer.text() : "")}` });
      return;
    }
    const car = (await carAnswer.json()) as CarInput;
    const venue = choices.venues.find((v) => v.id === details.venueId);
    const carRow = choices.cars.find((c) => c.id === details.carId);
    const options = engineOptionsOf(details, { venueAltitudeM: venue?.altitudeM ?? null, carFuelDensityKgPerL: carRow?.fuelDensityKgPerL ?? null });
    // A large file is read in parts, one engine worker per core (at most 4, as the CLI's threads), which
    // gives the CLI's own summary for the same part count; a small one whole in one worker.
    const parts = Math.max(1, Math.min(4, navigator.hardwareConcurrency || 1));
    const res = await drop.readWhole(item.id, async (e, file, onProgress, helpers) => {
      if (parts === 1 || file.size < 2 * MIN_PART_BYTES) return e.api.analyse(file, car, map, options, onProgress);
      const ports = await helpers(parts - 1);
      return e.api.analyseInParts(file, car, map, options, parts, transfer(ports, ports), onProgress);
    });
    if (res === null) return;
    const result = res as Awaited<ReturnType<import("./engine-client").EngineHandle["api"]["analyse"]>>;
    if (!result.ok) {
      update(item.id, (it) => ({ read: { ...it.read, state: "failed", error: result.message } }));
      return;
    }
    reads.current.set(item.id, { summary: result.value, details, map });
    update(item.id, (it) => ({ read: { ...it.read, state: "done" }, store: { state: "waiting" } }));
  };

  // Stable handles for the memoised file view: it renders again when its item or the form changes,
  // never for a progress tick.
  const latest = useRef({ submit, store, runChecks: drop.runChecks });
  latest.current = { submit, store, runChecks: drop.runChecks };
  const actions = useMemo<Actions>(() => ({
    submit: (item, map) => latest.current.submit(item, map),
    store: (item) => latest.current.store(item),
    runChecks: (id, map) => void latest.current.runChecks(id, map),
  }), []);

  return (
    <div className="space-y-5">
      <div>
        <h1 className="text-2xl font-semibold">Drop a log</h1>
        <p className="mt-1 max-w-3xl text-sm text-ink-soft">
          Drop the logger's export after the stint: CSV, TSV or TXT, one file or several, up to 2 GB each. Each file is read here in your
          browser and uploaded to the team at the same time; the server reads the stored file again and checks the figures.
        </p>
      </div>
      {drop.uppy ? (
        <UppyContextProvider uppy={drop.uppy}>
          <DropZone />
        </UppyContextProvider>
      ) : (
        <DropZoneFrame disabled>Getting ready…</DropZoneFrame>
      )}
      {drop.notice && (
        <p role="alert" className="rounded border border-danger/40 bg-danger-bg px-3 py-2 text-sm text-danger">
          {drop.notice} <button type="button" className="underline" onClick={() => drop.setNotice(null)}>Dismiss</button>
        </p>
      )}
      {items.length > 0 && (
        <div className="grid gap-5 lg:grid-cols-[18rem_1fr]">
          <ul className="space-y-2" aria-label="Dropped files">
            {items.map((it) => (
              <FileCard key={it.id} item={it} progress={drop.progress[it.id]} active={it.id === active?.id} onSelect={() => setActiveId(it.id)} onCancel={() => drop.cancel(it.id)}
                onRetryUpload={() => drop.retryUpload(it.id)} onCancelRead={() => drop.cancelRead(it.id)} />
            ))}
          </ul>
          {active && <ActiveFile key={active.id} item={active} {...{ choices, draft, flags, errors, base, actions, setDraft, setFlags, update }} />}
        </div>
      )}
    </div>
  );
}

function DropZoneFrame({ children, disabled, ...rest }: { children: React.ReactNode; disabled?: boolean } & React.HTMLAttributes<HTMLDivElement>) {
  return (
    <div {...rest} className={`flex min-h-32 flex-col items-center justify-center gap-1 rounded border-2 border-dashed border-rule bg-panel px-4 py-6 text-center ${disabled ? "text-ink-faint" : "cursor-pointer hover:border-accent"}`}>
      {children}
    </div>
  );
}

function DropZone() {
  const { getRootProps, getInputProps } = useDropzone();
  const input = getInputProps();
  return (
    <DropZoneFrame {...getRootProps()} data-testid="drop-zone" role="button" tabIndex={0} aria-label="Drop log exports here, or choose files">
      <input {...input} accept={ACCEPTED_TYPES.join(",")} className="hidden" data-testid="drop-input" />
      <p className="font-medium">Drop log exports here</p>
      <p className="text-sm text-ink-soft">or <span className="text-accent underline">choose files</span> · CSV, TSV or TXT</p>
    </DropZoneFrame>
  );
}

interface Actions {
  submit(item: DropItem, map: ChannelMap): Promise<void>;
  store(item: DropItem): Promise<void>;
  runChecks(id: string, map: ChannelMap): void;
}

type ActiveProps = {
  item: DropItem;
  choices: DropChoices;
  draft: DetailsDraft;
  flags: { venueOther: boolean; driverOther: boolean };
  errors: Record<string, string>;
  base: string;
  actions: Actions;
  setDraft: React.Dispatch<React.SetStateAction<DetailsDraft>>;
  setFlags: React.Dispatch<React.SetStateAction<{ venueOther: boolean; driverOther: boolean }>>;
  update: ReturnType<typeof useDrop>["update"];
};

const ActiveFile = memo(function ActiveFile({ item, choices, draft, flags, errors, base, actions, setDraft, setFlags, update }: ActiveProps) {
  const { submit, store } = actions;
  const steps = ["Channel map", "Session details", "Read and store"];
  const current = item.read.state === "reading" || item.store.state !== "idle" ? 2 : item.step === "details" ? 1 : 0;
  return (
    <section className="min-w-0 rounded border border-rule bg-panel" aria-label={`Session from ${item.name}`}>
      <header className="border-b border-rule-soft px-4 py-2.5">
        <h2 className="truncate font-semibold">{item.name}</h2>
        <ol className="mt-1 flex flex-wrap gap-x-4 gap-y-1 text-sm">
          {steps.map((s, i) => (
            <li key={s} className={i === current ? "font-semibold text-ink" : "text-ink-faint"} aria-current={i === current ? "step" : undefined}>
              <span className="num">{i + 1}</span> {s}
            </li>
          ))}
        </ol>
      </header>
      <div className="px-4 py-3">
        {item.store.state === "stored" && item.store.session ? (
          <p className="text-sm">
            {item.store.session.duplicate ? "This file was already stored in this team as a session. " : "Stored. "}
            <a className="text-accent underline" href={item.store.session.url}>Open its Balance report</a>; the server checks the figures on the stored file.
          </p>
        ) : item.inspectError ? (
          <p className="text-sm text-ink-soft">Export the log again as a text file (CSV, TSV or TXT) and drop it here. Cancel this file to remove it from the list.</p>
        ) : !item.inspection ? (
          <p className="text-sm text-ink-soft" aria-live="polite">Reading the header and the first minutes…</p>
        ) : item.step === "map" ? (
          <ChannelMapStep
            item={item}
            onMap={(map, source) => update(item.id, (it) => ({ map, mapSource: source ?? (it.mapSource.startsWith("changed") ? it.mapSource : "changed by you") }))}
            onProfileName={(profileName) => update(item.id, () => ({ profileName }))}
            onChecks={(map) => actions.runChecks(item.id, map)}
            onConfirm={(map) => update(item.id, () => ({ map, step: "details" }))}
          />
        ) : (
          <DetailsStep
            choices={choices}
            draft={draft}
            venueOther={flags.venueOther}
            driverOther={flags.driverOther}
            errors={errors}
            busy={item.read.state === "reading" || item.store.state === "storing" || item.store.state === "waiting"}
            garageLink={`${base}/garage`}
            onChange={(patch, f) => {
              setDraft((d) => ({ ...d, ...patch }));
              if (f) setFlags((x) => ({ ...x, ...f }));
            }}
            onBack={() => update(item.id, () => ({ step: "map" }))}
            onSubmit={() => void submit(item, item.map as ChannelMap)}
          />
        )}
        {item.store.state === "failed" && (
          <div role="alert" className="mt-4 rounded border border-danger/40 bg-danger-bg px-3 py-2 text-sm text-danger">
            <p>The session was not stored: {item.store.error}</p>
            <p className="mt-1 text-ink">Your map and details are kept.{" "}
              <button type="button" className="text-accent underline" onClick={() => void store(item)}>Try storing again</button>
            </p>
          </div>
        )}
      </div>
    </section>
  );
});
