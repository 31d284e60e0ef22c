/** The state of one dropped file on the Drop a log page, from its first bytes to its stored session. */
import type { SignCheck } from "~/engine/sign-check";
import type { ChannelMap, ChannelMapEntry, ChannelName } from "~/engine/types";
import type { Inspection, ReadProgress } from "../../../workers/engine-api";

export type DraftMap = { [K in ChannelName]?: ChannelMapEntry };

export interface LoggerProfile {
  id: string;
  name: string;
  map: ChannelMap;
  matches: boolean;
}

export interface UploadAnswer {
  upload: { id: string; fileName: string; bytes: number; sha256: string };
  duplicate: { id: string; url: string } | null;
}

export interface UploadState {
  state: "queued" | "uploading" | "done" | "failed";
  answer?: UploadAnswer;
  error?: string;
  /** A lost connection or a server that could not answer (5xx): sending again may work; a refusal will not. */
  retryable?: boolean;
}

export interface ReadState {
  state: "idle" | "reading" | "done" | "failed" | "cancelled";
  error?: string;
}

/**
 * Where a file's upload and read stand, kept apart from DropItem: progress ticks several times a
 * second and only the file list needs it, so the map and details forms do not render again for it.
 */
export interface FileProgress {
  sent: number;
  startedAt: number | null;
  read?: ReadProgress;
}

export interface StoreState {
  state: "idle" | "waiting" | "storing" | "stored" | "failed";
  error?: string;
  session?: { id: string; url: string; duplicate?: boolean };
}

export interface DropItem {
  id: string;
  name: string;
  bytes: number;
  /** Header, suggestion and previews from the worker; `inspectError` when the file cannot be read. */
  inspection?: Inspection;
  inspectError?: string;
  step: "map" | "details";
  map: DraftMap;
  /** Where the map came from, said beside it. */
  mapSource: string;
  profiles: LoggerProfile[];
  /** Save the confirmed map as a Logger profile under this name (empty: do not save). */
  profileName: string;
  checks: { state: "idle" | "running" | "done" | "failed"; signs: SignCheck[]; units: SignCheck[]; error?: string };
  upload: UploadState;
  read: ReadState;
  store: StoreState;
}

/** The session details form as typed (strings), keyed like the details schema's fields. */
export interface DetailsDraft {
  carId: string;
  setupId: string;
  date: string;
  venueId: string;
  venueName: string;
  run: string;
  driverUserId: string;
  driverName: string;
  airTempC: string;
  airPressureHpa: string;
  airHumidityPct: string;
  fuelStartL: string;
  fuelEndL: string;
  fuelDensityKgPerL: string;
  tyreNotes: string;
  notes: string;
}

export const EMPTY_DETAILS: DetailsDraft = {
  carId: "", setupId: "", date: "", venueId: "", venueName: "", run: "", driverUserId: "", driverName: "",
  airTempC: "", airPressureHpa: "", airHumidityPct: "", fuelStartL: "", fuelEndL: "", fuelDensityKgPerL: "", tyreNotes: "", notes: "",
};
