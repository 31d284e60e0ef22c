/**
 * The Drop a log page's files: Uppy takes the drop and uploads each raw file (@uppy/xhr-upload to
 * the team's upload route) while an engine worker per file reads its header, previews and checks,
 * and later the whole file. Everything a file goes through is kept in one DropItem.
 */
import Uppy, { type UppyFile } from "@uppy/core";
import XHRUpload from "@uppy/xhr-upload";
import { transfer } from "comlink";
import { useCallback, useEffect, useRef, useState } from "react";
import type { SignCheck } from "~/engine/sign-check";
import type { ChannelMap } from "~/engine/types";
import { headerSignature } from "~/lib/sessions/logger-profile";
import { progressProxy, startEngine, type EngineHandle, type ReadProgress } from "./engine-client";
import type { DraftMap, DropItem, FileProgress, LoggerProfile, UploadAnswer } from "./types";

/** What the upload route takes (it checks the content too); the size cap is the route's own default. */
export const ACCEPTED_TYPES = [".csv", ".tsv", ".txt"];
export const MAX_UPLOAD_BYTES = 2 * 1024 ** 3;

type Meta = Record<string, unknown>;
type Body = Record<string, never>;

/** The `{"error"}` of an answer, or a sentence for the status when there is none. */
export function answerError(status: number, text: string): string {
  try {
    const body = JSON.parse(text) as { error?: unknown };
    if (typeof body.error === "string" && body.error) return body.error;
  } catch {
    // not JSON: fall through to the status
  }
  if (status === 0) return "The connection to the server was lost. Check the network and retry.";
  if (status === 503) return "The server cannot reach its database just now. Nothing was lost: retry in a moment.";
  if (status === 413) return "The file is larger than this server takes.";
  return `The server answered ${status}.`;
}

function newItem(file: UppyFile<Meta, Body>): DropItem {
  return {
    id: file.id,
    name: file.name ?? "log",
    bytes: file.size ?? 0,
    step: "map",
    map: {},
    mapSource: "",
    profiles: [],
    profileName: "",
    checks: { state: "idle", signs: [], units: [] },
    upload: { state: "queued" },
    read: { state: "idle" },
    store: { state: "idle" },
  };
}

export function useDrop(teamSlug: string) {
  const [uppy, setUppy] = useState<Uppy<Meta, Body> | null>(null);
  const [items, setItems] = useState<DropItem[]>([]);
  const [progress, setProgress] = useState<Record<string, FileProgress>>({});
  const [notice, setNotice] = useState<string | null>(null);
  const engines = useRef(new Map<string, EngineHandle>());
  const files = useRef(new Map<string, File>());

  /** Changes one item; an empty change keeps the item as it is (so memoised views skip it). */
  const update = useCallback((id: string, change: (item: DropItem) => Partial<DropItem>) => {
    setItems((all) => all.map((it) => {
      if (it.id !== id) return it;
      const patch = change(it);
      return Object.keys(patch).length ? { ...it, ...patch } : it;
    }));
  }, []);

  const tick = useCallback((id: string, change: (p: FileProgress) => FileProgress) => {
    setProgress((all) => ({ ...all, [id]: change(all[id] ?? { sent: 0, startedAt: null }) }));
  }, []);

  const engineOf = useCallback((id: string): EngineHandle => {
    let e = engines.current.get(id);
    if (!e) {
      e = startEngine();
      engines.current.set(id, e);
    }
    return e;
  }, []);

  const inspect = useCallback(async (id: string, file: File) => {
    const res = await engineOf(id).api.inspect(file);
    if (!res.ok) {
      update(id, () => ({ inspectError: res.message }));
      return;
    }
    const inspection = res.value;
    let profiles: LoggerProfile[] = [];
    try {
      const signature = headerSignature(inspection.header.columns);
      const answer = await fetch(`/api/t/${encodeURIComponent(teamSlug)}/logger-profiles?signature=${signature}`, { headers: { accept: "application/json" } });
      if (answer.ok) profiles = ((await answer.json()) as { profiles: LoggerProfile[] }).profiles;
    } catch {
      // Profiles are a convenience: without them the suggester's map is proposed.
    }
    const match = profiles.find((p) => p.matches);
    update(id, () => ({
      inspection,
      profiles,
      map: (match ? match.map : inspection.suggestion.map) as DraftMap,
      mapSource: match ? `Logger profile "${match.name}", saved for this header` : "proposed from the column names",
    }));
  }, [engineOf, teamSlug, update]);

  useEffect(() => {
    const u = new Uppy<Meta, Body>({
      autoProceed: true,
      restrictions: { allowedFileTypes: ACCEPTED_TYPES, maxFileSize: MAX_UPLOAD_BYTES },
    }).use(XHRUpload, {
      endpoint: `/api/t/${encodeURIComponent(teamSlug)}/uploads`,
      fieldName: "file",
      formData: true,
      allowedMetaFields: false,
      limit: 2,
      // A refused file (too large, wrong type) is refused again; a retry is the engineer's call.
      shouldRetry: () => false,
      timeout: 120_000,
    });
    u.on("file-added", (file) => {
      const data = file.data as File;
      files.current.set(file.id, data);
      setItems((all) => [...all, newItem(file)]);
      void inspect(file.id, data).catch((e: unknown) => update(file.id, () => ({ inspectError: String(e) })));
    });
    u.on("upload-progress", (file, p) => {
      if (!file) return;
      tick(file.id, (x) => ({ ...x, sent: p.bytesUploaded ?? 0, startedAt: x.startedAt ?? (p.uploadStarted || Date.now()) }));
      update(file.id, (it) => (it.upload.state === "queued" ? { upload: { ...it.upload, state: "uploading" } } : {}));
    });
    u.on("upload-success", (file, response) => {
      if (!file) return;
      const answer = response.body as unknown as UploadAnswer;
      tick(file.id, (x) => ({ ...x, sent: file.size ?? x.sent }));
      update(file.id, (it) => ({ upload: { ...it.upload, state: "done", answer } }));
    });
    u.on("upload-error", (file, error, response) => {
      if (!file) return;
      const xhr = response as unknown as XMLHttpRequest | undefined;
      const status = xhr && typeof xhr.status === "number" ? xhr.status : 0;
      const message = xhr && typeof xhr.status === "number" ? answerError(status, xhr.responseText ?? "") : error.message;
      update(file.id, (it) => ({ upload: { ...it.upload, state: "failed", error: message, retryable: status === 0 || status >= 500 } }));
    });
    u.on("restriction-failed", (file, error) => {
      setNotice(`${file?.name ?? "That file"}: ${error.message}. Drop a CSV, TSV or TXT export of up to 2 GB.`);
    });
    setUppy(u);
    const running = engines.current;
    return () => {
      for (const e of running.values()) e.end();
      running.clear();
      u.destroy();
    };
  }, [teamSlug, inspect, update, tick]);

  const endHelpers = useCallback((id: string) => {
    for (const [key, e] of engines.current) {
      if (key.startsWith(`${id}#`)) {
        e.end();
        engines.current.delete(key);
      }
    }
  }, []);

  /** Stops the upload and any read, and forgets the file. */
  const cancel = useCallback((id: string) => {
    engines.current.get(id)?.end();
    engines.current.delete(id);
    endHelpers(id);
    files.current.delete(id);
    if (uppy?.getFile(id)) uppy.removeFile(id);
    setItems((all) => all.filter((it) => it.id !== id));
  }, [uppy, endHelpers]);

  const retryUpload = useCallback((id: string) => {
    update(id, () => ({ upload: { state: "queued" } }));
    tick(id, () => ({ sent: 0, startedAt: null }));
    void uppy?.retryUpload(id);
  }, [uppy, update, tick]);

  /** Sign and unit checks of the map as it stands (complete maps only). */
  const runChecks = useCallback(async (id: string, map: ChannelMap) => {
    const file = files.current.get(id);
    if (!file) return;
    update(id, (it) => ({ checks: { ...it.checks, state: "running" } }));
    const api = engineOf(id).api;
    const [signs, units] = await Promise.all([api.checkSigns(file, map), api.checkUnits(file, map)]);
    const failed = !signs.ok ? signs : !units.ok ? units : null;
    update(id, () => ({
      checks: failed && !failed.ok
        ? { state: "failed", signs: [], units: [], error: failed.message }
        : { state: "done", signs: (signs as { value: SignCheck[] }).value, units: (units as { value: SignCheck[] }).value },
    }));
  }, [engineOf, update]);

  /**
   * Ports to `n` more engine workers for this file (each serves the engine on its port), for a read
   * in parts; they end with the file's own worker (cancel, or the end of the read).
   */
  const helperPorts = useCallback(async (id: string, n: number): Promise<MessagePort[]> => {
    const ports: MessagePort[] = [];
    for (let k = 1; k <= n; k++) {
      const key = `${id}#${k}`;
      engines.current.get(key)?.end();
      const helper = startEngine();
      engines.current.set(key, helper);
      const { port1, port2 } = new MessageChannel();
      await helper.api.connect(transfer(port1, [port1]));
      ports.push(port2);
    }
    return ports;
  }, []);


  /** Reads the whole file in the worker; resolves with the summary or null (failed or cancelled). */
  const readWhole = useCallback(async (id: string, run: (e: EngineHandle, file: File, onProgress: (p: ReadProgress) => void, helpers: (n: number) => Promise<MessagePort[]>) => Promise<unknown>) => {
    const file = files.current.get(id);
    if (!file) return null;
    update(id, () => ({ read: { state: "reading" } }));
    tick(id, (x) => ({ ...x, read: { bytes: 0, totalBytes: file.size, rows: 0, elapsedMs: 0 } }));
    const onProgress = progressProxy((p) => tick(id, (x) => ({ ...x, read: p })));
    // User Timing marks: the read shows in a browser's performance panel (and the long-task test's window).
    performance.mark("rakeline:read-start");
    try {
      return await run(engineOf(id), file, onProgress, (n) => helperPorts(id, n));
    } catch (e) {
      // A cancelled read ends its worker: the call then fails here, which is not an error to show.
      update(id, (it) => (it.read.state === "cancelled" ? {} : { read: { state: "failed", error: e instanceof Error ? e.message : String(e) } }));
      return null;
    } finally {
      performance.mark("rakeline:read-end");
      endHelpers(id);
    }
  }, [engineOf, update, tick, helperPorts, endHelpers]);

  const cancelRead = useCallback((id: string) => {
    update(id, (it) => ({ read: { ...it.read, state: "cancelled" } }));
    engines.current.get(id)?.end();
    engines.current.delete(id);
    endHelpers(id);
  }, [update, endHelpers]);

  return { uppy, items, progress, update, notice, setNotice, cancel, retryUpload, runChecks, readWhole, cancelRead, fileOf: (id: string) => files.current.get(id) };
}
