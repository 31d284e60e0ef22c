/** Wires the streaming parser into the summary builder: one pass over the file, constant memory. */
import { ingestLog } from "./ingest";
import { createSummaryBuilder } from "./summary";
import type { SessionSummary, SummaryOptions } from "./summary";
import type { CarInput, ChannelMap } from "./types";

export interface AnalyseOptions extends SummaryOptions {
  onProgress?(bytes: number): void;
}

export async function analyseLog(
  source: AsyncIterable<Uint8Array> | ReadableStream<Uint8Array>,
  car: CarInput,
  map: ChannelMap,
  options: AnalyseOptions = {},
): Promise<SessionSummary> {
  const { onProgress, ...summaryOptions } = options;
  const builder = createSummaryBuilder(car, summaryOptions);
  const result = await ingestLog(source, map, { onBlock: (b) => builder.push(b), onProgress });
  return builder.finish({ header: result.header, map, rows: result.rows, bytes: result.bytes, droppedCells: result.droppedCells, badCells: result.badCells, shortRows: result.shortRows });
}
