/** Notes on a session and its bands: the list, and (for roles that may annotate) a form that posts without a reload. */
import { useEffect, useRef, useState } from "react";
import { useFetcher } from "react-router";
import { bandKey } from "~/lib/report/annotations";

export interface NoteView {
  id: string;
  bandMinKmh: number | null;
  bandMaxKmh: number | null;
  body: string;
  author: string | null;
  authorId?: string | null;
  createdAt: string;
}

export const noteWhere = (n: Pick<NoteView, "bandMinKmh" | "bandMaxKmh">) => (n.bandMinKmh === null ? "whole session" : `${n.bandMinKmh}–${n.bandMaxKmh} km/h`);

/** `editor` (the report page, for roles that may annotate): the author, or the owner, may edit or delete a note. */
export function NotesList({ notes, editor }: { notes: NoteView[]; editor?: { userId: string; isOwner: boolean } }) {
  if (notes.length === 0) return <p className="text-sm text-ink-soft">No notes yet.</p>;
  return (
    <ul className="space-y-1.5 text-sm" data-testid="notes">
      {notes.map((n) => (
        <li key={n.id}>
          {editor && (n.authorId === editor.userId || editor.isOwner) ? <EditableNote note={n} /> : <NoteLine note={n} />}
        </li>
      ))}
    </ul>
  );
}

function NoteLine({ note: n }: { note: NoteView }) {
  return (
    <>
      <span className="num text-xs text-ink-soft">{noteWhere(n)}</span> — {n.body}
      <span className="text-xs text-ink-faint"> ({n.author ?? "former member"}, {n.createdAt.slice(0, 10)})</span>
    </>
  );
}

function EditableNote({ note }: { note: NoteView }) {
  const fetcher = useFetcher<{ errors?: Record<string, string>; ok?: boolean }>();
  const [mode, setMode] = useState<"view" | "edit" | "delete">("view");
  useEffect(() => {
    if (fetcher.state === "idle" && fetcher.data?.ok) setMode("view");
  }, [fetcher.state, fetcher.data]);
  const error = fetcher.data?.errors?.body ?? fetcher.data?.errors?.note;
  const small = "rounded border border-rule px-2 py-0.5 text-xs hover:bg-rule-soft";
  if (mode === "edit")
    return (
      <fetcher.Form method="post" className="space-y-1" aria-label="Edit the note">
        <input type="hidden" name="intent" value="edit-note" />
        <input type="hidden" name="noteId" value={note.id} />
        <label className="flex flex-col">
          <span className="text-xs text-ink-soft">Note on {noteWhere(note)}</span>
          <input name="body" defaultValue={note.body} maxLength={500} required className="rounded border border-rule px-2 py-1" aria-invalid={error ? true : undefined} />
        </label>
        {error && <p role="alert" className="text-xs text-danger">{error}</p>}
        <div className="flex gap-2">
          <button type="submit" disabled={fetcher.state !== "idle"} className="rounded border border-accent bg-accent px-2 py-0.5 text-xs font-medium text-white hover:bg-accent-strong disabled:opacity-60">
            {fetcher.state !== "idle" ? "Saving…" : "Save note"}
          </button>
          <button type="button" className={small} onClick={() => setMode("view")}>Cancel</button>
        </div>
      </fetcher.Form>
    );
  return (
    <div className="flex flex-wrap items-baseline gap-x-2">
      <span><NoteLine note={note} /></span>
      {mode === "delete" ? (
        <fetcher.Form method="post" className="inline-flex gap-2" aria-label="Delete the note">
          <input type="hidden" name="intent" value="delete-note" />
          <input type="hidden" name="noteId" value={note.id} />
          <button type="submit" className="rounded border border-danger px-2 py-0.5 text-xs text-danger hover:bg-danger-bg">Delete this note</button>
          <button type="button" className={small} onClick={() => setMode("view")}>Keep</button>
        </fetcher.Form>
      ) : (
        <span className="inline-flex gap-1 print:hidden">
          <button type="button" className={small} onClick={() => setMode("edit")} aria-label={`Edit the note on ${noteWhere(note)}`}>Edit</button>
          <button type="button" className={small} onClick={() => setMode("delete")} aria-label={`Delete the note on ${noteWhere(note)}`}>Delete</button>
        </span>
      )}
      {error && <p role="alert" className="w-full text-xs text-danger">{error}</p>}
    </div>
  );
}

export function NoteForm({ bands }: { bands: { min_kmh: number; max_kmh: number }[] }) {
  const fetcher = useFetcher<{ errors?: Record<string, string>; ok?: boolean }>();
  const form = useRef<HTMLFormElement>(null);
  useEffect(() => {
    if (fetcher.state === "idle" && fetcher.data?.ok) form.current?.reset();
  }, [fetcher.state, fetcher.data]);
  const errors = fetcher.data?.errors ?? {};
  return (
    <fetcher.Form method="post" ref={form} className="mt-3 space-y-2 text-sm print:hidden" aria-label="Add a note">
      <input type="hidden" name="intent" value="annotate" />
      <div className="flex flex-wrap gap-2">
        <label className="flex flex-col">
          <span className="text-xs text-ink-soft">On</span>
          <select name="band" className="rounded border border-rule px-2 py-1">
            <option value="">Whole session</option>
            {bands.map((b) => (
              <option key={b.min_kmh} value={bandKey(b.min_kmh, b.max_kmh)}>
                {b.min_kmh}–{b.max_kmh} km/h
              </option>
            ))}
          </select>
        </label>
        <label className="flex min-w-56 flex-1 flex-col">
          <span className="text-xs text-ink-soft">Note</span>
          <input name="body" maxLength={500} required placeholder="e.g. front locking into the hairpin" className="rounded border border-rule px-2 py-1" aria-invalid={errors.body ? true : undefined} />
        </label>
      </div>
      {(errors.body || errors.band) && <p className="text-xs text-danger" role="alert">{errors.body ?? errors.band}</p>}
      <button type="submit" disabled={fetcher.state !== "idle"} className="rounded border border-accent bg-accent px-3 py-1 font-medium text-white hover:bg-accent-strong disabled:opacity-60">
        {fetcher.state !== "idle" ? "Saving…" : "Add note"}
      </button>
    </fetcher.Form>
  );
}
