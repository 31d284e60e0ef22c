/**
 * Is an upload a text export? Looks at its first bytes (storage.server.ts hands over up to 64 KiB)
 * before the rest is stored. Logger exports are CSV/TSV/TXT in UTF-8, ASCII or a Windows code page;
 * a zero byte never occurs in those, and neither do many control characters.
 */
export const UPLOAD_EXTENSIONS = [".csv", ".tsv", ".txt"] as const;

export function extensionProblem(fileName: string): string | null {
  const lower = fileName.toLowerCase();
  if (UPLOAD_EXTENSIONS.some((ext) => lower.endsWith(ext))) return null;
  const dot = lower.lastIndexOf(".");
  const ext = dot > 0 ? lower.slice(dot) : "";
  return `"${fileName.slice(0, 120)}" ${ext ? `is a ${ext} file` : "has no file extension"}; Rakeline reads logger exports saved as .csv, .tsv or .txt.`;
}

export function textProblem(head: Buffer): string | null {
  if (head.length === 0) return "The file is empty.";
  if (head[0] === 0x50 && head[1] === 0x4b && head[2] === 0x03 && head[3] === 0x04) {
    return "The file is a ZIP archive (or an Excel workbook), not a text export. Unpack it, or export the log from the logger software as CSV.";
  }
  if ((head[0] === 0xff && head[1] === 0xfe) || (head[0] === 0xfe && head[1] === 0xff)) {
    return "The file is saved as UTF-16 text. Export or save it as UTF-8 (or plain ASCII) CSV.";
  }
  const zero = head.indexOf(0);
  if (zero >= 0) return `The file holds binary data (a zero byte at position ${zero + 1}), not a text export. Export the log as CSV, TSV or TXT.`;
  let control = 0;
  for (const byte of head) if (byte < 32 && byte !== 9 && byte !== 10 && byte !== 12 && byte !== 13) control++;
  if (control > head.length / 100) return "The file holds many control characters, so it is not a text export. Export the log as CSV, TSV or TXT.";
  return null;
}
